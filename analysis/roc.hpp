#pragma once
// Discrimination measures for a score against a yes/no outcome: the area under
// the ROC curve with its DeLong interval, and sensitivity, specificity, PPV,
// NPV and the share flagged at given thresholds, each with a Wilson interval.
// Everything here is O(n log n) or better, so a year of scores fits in seconds.
//
// Convention used throughout: a higher score means more concern, and a score
// is "flagged" at threshold t when score >= t.
#include <cstdint>
#include <optional>
#include <string>
#include <span>
#include <vector>

namespace tocsin {

struct Interval {
    double lower = 0.0;
    double upper = 0.0;
};

// Two-sided standard normal quantile z such that P(|Z| <= z) = confidence.
double normal_two_sided_z(double confidence);

// Wilson score interval for a binomial proportion (Wilson 1927; recommended by
// Newcombe 1998, method 3). trials == 0 gives [0, 1].
Interval wilson_interval(std::int64_t successes, std::int64_t trials, double confidence = 0.95);

// Indices that put `values` in ascending order; ties keep their input order
// (stable). LSD radix sort on the IEEE-754 bit pattern: O(n), deterministic.
// NaN is not a score: callers must not pass it.
std::vector<std::uint32_t> ascending_order(std::span<const double> values);

// Area under the ROC curve by the Mann-Whitney statistic with ties counted
// one half: P(score of a positive > score of a negative) + 0.5 P(tie).
// labels: 1 = positive (case), 0 = negative. NaN when either class is empty.
double auc_mann_whitney(std::span<const double> scores, std::span<const std::uint8_t> labels);

// DeLong, DeLong & Clarke-Pearson (1988) structural components ("placement
// values"), computed by midranks in O(n log n) as in Sun & Xu (2014):
//   positive i: share of negatives scoring below it (ties count one half);
//   negative j: share of positives scoring above it (ties count one half).
// The mean of either vector is the AUC.
struct PlacementValues {
    std::vector<double> of_positives;  // in the input order of the positives
    std::vector<double> of_negatives;  // in the input order of the negatives
};
PlacementValues placement_values(std::span<const double> scores, std::span<const std::uint8_t> labels);

struct AucEstimate {
    double auc = 0.0;
    std::int64_t positives = 0;
    std::int64_t negatives = 0;
    double standard_error = 0.0;  // DeLong
    Interval interval;            // auc -/+ z * SE, clipped to [0, 1] (as pROC's ci.auc, method = "delong")
};
// AUC with the DeLong (1988) variance: S10 / n_pos + S01 / n_neg, where S10 and
// S01 are the sample variances (n - 1 divisor) of the placement values.
AucEstimate auc_delong(std::span<const double> scores, std::span<const std::uint8_t> labels,
                       double confidence = 0.95);

// Two scores measured on the same encounters, compared by the test for
// correlated ROC curves of DeLong, DeLong & Clarke-Pearson (1988, Biometrics
// 44:837-845, section 3): the AUCs are paired through the encounters, so the
// variance of their difference subtracts twice their covariance, estimated
// from the placement values of both scores (cases' and controls' sample
// covariances, n - 1 divisor, as pROC's roc.test(paired = TRUE)).
struct PairedAucComparison {
    double auc_a = 0.0;
    double auc_b = 0.0;
    double difference = 0.0;   // auc_a - auc_b
    double variance_a = 0.0;   // of the estimate auc_a (as auc_delong)
    double variance_b = 0.0;   // of the estimate auc_b
    double covariance = 0.0;   // of the two estimates
    double standard_error = 0.0;  // of the difference: sqrt(variance_a + variance_b - 2 covariance)
    Interval interval;            // difference -/+ z * SE, clipped to [-1, 1] (pROC does not clip)
    // Absent when the standard error is zero: the placements of the two scores
    // then differ by the same amount for every case and every control (e.g.
    // identical scores, or a perfect score against a constant one), and a
    // ratio to zero is no test. (pROC gives z = 0 for 0/0 and infinity else.)
    std::optional<double> z;
    std::optional<double> p;  // two-sided, 2 (1 - Phi(|z|))
    std::int64_t cases = 0;
    std::int64_t controls = 0;
};
// labels: 1 = case, 0 = control, the same encounters in the same order as both
// score vectors. Throws std::invalid_argument for vectors of different lengths,
// a score that is not a finite number, or fewer than two cases or two controls
// (the sample variance of the placements needs two of each).
PairedAucComparison paired_auc_delong(std::span<const double> score_a, std::span<const double> score_b,
                                      std::span<const std::uint8_t> labels, double confidence = 0.95);

// Hanley & McNeil (1982, Radiology 143:29-36, eq. 1-2) standard error of an AUC
// with their approximations Q1 = A / (2 - A), Q2 = 2 A^2 / (1 + A). Kept to
// compare with their published example; prefer auc_delong for reporting.
double hanley_mcneil_standard_error(double auc, std::int64_t positives, std::int64_t negatives);

// The 2x2 table at one threshold (flagged = score >= threshold).
struct ThresholdCounts {
    double threshold = 0.0;
    std::int64_t true_positives = 0;
    std::int64_t false_positives = 0;
    std::int64_t false_negatives = 0;
    std::int64_t true_negatives = 0;
};
// Counts at each threshold in O((n + k) log n); thresholds in the given order.
std::vector<ThresholdCounts> counts_at_thresholds(std::span<const double> scores,
                                                  std::span<const std::uint8_t> labels,
                                                  std::span<const double> thresholds);

// `points` evenly spaced values from low to high inclusive (one point: low).
std::vector<double> even_grid(double low, double high, int points);

// A proportion k / n with its Wilson interval.
struct Proportion {
    double value = 0.0;
    Interval interval;
};

// The 2x2 table at one threshold and what is read from it. A proportion
// with an empty denominator is absent.
struct ThresholdMeasures {
    std::string source;  // where the threshold came from: "grid" or "given"
    ThresholdCounts counts;
    std::optional<Proportion> sensitivity, specificity;
    std::optional<Proportion> ppv, npv;  // positive and negative predictive value
    std::optional<Proportion> share_flagged;
};
// `source[i]` labels threshold i; it may be empty (then "given").
std::vector<ThresholdMeasures> threshold_measures(const std::vector<ThresholdCounts>& counts,
                                                  const std::vector<std::string>& source, double confidence);

}  // namespace tocsin
