#pragma once
// Two scores of the same stays side by side (analysis/score_comparison.hpp)
// as tables and terminal text. Table names and columns are stable.
#include <string>
#include <vector>

#include "analysis/evaluation.hpp"
#include "analysis/score_comparison.hpp"
#include "report/table.hpp"

namespace tocsin {

// score_comparison_auc, one row per other score. Columns: first_score,
// other_score, stays_compared, cases, non_cases, stays_first_only,
// stays_other_only, stays_neither, auc_first, auc_other, difference
// (first - other), difference_se, difference_lower, difference_upper, z,
// p_value, confidence, test ("DeLong 1988, paired"). Without both classes
// the figures are empty.
Table score_comparison_auc_table(const ScoreComparison& comparison);

// score_comparison_thresholds, one row per plan, other score and N.
// Columns: plan, plan_score, plan_threshold, other_score, matched_threshold
// (empty when the plan flags no stay), stays_compared, cases,
// cases_flagged_by_both, cases_flagged_by_plan_score_only,
// cases_flagged_by_other_score_only, cases_flagged_by_neither, and the same
// four for non_cases, evaluations_per_case, threshold_probability,
// net_benefit_plan_score, net_benefit_other_score, difference,
// difference_lower, difference_upper, resamples.
Table score_comparison_thresholds_table(const ScoreComparison& comparison);

// matched_plans, one row per plan on another score. Columns: plan,
// plan_score, versus, versus_score, burden_metric, burden_difference,
// burden_difference_lower, burden_difference_upper, benefit_metric,
// benefit_difference, benefit_difference_lower, benefit_difference_upper,
// replications (differences are plan minus versus, paired by replication).
Table matched_plans_table(const std::vector<MatchedPlans>& matched);
std::string matched_plans_text(const std::vector<MatchedPlans>& matched);

// The evaluation tables of other score `k` (1-based: population.other_scores
// order): evaluation_tables' own, named "other_score_<k>_..." and titled with
// the score's name.
std::vector<Table> other_score_evaluation_tables(const Evaluation& evaluation, std::size_t k, const std::string& name);

// The report's "Two scores on the same stays" section: both encounter-level
// ROC curves (from each score's threshold grid), the paired test and the
// threshold comparison, with what they rest on.
struct ReportInput;
void add_score_comparison(ReportInput& report, const ScoreComparison& comparison, const Evaluation& first,
                          const std::vector<Evaluation>& others, const std::string& basis,
                          const std::vector<MatchedPlans>& matched, const std::string& matched_basis);

// Terminal lines: the paired AUC test, then at each plan's threshold the
// stays each score alone flags, and the net-benefit difference at N = 10.
std::string score_comparison_text(const ScoreComparison& comparison);

// Each other score's evaluation summary, named, for the terminal.
std::string other_score_summaries(const std::vector<Evaluation>& others, const ScoreComparison& comparison);

}  // namespace tocsin
