#pragma once
// The prediction level of the evaluation: every usable score ranked once by
// value, then AUC by horizon (with the encounter bootstrap), calibration and
// drift by period, each a pass over that order (nothing is O(n^2)).
#include <cstdint>
#include <vector>

#include "analysis/evaluation.hpp"

namespace tocsin {

// Every usable score, in ascending order of value, with what each measure
// needs next to it (so later passes read memory in order).
struct RankedPredictions {
    std::vector<double> value;
    std::vector<std::uint32_t> encounter;
    std::vector<std::int32_t> seconds_to_outcome;  // INT32_MAX for non-cases
    std::vector<Instant> available_at;
    std::vector<std::uint32_t> encounters_used;  // encounters with at least one prediction, ascending
};
// `threads` share the placing of the scores; the order does not depend on it.
RankedPredictions rank_predictions(const Population& population, unsigned threads = 1);

// Seconds before time zero within which a prediction is positive, for a
// horizon in hours (0: before the end of the stay, every case's prediction).
std::int32_t horizon_limit_seconds(double horizon_hours);

// The Mann-Whitney sums at one horizon, in exact integers: twice U (each
// positive earns 2 per negative below it and 1 per negative tied with it).
struct AucSums {
    std::int64_t twice_u = 0, positives = 0, negatives = 0;
    double auc() const;  // NaN when either class is empty
};

// The sums at several horizon limits in one ascending pass. `weights` (per
// encounter) counts each prediction as many times as its encounter's weight;
// empty = once each.
std::vector<AucSums> auc_sums_by_horizon(const RankedPredictions& ranked, const std::vector<std::int32_t>& limits,
                                         const std::vector<std::uint32_t>& weights);

std::vector<PredictionAuc> prediction_auc_from_ranked(const Population& population, const RankedPredictions& ranked,
                                                      const EvaluationOptions& options);
// Fills the calibration members of `evaluation`; nothing without a mapping or a prediction.
void calibration_from_ranked(const Population& population, const RankedPredictions& ranked,
                             const EvaluationOptions& options, Evaluation& evaluation);
std::vector<DriftPeriod> drift_from_ranked(const Population& population, const RankedPredictions& ranked,
                                           const EvaluationOptions& options);

}  // namespace tocsin
