#include "sim/simulate.hpp"

#include <algorithm>
#include <atomic>
#include <stdexcept>
#include <thread>

#include "sim/channels.hpp"

namespace tocsin {

ShiftCalendar calendar_for(const SimulationSetup& setup, const Population& population, std::optional<Instant> cover_from,
                           std::optional<Instant> cover_until) {
    Instant from = population.period_start, to = population.period_end;
    for (const Encounter& e : population.encounters) {
        from = std::min(from, e.admitted);
        to = std::max(to, e.discharged);
    }
    if (cover_from) from = std::min(from, *cover_from);
    if (cover_until) to = std::max(to, *cover_until);
    return ShiftCalendar(setup.shifts, setup.zone, from, to + 1);
}

ReplicationRecord simulate_replication(const SimulationSetup& setup, const Population& population,
                                       const ShiftCalendar& calendar, std::uint64_t replication, unsigned threads,
                                       const ChartOpeningLog* replayed_openings) {
    const std::size_t n_plans = setup.plans.size();
    const std::size_t n_enc = population.encounters.size();
    threads = std::max(1u, std::min<unsigned>(threads, static_cast<unsigned>(std::max<std::size_t>(1, n_enc / 1024))));
    // blocks[b][plan]: notices of encounters in block b, in encounter order.
    std::vector<std::vector<std::vector<Notice>>> blocks(threads, std::vector<std::vector<Notice>>(n_plans));
    const RuleClock clock{&setup.zone, &calendar};
    std::vector<std::vector<std::int64_t>> occasions(threads, std::vector<std::int64_t>(n_plans, 0));
    const bool any_chart = std::any_of(setup.plans.begin(), setup.plans.end(),
                                       [](const Plan& p) { return p.channel == Channel::chart_interruption; });
    if (any_chart && setup.chart_openings && !setup.chart_openings->replay_path.empty() && !replayed_openings)
        throw std::logic_error("the scenario replays chart openings but none were passed to the simulation");
    auto work = [&](unsigned b) {
        const std::size_t first = n_enc * b / threads, last = n_enc * (b + 1) / threads;
        EncounterOpenings openings;
        for (std::size_t e = first; e < last; ++e) {
            const auto scores = population.scores_of(e);
            if (scores.empty() && !any_chart) continue;
            const auto enc = static_cast<std::uint32_t>(e);
            const std::uint32_t unit = population.encounters[e].unit;
            // Openings are drawn once per encounter and shared by every chart plan.
            if (any_chart) openings_for_encounter(setup, population, replayed_openings, e, replication, openings);
            // All plans for one encounter while its scores are in cache.
            for (std::size_t p = 0; p < n_plans; ++p) {
                const Plan& plan = setup.plans[p];
                const auto pi = static_cast<std::uint32_t>(p);
                if (plan.channel == Channel::page) {
                    fire_page_rule(plan.rule, clock, scores, enc, unit, pi, plan.channel, blocks[b][p]);
                    occasions[b][p] += static_cast<std::int64_t>(scores.size());
                } else if (plan.channel == Channel::chart_interruption) {
                    occasions[b][p] += fire_chart_rule(plan, clock, scores, openings, enc, unit, pi, blocks[b][p]);
                }
                // Handoff lists and ranked reviews share their instants across
                // patients: they run below as sweeps over the current inpatients.
            }
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
        const Plan& plan = setup.plans[p];
        if (plan.channel == Channel::handoff_list || plan.channel == Channel::ranked_review) {
            record.plans[p] = run_round_channel(setup, population, calendar, plan, static_cast<std::uint32_t>(p),
                                                replication);
            continue;
        }
        std::size_t total = 0;
        for (unsigned b = 0; b < threads; ++b) {
            total += blocks[b][p].size();
            record.plans[p].occasions += occasions[b][p];
        }
        out.reserve(total);
        for (unsigned b = 0; b < threads; ++b) {
            out.insert(out.end(), blocks[b][p].begin(), blocks[b][p].end());
            std::vector<Notice>().swap(blocks[b][p]);
        }
        std::stable_sort(out.begin(), out.end(), [](const Notice& a, const Notice& b) { return a.at < b.at; });
    }
    if (setup.has_staff()) {
        // Each plan has a staff of its own: plans are alternatives, not rivals for the same nurses.
        // Plans are independent here, so they can run side by side with identical results.
        const StaffModel model = staff_model(setup, static_cast<std::uint32_t>(population.units.size()));
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
                // Only notices that ask for a bedside evaluation become tasks (an
                // interruption that is dismissed, a flag nobody follows up, do not).
                const auto& notices = record.plans[p].notices;
                std::vector<Notice> asked;
                std::vector<std::uint32_t> original;
                for (std::uint32_t i = 0; i < notices.size(); ++i)
                    if (notices[i].asks_evaluation) {
                        asked.push_back(notices[i]);
                        original.push_back(i);
                    }
                StaffRun run = simulate_staff(asked, model, setup.plans[p].staffing, calendar,
                                              calendar.shifts().back().end, ReplicationSeed{setup.seed, replication});
                for (TaskRecord& t : run.tasks) t.notice = original[t.notice];
                record.plans[p].staff = std::move(run);
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
