#include "analysis/net_benefit.hpp"

#include <limits>
#include <stdexcept>

#include "analysis/roc.hpp"

namespace tocsin {

namespace {

double exchange_rate(double pt) {
    if (!(pt > 0.0 && pt < 1.0)) throw std::invalid_argument("threshold probability must be in (0, 1)");
    return pt / (1.0 - pt);
}

}  // namespace

double net_benefit(std::int64_t tp, std::int64_t fp, std::int64_t total, double pt) {
    if (total <= 0) return std::numeric_limits<double>::quiet_NaN();
    const double n = static_cast<double>(total);
    return static_cast<double>(tp) / n - static_cast<double>(fp) / n * exchange_rate(pt);
}

double net_benefit_treat_all(std::int64_t cases, std::int64_t total, double pt) {
    return net_benefit(cases, total - cases, total, pt);
}

double threshold_probability_from_evaluations_per_case(double n) {
    if (!(n > 1.0)) throw std::invalid_argument("evaluations per case found must be greater than 1");
    return 1.0 / n;
}

std::vector<DecisionCurvePoint> decision_curve(std::span<const double> p, std::span<const std::uint8_t> y,
                                               std::span<const double> thresholds) {
    const auto counts = counts_at_thresholds(p, y, thresholds);
    std::int64_t cases = 0;
    for (auto v : y) cases += v ? 1 : 0;
    const auto total = static_cast<std::int64_t>(p.size());
    std::vector<DecisionCurvePoint> out;
    for (const ThresholdCounts& c : counts) {
        DecisionCurvePoint d;
        d.threshold_probability = c.threshold;
        d.true_positives = c.true_positives;
        d.false_positives = c.false_positives;
        d.net_benefit_model = net_benefit(c.true_positives, c.false_positives, total, c.threshold);
        d.net_benefit_treat_all = net_benefit_treat_all(cases, total, c.threshold);
        out.push_back(d);
    }
    return out;
}

}  // namespace tocsin
