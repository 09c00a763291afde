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
// Results are typed; report/evaluation_tables.hpp turns them into tables.
#include <cstdint>
#include <map>
#include <optional>
#include <string>
#include <vector>

#include "analysis/calibration.hpp"
#include "analysis/net_benefit.hpp"
#include "analysis/roc.hpp"
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
    unsigned threads = 1;                 // for the bootstrap; the figures do not depend on it
    int calibration_groups = 10;
    int smoothed_points = 50;
};

// Counts behind every measure, with the population's exclusions by reason.
struct EvaluationCounts {
    std::int64_t encounters = 0;
    std::int64_t encounters_with_score = 0;  // the others are left out of every measure
    std::int64_t cases = 0, cases_with_score = 0;
    std::int64_t predictions = 0;  // usable scores
    std::map<std::string, std::int64_t> scores_excluded, encounters_excluded, notes;
};

// Encounter level. The interval is DeLong's (1988).
struct EncounterAuc {
    std::int64_t encounters = 0, cases = 0, non_cases = 0;
    double auc = 0.0, standard_error = 0.0;  // NaN when either class is empty
    Interval interval;
    double confidence = 0.95;
};

// Prediction level, one per horizon. The interval is the percentile interval
// of an encounter bootstrap (whole encounters resampled with replacement, so
// an encounter's many predictions move together); NaN without replicates.
struct PredictionAuc {
    double horizon_hours = 0.0;
    std::int64_t predictions = 0, positive_predictions = 0;
    std::int64_t encounters = 0, encounters_with_positive = 0;
    double auc = 0.0;
    Interval interval;
    int bootstrap_replicates = 0;
};

// Lead time of the first crossing per case at one threshold: the first usable
// score >= threshold no earlier than window_hours before time zero. Shares are
// of all cases with a usable score (none when there is no such case); "late"
// = crossed, but less than min_lead_hours before time zero.
struct LeadTimes {
    double threshold = 0.0;
    std::int64_t cases = 0, cases_crossed = 0, cases_late = 0;
    std::optional<double> share_crossed, share_late;
    double p10_hours = 0.0, p25_hours = 0.0, median_hours = 0.0, p75_hours = 0.0, p90_hours = 0.0;  // NaN when none crossed
    double min_lead_hours = 0.0, window_hours = 0.0;
};

// Prediction level, label = the mapping's horizon (0: before discharge).
struct CalibrationSummary {
    double horizon_hours = 0.0;
    ObservedExpected observed_expected;  // interval: delta method, predictions taken as independent
    Interval oe_bootstrap;               // encounter bootstrap, percentile; NaN without replicates
    LogisticRecalibration recalibration;
};

// Stay (encounter) level: each stay's highest probability (before time zero
// for cases, before discharge for the others; the mapping keeps score order,
// so it is the probability of the highest score) against whether the stay had
// the outcome at all. The mapping's horizon does not enter: a stay's worst
// moment is compared with its outcome, which is what a committee asks of
// "the patients we would have flagged". Slope and calibration-in-the-large
// treat stays as independent, which they are.
struct StayCalibration {
    ObservedExpected observed_expected;  // delta-method interval
    LogisticRecalibration recalibration;
    std::vector<CalibrationBin> bins;
};

// One period of the drift check (prediction level; label = the mapping's
// horizon, else the first horizon: with a mapping the AUC's outcome is the
// one the probability predicts, so AUC and O/E of a row share one label,
// which `horizon_hours` and `horizon_source` state). Periods with no
// prediction are listed with zero counts.
inline constexpr const char* drift_horizon_mapping = "probability mapping's horizon";
inline constexpr const char* drift_horizon_first = "first horizon";
struct DriftPeriod {
    std::string label;         // "2026-03", or the first day of a block of days
    std::string start;         // local time of the period's start
    double horizon_hours = 0.0;  // 0: before discharge
    std::string horizon_source;  // drift_horizon_mapping or drift_horizon_first
    std::int64_t predictions = 0, positive_predictions = 0;
    double auc = 0.0;  // NaN when either class is empty
    std::optional<ObservedExpected> observed_expected;  // with a probability mapping
};

// Encounter level: an encounter is evaluated when its highest probability
// before time zero reaches pt.
struct DecisionCurveResult {
    std::int64_t encounters = 0;
    std::vector<DecisionCurvePoint> points;
    std::vector<std::string> source;  // per point: "grid", "given" or "evaluations_per_case"
};

struct Evaluation {
    EvaluationCounts counts;
    EncounterAuc encounter_auc;
    std::vector<ThresholdMeasures> thresholds;  // source "grid" or "given"
    std::vector<PredictionAuc> prediction_auc;
    std::vector<LeadTimes> lead_times;          // one per threshold, in the same order
    // Without a probability mapping: no calibration and no decision curve.
    std::optional<CalibrationSummary> calibration;
    std::vector<CalibrationBin> calibration_bins;
    SmoothedCurve calibration_smoothed;
    std::optional<StayCalibration> stay_calibration;
    std::vector<DriftPeriod> drift;
    std::optional<DecisionCurveResult> decision_curve;
};

// All of the measures. Throws std::invalid_argument for unusable options.
Evaluation evaluate(const Population& population, const EvaluationOptions& options);

// ---- The parts, usable on their own ----------------------------------------

// Encounter level: index of the encounter, its highest usable score, and
// whether it is a case. Encounters without a usable score are left out.
struct EncounterScore {
    std::uint32_t encounter = 0;
    double highest_score = 0.0;
    bool is_case = false;
};
std::vector<EncounterScore> encounter_level_scores(const Population& population);

EvaluationCounts evaluation_counts(const Population& population);

// Throws std::invalid_argument when the mapping leaves [0, 1]. Empty input: no fit, no bins.
StayCalibration stay_level_calibration(const std::vector<EncounterScore>& scores, const ProbabilityMapping& mapping,
                                       int groups, double confidence);

EncounterAuc encounter_level_auc(const std::vector<EncounterScore>& scores, double confidence);

// Thresholds for the threshold measures and lead times: the grid (when
// grid_points > 0) followed by the given ones; source[i] says which.
struct ThresholdList {
    std::vector<double> values;
    std::vector<std::string> source;
};
ThresholdList evaluation_thresholds(const std::vector<EncounterScore>& scores, const EvaluationOptions& options);

// Prediction level, one per horizon of the options.
std::vector<PredictionAuc> prediction_level_auc(const Population& population, const EvaluationOptions& options);

// Encounter level at each threshold of the list.
std::vector<ThresholdMeasures> encounter_threshold_measures(const std::vector<EncounterScore>& scores,
                                                            const ThresholdList& thresholds, double confidence);

std::vector<LeadTimes> lead_times_by_threshold(const Population& population, const std::vector<double>& thresholds,
                                               double window_hours, double min_lead_hours);
// The lead times (hours) of the cases that crossed, in encounter order.
std::vector<double> first_crossing_lead_hours(const Population& population, double threshold, double window_hours);

}  // namespace tocsin
