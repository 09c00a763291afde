#pragma once
// "Is the score any good here?" Model-evaluation measures computed on exactly
// the population a simulation uses: only usable scores (Population already
// holds no score at or after time zero or outside the stay), the same
// encounters, the same exclusions (reported in the counts table).
//
// Levels:
//  - encounter: one row per encounter with at least one usable score; its
//    score is the highest available before time zero (cases) or before
//    discharge (non-cases); positive = the encounter has an outcome.
//  - prediction: every usable score is a prediction; for a horizon of H hours
//    it is positive when time zero falls in (available_at, available_at + H h].
//    A non-case's predictions are all negative, including those whose H hours
//    run past discharge (the outcome did not happen on this unit).
//
// Every result is a Table with the column names documented at each function.
#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "analysis/table.hpp"
#include "models/population.hpp"
#include "models/time.hpp"

namespace tocsin {

// How a score becomes a probability, and what that probability predicts.
struct ProbabilityMapping {
    enum class Kind {
        as_is,     // the score is already a probability
        divide,    // p = score / divisor (e.g. points out of 100)
        logistic,  // p = 1 / (1 + exp(-(intercept + slope * score)))
    };
    Kind kind = Kind::as_is;
    double divisor = 1.0;
    double intercept = 0.0;
    double slope = 1.0;
    // The probability is that of time zero within this many hours after the
    // score is available; 0 means "before the end of the stay".
    double horizon_hours = 0.0;

    double probability(double score) const;
};

struct EvaluationOptions {
    std::vector<double> thresholds;       // score units; rows marked "given"
    int threshold_grid_points = 21;       // evenly spaced, lowest to highest encounter score
    std::vector<double> horizons_hours{4.0, 8.0, 12.0, 24.0};
    double window_hours = 48.0;           // lead time: crossings earlier than this before time zero do not count
    double min_lead_hours = 1.0;          // lead time: a first crossing later than this counts as "late"
    std::optional<ProbabilityMapping> probability;  // calibration and decision curve need it
    std::vector<double> decision_threshold_probabilities;  // empty: 0.01, 0.02, ..., 0.50
    std::vector<double> evaluations_per_case;  // N, added to the decision curve as pt = 1 / N
    int drift_period_days = 0;            // 0: calendar months in `zone`
    TimeZone zone = TimeZone::utc();      // month boundaries and period labels
    int bootstrap_replicates = 200;       // encounter bootstrap for prediction-level AUC and O/E
    std::uint64_t seed = 1;
    std::uint64_t replication = 0;
    double confidence = 0.95;
    int calibration_groups = 10;
    int smoothed_points = 50;
};

// The tables. Columns of those built by the parts below are documented there;
// the others:
//  calibration (one row; prediction level, label = the mapping's horizon):
//    outcome, horizon_hours (empty = before discharge), predictions, observed,
//    expected, oe_ratio, oe_lower, oe_upper (delta method, predictions taken
//    as independent), oe_bootstrap_lower, oe_bootstrap_upper (encounter
//    bootstrap, percentile), calibration_intercept(_se), calibration_slope(_se),
//    calibration_in_the_large(_se), probabilities_clamped, converged.
//  calibration_bins: group, predictions, outcomes, predicted_low,
//    predicted_high, mean_predicted, observed, observed_lower, observed_upper (Wilson).
//  calibration_smoothed: predicted, observed, effective_n, bandwidth_logit, method.
//  drift (one row per period, prediction level; label = the mapping's horizon,
//    else the first horizon): period, period_start, outcome, horizon_hours,
//    predictions, positive_predictions, auc, observed, expected, oe_ratio,
//    oe_lower, oe_upper (the last five empty without a probability mapping).
//    Periods with no prediction are listed with zero counts.
//  decision_curve (encounter level: an encounter is evaluated when its highest
//    probability before time zero reaches pt): see decision_curve_table in
//    analysis/net_benefit.hpp.
struct Evaluation {
    Table counts;                // evaluation_counts
    Table encounter_auc;         // evaluation_encounter_auc
    Table thresholds;            // evaluation_thresholds (see threshold_table in analysis/roc.hpp)
    Table prediction_auc;        // evaluation_prediction_auc
    Table lead_times;            // evaluation_lead_times
    Table calibration;           // evaluation_calibration (no rows without a probability mapping)
    Table calibration_bins;      // evaluation_calibration_bins
    Table calibration_smoothed;  // evaluation_calibration_smoothed
    Table drift;                 // evaluation_drift
    Table decision_curve;        // evaluation_decision_curve (no rows without a probability mapping)
};

// All of the measures. Throws std::invalid_argument for unusable options.
Evaluation evaluate(const Population& population, const EvaluationOptions& options);

// The tables in a fixed order, for writers.
std::vector<const Table*> evaluation_tables(const Evaluation& evaluation);

// A few lines for a terminal: AUCs with intervals, calibration, lead time.
std::string evaluation_summary(const Evaluation& evaluation);

// ---- The parts, usable on their own ----------------------------------------

// Encounter level: index of the encounter, its highest usable score, and
// whether it is a case. Encounters without a usable score are left out.
struct EncounterScore {
    std::uint32_t encounter = 0;
    double highest_score = 0.0;
    bool is_case = false;
};
std::vector<EncounterScore> encounter_level_scores(const Population& population);

// Counts behind every measure: encounters, cases, encounters without a usable
// score, predictions, and excluded scores and encounters by reason.
// Columns: item, count.
Table evaluation_counts(const Population& population);

// Columns: level ("encounter"), encounters, cases, non_cases, auc, auc_se,
// auc_lower, auc_upper, confidence, interval_method.
Table encounter_auc_table(const std::vector<EncounterScore>& scores, double confidence);

// Thresholds used by the threshold and lead-time tables: the grid (when
// grid_points > 0) followed by the given ones; source[i] says which.
struct ThresholdList {
    std::vector<double> values;
    std::vector<std::string> source;
};
ThresholdList evaluation_thresholds(const std::vector<EncounterScore>& scores, const EvaluationOptions& options);

// Prediction level. Columns: horizon_hours, predictions, positive_predictions,
// encounters, encounters_with_positive, auc, auc_lower, auc_upper,
// bootstrap_replicates, interval_method. The interval is the percentile
// interval of an encounter bootstrap (whole encounters resampled with
// replacement, so an encounter's many predictions move together); empty when
// bootstrap_replicates == 0.
Table prediction_auc_table(const Population& population, const EvaluationOptions& options);

// Lead time of the first crossing per case, summarised per threshold: the
// first usable score >= threshold no earlier than window_hours before time
// zero. Columns: threshold, cases, cases_crossed, share_crossed,
// lead_hours_p10, lead_hours_p25, lead_hours_median, lead_hours_p75,
// lead_hours_p90, cases_late, share_late, min_lead_hours, window_hours.
// share_* are shares of all cases with a usable score; "late" = crossed, but
// less than min_lead_hours before time zero.
Table lead_time_table(const Population& population, const std::vector<double>& thresholds,
                      double window_hours, double min_lead_hours);
// The lead times (hours) of the cases that crossed, in encounter order.
std::vector<double> first_crossing_lead_hours(const Population& population, double threshold, double window_hours);

}  // namespace tocsin
