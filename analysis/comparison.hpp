#pragma once
// Comparing plans across replications: every figure with an interval, paired
// differences between plans (the same population in each replication, so the
// differences are much less noisy than the figures), the trade-off frontier,
// and the budget question.
//
// Interval method: for a figure with values x_1..x_R over R replications, the
// 95% confidence interval of its expected value is mean +- t(0.975, R-1) * s /
// sqrt(R) (Student 1908), s the sample standard deviation. Paired differences
// use the same formula on the per-replication differences. With R < 2 there is
// no interval. Replications in which a figure is undefined (e.g. a median lead
// time with no catch) are left out of that figure and the count says so.
#include <cstdint>
#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "analysis/results.hpp"

namespace tocsin {

enum class Better { lower, higher, neither };

// Whether a figure means the same thing whatever the plan's channel. A notice
// is a page, a chart interruption, a handoff flag or a review, so counts of
// notices (per unit per night, per shift, per catch, patients noticed per
// night, the channel's own burden) are in a unit that differs by channel
// (a review at 08:00 shows 0 per night); staff minutes, evaluations, catches
// and lead times are not.
enum class ChannelUnit { neutral, own };

struct Metric {
    std::string_view name;   // stable column value, e.g. "per_unit_night_mean"
    std::string_view label;  // for people, e.g. "notices per unit per night"
    Better better;
    double (*value)(const PlanFigures&);  // NaN when undefined
    ChannelUnit unit = ChannelUnit::neutral;
    // Reported only when the scenario declares what it rests on (an averted
    // effect): shown_metric says whether a run has it.
    bool declared_only = false;
};

// Every per-plan metric reported across replications, in table order.
const std::vector<Metric>& plan_metrics();
const Metric* find_metric(std::string_view name);  // nullptr when unknown
std::size_t metric_index(const Metric& metric);
std::string metric_names();                        // "a, b, c" for messages

struct MeanInterval {
    double mean = 0, low = 0, high = 0;  // low/high NaN when n < 2
    std::size_t n = 0;                   // replications where the figure is defined
};
MeanInterval mean_interval(std::span<const double> values, double level = 0.95);

// values[plan][metric][replication]
struct ReplicatedFigures {
    std::vector<std::string> plans;
    std::vector<Channel> channels;  // per plan; empty: all on one channel
    std::vector<std::vector<std::vector<double>>> values;
    std::uint64_t replications = 0;
    // Replication 0 is the log itself, as replayed (a replayed log without a
    // stress test): its figures are then the log's own, shown "as logged"
    // beside the means.
    bool first_is_log = false;

    std::span<const double> of(std::size_t plan, std::size_t metric) const { return values[plan][metric]; }
};

ReplicatedFigures collect_figures(const std::vector<std::string>& plan_names,
                                  const std::vector<std::vector<PlanFigures>>& by_replication,
                                  const std::vector<Channel>& channels = {});

// Which plans may be ranked against each other on a burden. Plans of
// different channels are never ranked on a burden whose unit differs by
// channel: then each channel is compared on its own (one group per channel,
// in the order the channels first appear). Otherwise (a channel-neutral
// burden, or one channel) all plans form one group.
struct ComparisonGroup {
    std::optional<Channel> channel;  // set when comparing within a channel
    std::vector<std::size_t> plans;  // plan indices, in plan order
};
std::vector<ComparisonGroup> comparison_groups(const ReplicatedFigures& f, std::size_t burden_metric);

struct FrontierPoint {
    std::size_t plan;
    double burden, benefit;
    bool on_frontier;
    std::size_t group = 0;  // index into comparison_groups(f, burden_metric)
};
// A plan is on the frontier when no other plan of its comparison group has
// burden <= and benefit >= with at least one strictly better (means over
// replications): one frontier per channel when the burden's unit differs by channel.
std::vector<FrontierPoint> frontier(const ReplicatedFigures& f, std::size_t burden_metric, std::size_t benefit_metric);

struct BudgetAnswer {
    std::optional<Channel> channel;       // set when the budget is answered within one channel
    std::vector<std::size_t> plans;       // the plans considered (empty: every plan)
    std::optional<std::size_t> best;      // plan index
    std::vector<std::size_t> within;      // plans whose mean burden is within the limit
    std::vector<double> share_within;     // per plan: share of replications within the limit
    double share_best = 0;                // share of replications in which `best` had the most benefit among `within`
};
// Among `plans` (empty: every plan).
BudgetAnswer best_within_budget(const ReplicatedFigures& f, std::size_t burden_metric, double limit,
                                std::size_t benefit_metric, const std::vector<std::size_t>& plans = {});
// One answer per comparison group (comparison_groups).
std::vector<BudgetAnswer> budget_by_group(const ReplicatedFigures& f, std::size_t burden_metric, double limit,
                                          std::size_t benefit_metric);

// Whether `metric` is reported for `f`: always, unless it rests on a declared
// effect that the run's plans have no figure for (none declared).
bool shown_metric(const ReplicatedFigures& f, std::size_t metric);

// A paired difference: each replication's figure of `plan` minus that of `versus`.
MeanInterval paired_difference(const ReplicatedFigures& f, std::size_t plan, std::size_t versus, std::size_t metric);

}  // namespace tocsin
