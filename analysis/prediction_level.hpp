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
RankedPredictions rank_predictions(const Population& population);

std::vector<PredictionAuc> prediction_auc_from_ranked(const Population& population, const RankedPredictions& ranked,
                                                      const EvaluationOptions& options);
// Fills the calibration members of `evaluation`; nothing without a mapping or a prediction.
void calibration_from_ranked(const Population& population, const RankedPredictions& ranked,
                             const EvaluationOptions& options, Evaluation& evaluation);
std::vector<DriftPeriod> drift_from_ranked(const Population& population, const RankedPredictions& ranked,
                                           const EvaluationOptions& options);

}  // namespace tocsin
