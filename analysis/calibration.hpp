#pragma once
// Calibration of predicted probabilities against what happened: does a
// predicted 10% come true about one time in ten? Observed / expected ratio,
// logistic recalibration (Cox 1958), a binned curve and a smoothed curve.
//
// Probabilities are clamped to [1e-9, 1 - 1e-9] before taking logits (a
// probability of exactly 0 or 1 has no logit); how many were clamped is
// reported so nothing moves silently.
#include <cstdint>
#include <span>
#include <vector>

#include "analysis/roc.hpp"

namespace tocsin {

inline constexpr double probability_clamp = 1e-9;

struct ObservedExpected {
    std::int64_t predictions = 0;
    double observed = 0.0;  // number of outcomes
    double expected = 0.0;  // sum of predicted probabilities
    double ratio = 0.0;     // observed / expected; NaN when expected == 0
    // exp(ln(O/E) -/+ z * SE), SE(ln O) = sqrt(1/O - 1/n): the delta method for a
    // binomial count O with E held fixed. Treats predictions as independent.
    // Empty (NaN) when O == 0 or O == n.
    Interval interval;
};
ObservedExpected observed_expected(std::span<const double> probabilities, std::span<const std::uint8_t> outcomes,
                                   double confidence = 0.95);
// The same from sums: `predictions` predictions, `observed` outcomes, and
// `expected` the sum of their probabilities.
ObservedExpected observed_expected_from_sums(std::int64_t predictions, double observed, double expected,
                                             double confidence = 0.95);

// Logistic recalibration (Cox 1958): fit logit P(y = 1) = a + b * logit(p) by
// iteratively reweighted least squares (Newton-Raphson for the canonical
// link), 2x2 normal equations solved with Eigen. A perfectly calibrated score
// has a = 0, b = 1; b < 1 means predictions are too extreme.
// Calibration-in-the-large refits a alone with b fixed at 1 (logit(p) as an
// offset). Standard errors come from the inverse Fisher information at the
// estimate; they treat predictions as independent.
struct LogisticRecalibration {
    std::int64_t predictions = 0;
    std::int64_t clamped = 0;  // probabilities moved to the clamp bounds
    double intercept = 0.0, intercept_se = 0.0;
    double slope = 0.0, slope_se = 0.0;
    double calibration_in_the_large = 0.0, calibration_in_the_large_se = 0.0;
    int iterations = 0;
    bool converged = false;  // false e.g. under perfect separation or one class only
};
LogisticRecalibration logistic_recalibration(std::span<const double> probabilities,
                                             std::span<const std::uint8_t> outcomes);
// The same fit on grouped data: group k holds trials[k] predictions of
// probability p[k], of which events[k] had the outcome. Identical estimates to
// the ungrouped fit; much faster when scores take few distinct values.
LogisticRecalibration logistic_recalibration_grouped(std::span<const double> probabilities,
                                                     std::span<const double> trials, std::span<const double> events);

// Equal-count groups by predicted probability (the last group takes the
// remainder); ties may fall in two neighbouring groups, in input order.
struct CalibrationBin {
    std::int64_t predictions = 0;
    std::int64_t outcomes = 0;
    double predicted_low = 0.0, predicted_high = 0.0;
    double mean_predicted = 0.0;
    double observed = 0.0;  // outcomes / predictions
    Interval observed_interval;  // Wilson
};
std::vector<CalibrationBin> binned_calibration(std::span<const double> probabilities,
                                               std::span<const std::uint8_t> outcomes, int groups = 10,
                                               double confidence = 0.95);

// Smoothed calibration curve: a Nadaraya-Watson regression of the outcome on
// logit(p) with a Gaussian kernel, computed on 2,048 linear bins of logit(p)
// (binned kernel regression, Wand 1994), so cost is O(n + bins x points).
// Bandwidth on the logit scale; 0 picks Silverman's rule of thumb
// 0.9 min(sd, IQR / 1.34) n^(-1/5), floored at two bin widths.
struct SmoothedPoint {
    double predicted = 0.0;     // grid point, back on the probability scale
    double observed = 0.0;      // kernel-weighted share with the outcome
    double effective_n = 0.0;   // Kish effective sample size of the kernel weights
};
struct SmoothedCurve {
    double bandwidth_logit = 0.0;
    std::vector<SmoothedPoint> points;
};
inline constexpr const char* smoothed_calibration_method =
    "Nadaraya-Watson, Gaussian kernel, 2048 linear bins (Wand 1994)";
SmoothedCurve smoothed_calibration(std::span<const double> probabilities, std::span<const std::uint8_t> outcomes,
                                   int points = 50, double bandwidth_logit = 0.0);

}  // namespace tocsin
