#pragma once
// Net benefit and the decision curve (Vickers & Elkin 2006, Med Decis Making
// 26:565-574). Acting on a patient (here: a bedside evaluation) at threshold
// probability pt means one is willing to evaluate up to (1 - pt) / pt
// patients without the outcome to find one with it, so
//   net benefit = TP / n - FP / n * pt / (1 - pt),
// in units of "true positives per patient". Treat none scores 0; treat all
// scores prevalence - (1 - prevalence) * pt / (1 - pt).
// A threshold given as N, "the number one is willing to evaluate per case
// found", is pt = 1 / N (common practice, no source).
#include <cstdint>
#include <span>
#include <vector>

namespace tocsin {

double net_benefit(std::int64_t true_positives, std::int64_t false_positives, std::int64_t total,
                   double threshold_probability);
double net_benefit_treat_all(std::int64_t cases, std::int64_t total, double threshold_probability);
// pt = 1 / N; throws unless N > 1.
double threshold_probability_from_evaluations_per_case(double evaluations_per_case);

struct DecisionCurvePoint {
    double threshold_probability = 0.0;
    std::int64_t true_positives = 0;   // predictions >= pt with the outcome
    std::int64_t false_positives = 0;  // predictions >= pt without it
    double net_benefit_model = 0.0;
    double net_benefit_treat_all = 0.0;
    double net_benefit_treat_none = 0.0;  // always 0, kept so the curve's data is complete
};
// The model acts when its probability >= pt. O((n + k) log n).
std::vector<DecisionCurvePoint> decision_curve(std::span<const double> probabilities,
                                               std::span<const std::uint8_t> outcomes,
                                               std::span<const double> threshold_probabilities);

}  // namespace tocsin
