#include "sim/simulate.hpp"

#include <algorithm>
#include <atomic>
#include <thread>

namespace tocsin {

ShiftCalendar calendar_for(const Scenario& scenario, const Population& population) {
    Instant from = population.period_start, to = population.period_end;
    for (const Encounter& e : population.encounters) {
        from = std::min(from, e.admitted);
        to = std::max(to, e.discharged);
    }
    if (scenario.period_start) from = std::min(from, *scenario.period_start);
    if (scenario.period_end) to = std::max(to, *scenario.period_end);
    return ShiftCalendar(scenario.shifts, scenario.zone, from, to + 1);
}

ReplicationRecord simulate_replication(const Scenario& scenario, const Population& population,
                                       const ShiftCalendar& calendar, std::uint64_t replication, unsigned threads) {
    const std::size_t n_plans = scenario.plans.size();
    const std::size_t n_enc = population.encounters.size();
    threads = std::max(1u, std::min<unsigned>(threads, static_cast<unsigned>(std::max<std::size_t>(1, n_enc / 1024))));
    // blocks[b][plan]: notices of encounters in block b, in encounter order.
    std::vector<std::vector<std::vector<Notice>>> blocks(threads, std::vector<std::vector<Notice>>(n_plans));
    const RuleClock clock{&scenario.zone, &calendar};
    auto work = [&](unsigned b) {
        const std::size_t first = n_enc * b / threads, last = n_enc * (b + 1) / threads;
        for (std::size_t e = first; e < last; ++e) {
            const auto scores = population.scores_of(e);
            if (scores.empty()) continue;
            const auto enc = static_cast<std::uint32_t>(e);
            const std::uint32_t unit = population.encounters[e].unit;
            // All plans for one encounter while its scores are in cache.
            for (std::size_t p = 0; p < n_plans; ++p)
                fire_page_rule(scenario.plans[p].rule, clock, scores, enc, unit, static_cast<std::uint32_t>(p),
                               scenario.plans[p].channel, blocks[b][p]);
        }
    };
    if (threads == 1) {
        work(0);
    } else {
        std::vector<std::thread> pool;
        for (unsigned b = 0; b < threads; ++b) pool.emplace_back(work, b);
        for (auto& t : pool) t.join();
    }
    ReplicationRecord record;
    record.replication = replication;
    record.plans.resize(n_plans);
    for (std::size_t p = 0; p < n_plans; ++p) {
        auto& out = record.plans[p].notices;
        std::size_t total = 0;
        for (unsigned b = 0; b < threads; ++b) total += blocks[b][p].size();
        out.reserve(total);
        for (unsigned b = 0; b < threads; ++b) {
            out.insert(out.end(), blocks[b][p].begin(), blocks[b][p].end());
            std::vector<Notice>().swap(blocks[b][p]);
        }
        std::stable_sort(out.begin(), out.end(), [](const Notice& a, const Notice& b) { return a.at < b.at; });
    }
    if (scenario.has_staff()) {
        // Each plan has a staff of its own: plans are alternatives, not rivals for the same nurses.
        // Plans are independent here, so they can run side by side with identical results.
        const StaffModel model = staff_model(scenario, static_cast<std::uint32_t>(population.units.size()));
        // Busiest plans first, each taken by the next free worker.
        std::vector<std::size_t> order(n_plans);
        for (std::size_t p = 0; p < n_plans; ++p) order[p] = p;
        std::stable_sort(order.begin(), order.end(), [&](std::size_t a, std::size_t b) {
            return record.plans[a].notices.size() > record.plans[b].notices.size();
        });
        std::atomic<std::size_t> next{0};
        auto staff_plans = [&] {
            for (std::size_t k = next++; k < n_plans; k = next++) {
                const std::size_t p = order[k];
                RandomEngine minutes = make_stream(scenario.seed, replication, StreamPurpose::task_minutes, p);
                record.plans[p].staff = simulate_staff(record.plans[p].notices, model, scenario.plans[p].staffing,
                                                       calendar, calendar.shifts().back().end, minutes);
            }
        };
        const std::size_t workers = std::min<std::size_t>(std::max(1u, threads), n_plans);
        std::vector<std::thread> pool;
        for (std::size_t w = 1; w < workers; ++w) pool.emplace_back(staff_plans);
        staff_plans();
        for (auto& t : pool) t.join();
    }
    return record;
}

}  // namespace tocsin
