#pragma once
// A run cut into work items for ranks that share no memory (the MPI driver,
// cli/mpi_run.cpp). Replication 0 stays whole on the rank that writes the
// outputs: its record gives the per-plan tables, the model evaluation and the
// warnings. Every other replication is cut into items of consecutive plans;
// an item's figures are a pure function of (scenario, seed, replication,
// plans), because every random stream is keyed by what it is about and never
// by a plan's place in the list, so a plan simulated with a few of its
// neighbours gives exactly what it gives among all of them. Nothing here
// knows how the items travel.
#include <cstdint>
#include <functional>
#include <memory>
#include <optional>
#include <span>
#include <string>
#include <vector>

#include "analysis/plan_figures.hpp"
#include "analysis/results.hpp"
#include "analysis/unit_figures.hpp"
#include "analysis/workload.hpp"
#include "study/run.hpp"

namespace tocsin {

struct WorkItem {
    std::uint64_t replication = 0;
    std::size_t first_plan = 0, plan_count = 0;
};

// What one item leaves behind: exactly what run_scenario keeps of a
// replication's plans (the logs only when asked).
struct WorkResult {
    WorkItem item;
    std::vector<PlanFigures> figures;
    std::vector<UnitFigures> unit_figures;
    std::vector<GroupFigures> group_figures;
    std::vector<LoggedNotice> notice_log;
    std::vector<LoggedTask> task_log;
};

// Replications 1 .. n-1, replication-major, each cut into the same number of
// plan blocks: enough items for about eight per rank, so that a rank that
// drew cheap plans takes more items. With a notice or task log a replication
// stays whole (its log is in the replication's own order).
std::vector<WorkItem> work_items(const Scenario& scenario, const RunSettings& settings, unsigned ranks);

// One replication's population, kept while a rank works through the plan
// blocks of that replication (it is rebuilt when the replication changes).
class PopulationCache {
public:
    explicit PopulationCache(PopulationFactory make) : make_(std::move(make)) {}
    const Population& population(std::uint64_t replication);

private:
    PopulationFactory make_;
    std::optional<std::uint64_t> held_;
    std::shared_ptr<const Population> population_;
};

// Simulates the item's plans in its replication on `threads` threads.
WorkResult run_work_item(const Scenario& scenario, PopulationCache& populations, const RunSettings& settings,
                         const WorkItem& item, unsigned threads);

// Hands the items of a run out and gives every result back, in any order.
// `first` is rank 0's own share that cannot travel (replication 0 whole); it
// runs beside the items. The in-process run needs none of this
// (run_experiment); the MPI driver implements it.
class WorkDistributor {
public:
    virtual ~WorkDistributor() = default;
    virtual unsigned ranks() const = 0;
    virtual std::vector<WorkResult> distribute(std::span<const WorkItem> items, const std::function<void()>& first,
                                               const std::function<WorkResult(const WorkItem&)>& compute) = 0;
};

// run_scenario with the replications past the first handed to `distributor`;
// the output is identical to run_scenario's whatever the distributor does
// with them.
RunOutput run_scenario_distributed(const Scenario& scenario, const PopulationFactory& make_population,
                                   const RunSettings& settings, WorkDistributor& distributor);

}  // namespace tocsin
