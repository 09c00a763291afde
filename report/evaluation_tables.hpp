#pragma once
// The model evaluation (analysis/evaluation.hpp) as tables and terminal text.
// Table names and columns are stable: they are the files `tocsin evaluate`
// and a run write (evaluation_*.csv / .json).
#include <string>
#include <vector>

#include "analysis/evaluation.hpp"
#include "report/table.hpp"

namespace tocsin {

// evaluation_counts. Columns: item, count.
Table evaluation_counts_table(const EvaluationCounts& counts);

// evaluation_encounter_auc. Columns: level ("encounter"), encounters, cases,
// non_cases, auc, auc_se, auc_lower, auc_upper, confidence, interval_method.
Table encounter_auc_table(const EncounterAuc& auc);

// One row per threshold. Columns:
//   threshold_source ("grid" or "given"), threshold, true_positives,
//   false_positives, false_negatives, true_negatives,
//   sensitivity, sensitivity_lower, sensitivity_upper,
//   specificity, specificity_lower, specificity_upper,
//   ppv, ppv_lower, ppv_upper, npv, npv_lower, npv_upper,
//   share_flagged, share_flagged_lower, share_flagged_upper.
// Intervals are Wilson; a proportion with an empty denominator is an empty cell.
Table threshold_table(const std::vector<ThresholdMeasures>& rows, std::string name, std::string title);
// evaluation_thresholds: the encounter level (flagged = highest score >= threshold).
Table evaluation_thresholds_table(const std::vector<ThresholdMeasures>& rows);

// evaluation_prediction_auc. Columns: horizon_hours, predictions,
// positive_predictions, encounters, encounters_with_positive, auc, auc_lower,
// auc_upper, bootstrap_replicates, interval_method (empty interval without
// bootstrap replicates).
Table prediction_auc_table(const std::vector<PredictionAuc>& rows);

// evaluation_lead_times. Columns: threshold, cases, cases_crossed,
// share_crossed, lead_hours_p10, lead_hours_p25, lead_hours_median,
// lead_hours_p75, lead_hours_p90, cases_late, share_late, min_lead_hours,
// window_hours.
Table lead_time_table(const std::vector<LeadTimes>& rows);

// evaluation_calibration (no row without a probability mapping). Columns:
// outcome, horizon_hours (empty = before discharge), predictions, observed,
// expected, oe_ratio, oe_lower, oe_upper, oe_bootstrap_lower,
// oe_bootstrap_upper, calibration_intercept(_se), calibration_slope(_se),
// calibration_in_the_large(_se), probabilities_clamped, converged.
Table calibration_table(const std::optional<CalibrationSummary>& calibration);

// evaluation_calibration_bins (prediction level). Columns: group, predictions,
// outcomes, predicted_low, predicted_high, mean_predicted, observed,
// observed_lower, observed_upper (Wilson).
Table calibration_bins_table(const std::vector<CalibrationBin>& bins);
Table calibration_bins_table(const std::vector<CalibrationBin>& bins, std::string name, std::string title);

// evaluation_calibration_stay (stay level; no row without a probability
// mapping). Columns: level ("stay"), outcome ("during the stay"), stays,
// observed, expected, oe_ratio, oe_lower, oe_upper (delta method),
// calibration_in_the_large(_se), calibration_slope(_se),
// calibration_intercept(_se) (the two-parameter fit's), probabilities_clamped,
// converged.
Table stay_calibration_table(const std::optional<StayCalibration>& calibration);
// evaluation_calibration_stay_bins: the bins' columns, one row per group of stays.
Table stay_calibration_bins_table(const std::optional<StayCalibration>& calibration);

// evaluation_calibration_smoothed. Columns: predicted, observed, effective_n,
// bandwidth_logit, method.
Table calibration_smoothed_table(const SmoothedCurve& curve);

// evaluation_drift. Columns: period, period_start, outcome, horizon_hours,
// predictions, positive_predictions, auc, observed, expected, oe_ratio,
// oe_lower, oe_upper (these five empty without a probability mapping),
// horizon_source (drift_horizon_mapping or drift_horizon_first: with a
// mapping, AUC and O/E use the mapping's horizon; without, the first).
Table drift_table(const std::vector<DriftPeriod>& periods);

// Columns: threshold_source ("grid", "given" or "evaluations_per_case"),
// threshold_probability, evaluations_per_case (1 / pt), true_positives,
// false_positives, total, net_benefit_model, net_benefit_treat_all,
// net_benefit_treat_none. `source[i]` labels row i ("grid" when missing).
Table decision_curve_table(const std::vector<DecisionCurvePoint>& curve, std::int64_t total,
                           const std::vector<std::string>& source, std::string name, std::string title);
// evaluation_decision_curve (no row without a probability mapping).
Table evaluation_decision_curve_table(const std::optional<DecisionCurveResult>& curve);

// Every table above, in a fixed order, for writers.
std::vector<Table> evaluation_tables(const Evaluation& evaluation);

// A few lines for a terminal: AUCs with intervals, calibration, lead time.
std::string evaluation_summary(const Evaluation& evaluation);

// Cells shared with the report's shorter tables.
Cell horizon_cell(double horizon_hours);  // empty for 0, "before discharge"
std::string prediction_auc_interval_method(const PredictionAuc& auc);
inline constexpr const char* encounter_auc_interval_method = "DeLong 1988";

}  // namespace tocsin
