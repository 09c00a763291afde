#include "study/experiment.hpp"

#include <algorithm>
#include <exception>
#include <mutex>
#include <optional>
#include <stdexcept>

#include "models/parallel.hpp"

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
    std::mutex lock;
    std::uint64_t done = 0;
    // A failed replication counts as done too; parallel_for rethrows the error
    // of the lowest-numbered failing replication once every thread has stopped.
    parallel_for(total, workers, [&](std::uint64_t r) {
        std::exception_ptr error;
        try {
            std::optional<PhaseLog::Span> preparing(std::in_place, options.phases, "prepare");
            const std::shared_ptr<const Population> shared = make_population(r);
            const Population& population = *shared;
            const ShiftCalendar calendar = calendar_for(scenario, population);
            preparing.reset();
            const ReplicationRecord record = simulate_replication(scenario.simulation, population, calendar, r, inner,
                                                                  options.replayed_openings, options.phases);
            observe(r, population, calendar, record);
        } catch (...) {
            error = std::current_exception();
        }
        {
            const std::lock_guard<std::mutex> guard(lock);
            ++done;
            if (options.progress) options.progress(done, total);
        }
        if (error) std::rethrow_exception(error);
    });
}

}  // namespace tocsin
