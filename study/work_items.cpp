#include "study/work_items.hpp"

#include <algorithm>
#include <stdexcept>

namespace tocsin {

std::vector<WorkItem> work_items(const Scenario& sc, const RunSettings& settings, unsigned ranks) {
    std::vector<WorkItem> items;
    if (sc.replications < 2) return items;
    const std::uint64_t replications = sc.replications - 1;
    const std::size_t plans = sc.simulation.plans.size();
    const std::uint64_t wanted = 8 * std::uint64_t{std::max(1u, ranks)};
    std::size_t blocks = static_cast<std::size_t>(std::min<std::uint64_t>(plans, (wanted + replications - 1) / replications));
    if (settings.notice_log || settings.task_log) blocks = 1;
    blocks = std::max<std::size_t>(1, blocks);
    for (std::uint64_t r = 1; r <= replications; ++r)
        for (std::size_t b = 0; b < blocks; ++b) {
            // Block b holds plans [b * plans / blocks, (b + 1) * plans / blocks).
            const std::size_t first = b * plans / blocks, last = (b + 1) * plans / blocks;
            if (last > first) items.push_back({r, first, last - first});
        }
    return items;
}

const Population& PopulationCache::population(std::uint64_t replication) {
    if (held_ != replication) {
        population_.reset();  // the old one goes first: a replayed year is large
        held_.reset();
        population_ = make_(replication);
        held_ = replication;
    }
    return *population_;
}

WorkResult run_work_item(const Scenario& sc, PopulationCache& populations, const RunSettings& settings,
                         const WorkItem& item, unsigned threads) {
    const auto& plans = sc.simulation.plans;
    if (item.replication == 0 || item.replication >= sc.replications || item.first_plan + item.plan_count > plans.size())
        throw std::logic_error("work item outside the run");
    Scenario part = sc;
    part.simulation.plans.assign(plans.begin() + static_cast<std::ptrdiff_t>(item.first_plan),
                                 plans.begin() + static_cast<std::ptrdiff_t>(item.first_plan + item.plan_count));
    const Population& pop = populations.population(item.replication);
    const ShiftCalendar cal = calendar_for(part, pop);
    const ReplicationRecord rec =
        simulate_replication(part.simulation, pop, cal, item.replication, threads, settings.replayed_openings);
    PlansFigures figures = replication_figures(part, pop, cal, rec);
    WorkResult out{item, std::move(figures.figures), std::move(figures.unit_figures), std::move(figures.group_figures),
                   {}, {}};
    if (settings.notice_log || settings.task_log) {
        ReplicationResults results = replication_results(part.simulation, part.analysis, pop, cal, rec, settings.notice_log,
                                                         settings.task_log, settings.replayed_openings);
        if (results.notice_log) out.notice_log = std::move(*results.notice_log);
        if (results.staff && results.staff->task_log) out.task_log = std::move(*results.staff->task_log);
    }
    return out;
}

namespace {

// Appends `part` to `whole`, moving its entries.
template <typename Entry>
void append(std::vector<Entry>& whole, std::vector<Entry>& part) {
    whole.insert(whole.end(), std::make_move_iterator(part.begin()), std::make_move_iterator(part.end()));
}

}  // namespace

RunOutput run_scenario_distributed(const Scenario& sc, const PopulationFactory& make_population,
                                   const RunSettings& settings, WorkDistributor& distributor) {
    check_run_metrics(settings);  // before anything runs
    RunOutput out;
    ReplicationsKept kept(sc.replications);
    ExperimentOptions first = experiment_options(sc, settings);
    first.replications = 1;
    first.progress = nullptr;
    const auto first_replication = [&] {
        run_experiment(sc, make_population, first,
                       [&](std::uint64_t r, const Population& pop, const ShiftCalendar& cal, const ReplicationRecord& rec) {
                           keep_replication(sc, settings, r, pop, cal, rec, kept, out);
                       });
    };
    PopulationCache populations(make_population);
    const std::vector<WorkItem> items = work_items(sc, settings, distributor.ranks());
    std::vector<WorkResult> results = distributor.distribute(
        items, first_replication, [&](const WorkItem& item) { return run_work_item(sc, populations, settings, item, settings.threads); });
    // Items come back in any order; plan blocks join in plan order.
    std::sort(results.begin(), results.end(), [](const WorkResult& a, const WorkResult& b) {
        return std::pair(a.item.replication, a.item.first_plan) < std::pair(b.item.replication, b.item.first_plan);
    });
    if (results.size() != items.size()) throw std::logic_error("a work item came back twice or not at all");
    for (WorkResult& r : results) {
        const std::uint64_t at = r.item.replication;
        if (r.item.first_plan != kept.figures[at].size()) throw std::logic_error("work items do not tile the plans");
        append(kept.figures[at], r.figures);
        append(kept.unit_figures[at], r.unit_figures);
        append(kept.group_figures[at], r.group_figures);
        append(kept.notice_logs[at], r.notice_log);
        append(kept.task_logs[at], r.task_log);
    }
    finish_run(sc, settings, kept, out);
    return out;
}

}  // namespace tocsin
