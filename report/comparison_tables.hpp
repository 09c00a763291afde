#pragma once
// Comparison across replications as tables and terminal text: the figures of
// analysis/comparison.hpp with their intervals, paired differences, the
// trade-off frontier and the budget answer; and each plan's net benefit.
#include <cstddef>
#include <string>
#include <vector>

#include "analysis/comparison.hpp"
#include "analysis/plan_net_benefit.hpp"
#include "report/table.hpp"

namespace tocsin {

struct ComparisonTables {
    Table comparison;    // plan, metric, mean, ci_low, ci_high, replications
    Table differences;   // plan, versus, metric, mean_difference, ci_low, ci_high, replications
    Table replication_figures;  // plan, replication, metric, value
};
// Differences are each plan minus `reference_plan` (default the first).
ComparisonTables comparison_tables(const ReplicatedFigures& f, std::size_t reference_plan = 0);
// The report's view: one row per plan, each metric as three columns (its
// value, NAME_lo and NAME_hi), in the order given.
Table comparison_by_plan(const ReplicatedFigures& f, const std::vector<std::size_t>& metrics);
// The same for paired differences from `reference_plan`, whose row is left out.
Table differences_by_plan(const ReplicatedFigures& f, const std::vector<std::size_t>& metrics,
                          std::size_t reference_plan = 0);
// Which plans are ranked together on the burden, and why (comparison_groups);
// empty when every plan is on one channel.
std::string comparison_basis_text(const ReplicatedFigures& f, std::size_t burden_metric);
// One row per plan; `compared_within` names its comparison group.
Table frontier_table(const ReplicatedFigures& f, std::size_t burden_metric, std::size_t benefit_metric);
// "channel_units": each plan's burden in its channel's own unit (named from
// replication 0's channel_burden) and the channel-neutral burdens, mean and
// interval over replications.
Table channel_units_table(const ReplicatedFigures& f, const std::vector<ChannelBurdenSummary>& first_replication);
Table plan_net_benefit_table(const std::vector<PlanNetBenefit>& rows);

// "1.3 (1.1 to 1.5)" with the given decimals; just the mean when there is no interval.
std::string with_interval(const MeanInterval& m, int decimals);
// "1.3 ±0.2": the mean and the half-width of its (symmetric) interval, for
// tables a terminal must hold.
std::string with_margin(const MeanInterval& m, int decimals);
// A compact terminal view: the main figures with intervals, and paired
// differences from the reference plan.
std::string comparison_text(const ReplicatedFigures& f, std::size_t reference_plan = 0);
// The terminal view of channel_units_table: "mean (low to high)".
std::string channel_units_text(const ReplicatedFigures& f, const std::vector<ChannelBurdenSummary>& first_replication);
// The plans on the frontier, lightest first.
std::string frontier_text(const ReplicatedFigures& f, std::size_t burden_metric, std::size_t benefit_metric);
// One block per answer (per channel when the budget is answered within each channel).
std::string budget_text(const ReplicatedFigures& f, const std::vector<BudgetAnswer>& answers, std::size_t burden_metric,
                        double limit, std::size_t benefit_metric);

}  // namespace tocsin
