#include "study/experiment.hpp"

#include <algorithm>
#include <atomic>
#include <exception>
#include <mutex>
#include <stdexcept>
#include <thread>
#include <vector>

namespace tocsin {

void run_experiment(const Scenario& scenario, const PopulationFactory& make_population,
                    const ExperimentOptions& options, const ReplicationObserver& observe) {
    const std::uint64_t total = options.replications;
    if (options.replayed_openings && total > 1)
        throw std::invalid_argument("replayed chart openings belong to the replayed log and cannot be used with "
                                    "more than one replication; generate chart openings instead");
    const unsigned workers =
        static_cast<unsigned>(std::max<std::uint64_t>(1, std::min<std::uint64_t>(options.threads, total)));
    // With fewer replications than threads, the spare threads work inside a replication.
    const unsigned inner = std::max(1u, options.threads / workers);
    std::atomic<std::uint64_t> next{0};
    std::mutex lock;
    std::uint64_t done = 0;
    std::vector<std::exception_ptr> errors(total);
    auto work = [&] {
        for (;;) {
            const std::uint64_t r = next.fetch_add(1);
            if (r >= total) return;
            try {
                const Population population = make_population(r);
                const ShiftCalendar calendar = calendar_for(scenario, population);
                const ReplicationRecord record =
                    simulate_replication(scenario.simulation, population, calendar, r, inner, options.replayed_openings);
                observe(r, population, calendar, record);
            } catch (...) {
                errors[r] = std::current_exception();
                next.store(total);  // stop handing out work
            }
            std::lock_guard<std::mutex> guard(lock);
            ++done;
            if (options.progress) options.progress(done, total);
        }
    };
    if (workers == 1) {
        work();
    } else {
        std::vector<std::thread> pool;
        for (unsigned w = 0; w < workers; ++w) pool.emplace_back(work);
        for (auto& t : pool) t.join();
    }
    for (const auto& e : errors)
        if (e) std::rethrow_exception(e);
}

}  // namespace tocsin
