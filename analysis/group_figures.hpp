#pragma once
// Who is reached: a plan's benefit and burden, and the score's own measures,
// for each patient group the scenario declares (age band, language spoken,
// admission route...). A threshold that looks fine overall may reach far
// fewer of one group's deteriorating patients, or page far more often for
// another.
//
// Counts are those of analysis/plan_figures.hpp restricted to a group's
// encounters (whole run, as PlanFigures::notices and ::cases): the notices,
// cases and catches of one column's groups sum to the plan's own. Burden is
// per 100 patient-days (days of stay), so groups of different size compare.
//
// Small groups: a group with fewer encounters than
// AnalysisSettings::smallest_group is marked `suppressed`; reports print none
// of its figures (a disclosure rule). Too few cases: a sensitivity needs at
// least min_cases_for_figure cases, an AUC that many cases and as many
// non-cases (a floor of common practice, no source); below it the figure is
// left empty rather than printed as a meaningless number.
#include <cstdint>
#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "analysis/evaluation.hpp"
#include "analysis/roc.hpp"
#include "analysis/settings.hpp"
#include "models/population.hpp"
#include "sim/setup.hpp"
#include "sim/simulate.hpp"

namespace tocsin {

inline constexpr std::int64_t min_cases_for_figure = 5;

// One plan's figures for the patients of one group.
struct GroupFigures {
    std::string plan, group, value;  // value: the group's level, e.g. "80+" or "not recorded"
    std::int64_t encounters = 0;
    double patient_days = 0;
    bool suppressed = false;
    std::int64_t notices = 0;
    std::optional<double> notices_per_100_patient_days;
    // Share of the group's notices sent before time zero to patients who went on to the outcome.
    std::optional<double> notice_ppv;
    std::int64_t cases = 0, caught = 0;
    std::optional<double> sensitivity;  // empty with fewer than min_cases_for_figure cases
    Interval sensitivity_interval;      // Wilson, 95%
    std::optional<double> lead_median_hours;
};

// One row per plan, group column and level: plan-major in the setup's order,
// then columns and levels in declared order ("not recorded" last).
std::vector<GroupFigures> group_figures(const SimulationSetup& setup, const AnalysisSettings& settings,
                                        const Population& population, const ReplicationRecord& record);

// The score's measures for the patients of one group, at encounter level
// (analysis/evaluation.hpp: each stay's highest usable score before time zero).
struct GroupScoreFigures {
    std::string group, value;
    std::int64_t encounters = 0, cases = 0;  // encounters with a usable score, and cases among them
    bool suppressed = false;
    std::optional<EncounterAuc> auc;  // DeLong interval; empty with too few cases or non-cases
    // With a probability mapping: observed over expected and calibration-in-the-large, stay level.
    std::optional<ObservedExpected> observed_expected;
    std::optional<double> calibration_in_the_large, calibration_in_the_large_se;
    struct AtThreshold {
        std::string plan;
        double threshold = 0;
        std::optional<Proportion> sensitivity, specificity;  // Wilson intervals
    };
    std::vector<AtThreshold> at_plan_thresholds;
};

// A plan's name and the threshold its rule fires at.
using PlanThreshold = std::pair<std::string, double>;
std::vector<PlanThreshold> plan_thresholds(const SimulationSetup& setup);

std::vector<GroupScoreFigures> group_score_figures(const Population& population,
                                                   std::span<const PlanThreshold> thresholds,
                                                   const std::optional<ProbabilityMapping>& mapping,
                                                   std::int64_t smallest_group, double confidence = 0.95);

// A gap a committee must not miss: within one column, a group whose interval
// (the share of a plan's cases caught, Wilson; or the score's AUC, DeLong)
// lies wholly below another group's. Suppressed groups and empty figures
// take no part.
struct GroupGap {
    std::string plan;  // empty: the score's AUC
    std::string group, below, above;  // the column, and the two groups' values
    double below_value = 0, above_value = 0;
    Interval below_interval, above_interval;
};
std::vector<GroupGap> group_gaps(std::span<const GroupFigures> figures, std::span<const GroupScoreFigures> scores);

// A per-group figure reported across replications.
struct GroupMetric {
    std::string_view name;   // stable column value
    std::string_view label;  // for people
    double (*value)(const GroupFigures&);  // NaN when undefined or suppressed
};
const std::vector<GroupMetric>& group_metrics();
std::size_t group_metric_index(std::string_view name);  // throws std::out_of_range when unknown

// values[plan][row][metric][replication], rows = (group, value) in the order of
// replication 0; a group suppressed in a replication leaves NaN there.
struct ReplicatedGroupFigures {
    std::vector<std::string> plans;
    std::vector<std::pair<std::string, std::string>> rows;  // (group, value)
    std::vector<std::vector<std::vector<std::vector<double>>>> values;
    std::uint64_t replications = 0;

    std::span<const double> of(std::size_t plan, std::size_t row, std::size_t metric) const {
        return values[plan][row][metric];
    }
};
ReplicatedGroupFigures collect_group_figures(const std::vector<std::string>& plan_names,
                                             const std::vector<std::vector<GroupFigures>>& by_replication);

}  // namespace tocsin
