#include "analysis/calibration.hpp"

#include <Eigen/Dense>
#include <algorithm>
#include <cmath>
#include <limits>
#include <stdexcept>


namespace tocsin {

namespace {

constexpr double not_a_number = std::numeric_limits<double>::quiet_NaN();

double clamp_probability(double p, std::int64_t& clamped) {
    if (!(p >= 0.0 && p <= 1.0)) throw std::invalid_argument("calibration: a probability outside [0, 1] (or NaN)");
    if (p < probability_clamp) { ++clamped; return probability_clamp; }
    if (p > 1.0 - probability_clamp) { ++clamped; return 1.0 - probability_clamp; }
    return p;
}

double logit(double p) { return std::log(p / (1.0 - p)); }

double expit(double x) {
    return x >= 0 ? 1.0 / (1.0 + std::exp(-x)) : std::exp(x) / (1.0 + std::exp(x));
}

void check_lengths(std::span<const double> p, std::span<const std::uint8_t> y) {
    if (p.size() != y.size()) throw std::invalid_argument("calibration: probabilities and outcomes differ in length");
}

}  // namespace

ObservedExpected observed_expected(std::span<const double> p, std::span<const std::uint8_t> y, double confidence) {
    check_lengths(p, y);
    double observed = 0.0, expected = 0.0;
    for (std::size_t i = 0; i < p.size(); ++i) {
        expected += p[i];
        observed += y[i] ? 1.0 : 0.0;
    }
    return observed_expected_from_sums(static_cast<std::int64_t>(p.size()), observed, expected, confidence);
}

ObservedExpected observed_expected_from_sums(std::int64_t predictions, double observed, double expected,
                                             double confidence) {
    ObservedExpected out;
    out.predictions = predictions;
    out.observed = observed;
    out.expected = expected;
    out.ratio = expected > 0 ? observed / expected : not_a_number;
    const double n = static_cast<double>(predictions);
    if (observed > 0 && observed < n && expected > 0) {
        const double se = std::sqrt(1.0 / observed - 1.0 / n);
        const double z = normal_two_sided_z(confidence);
        out.interval = {out.ratio * std::exp(-z * se), out.ratio * std::exp(z * se)};
    } else {
        out.interval = {not_a_number, not_a_number};
    }
    return out;
}

LogisticRecalibration logistic_recalibration(std::span<const double> p, std::span<const std::uint8_t> y) {
    check_lengths(p, y);
    std::vector<double> trials(p.size(), 1.0), events(p.size());
    for (std::size_t i = 0; i < y.size(); ++i) events[i] = y[i] ? 1.0 : 0.0;
    return logistic_recalibration_grouped(p, trials, events);
}

namespace {

constexpr int max_newton_iterations = 100;

// Grouped binomial data on the logit scale: group i has trials[i]
// predictions of logit x[i], events[i] of them with the outcome.
struct LogitGroups {
    std::vector<double> x;
    std::span<const double> trials, events;
};

// Fisher information and score of logit P(y = 1) = a + b x at beta = (a, b).
void information_and_score(const LogitGroups& g, const Eigen::Vector2d& beta, Eigen::Matrix2d& information,
                           Eigen::Vector2d& score) {
    information.setZero();
    score.setZero();
    for (std::size_t i = 0; i < g.x.size(); ++i) {
        const double mu = expit(beta[0] + beta[1] * g.x[i]);
        const double w = g.trials[i] * mu * (1.0 - mu);
        const double r = g.events[i] - g.trials[i] * mu;
        information(0, 0) += w;
        information(0, 1) += w * g.x[i];
        information(1, 1) += w * g.x[i] * g.x[i];
        score[0] += r;
        score[1] += r * g.x[i];
    }
    information(1, 0) = information(0, 1);
}

// Intercept and slope. Newton-Raphson on the log-likelihood, started at
// perfect calibration; for the logit link this is exactly IRLS:
// beta += (X'WX)^-1 X'(y - mu).
void fit_intercept_and_slope(const LogitGroups& g, LogisticRecalibration& out) {
    Eigen::Vector2d beta(0.0, 1.0), score;
    Eigen::Matrix2d information;
    for (out.iterations = 1; out.iterations <= max_newton_iterations; ++out.iterations) {
        information_and_score(g, beta, information, score);
        const Eigen::Vector2d step = information.ldlt().solve(score);
        if (!step.allFinite()) break;
        beta += step;
        if (step.cwiseAbs().maxCoeff() < 1e-10 * (1.0 + beta.cwiseAbs().maxCoeff())) {
            out.converged = true;
            break;
        }
    }
    if (!out.converged) return;
    information_and_score(g, beta, information, score);  // information at the final estimate
    const Eigen::Matrix2d covariance = information.inverse();
    out.intercept = beta[0];
    out.slope = beta[1];
    out.intercept_se = std::sqrt(covariance(0, 0));
    out.slope_se = std::sqrt(covariance(1, 1));
}

// Score of the intercept-only model with logit(p) as offset, at intercept a;
// sets its Fisher information.
double offset_model_score(const LogitGroups& g, double a, double& information) {
    double score = 0.0;
    information = 0.0;
    for (std::size_t i = 0; i < g.x.size(); ++i) {
        const double mu = expit(a + g.x[i]);
        score += g.events[i] - g.trials[i] * mu;
        information += g.trials[i] * mu * (1.0 - mu);
    }
    return score;
}

// Calibration-in-the-large: the intercept with the slope held at 1, by
// one-parameter Newton. Returns whether it converged.
bool fit_calibration_in_the_large(const LogitGroups& g, LogisticRecalibration& out) {
    double a = 0.0, information = 0.0;
    for (int it = 0; it < max_newton_iterations; ++it) {
        const double step = offset_model_score(g, a, information) / information;
        if (!std::isfinite(step)) return false;
        a += step;
        if (std::abs(step) < 1e-10 * (1.0 + std::abs(a))) {
            offset_model_score(g, a, information);
            out.calibration_in_the_large = a;
            out.calibration_in_the_large_se = 1.0 / std::sqrt(information);
            return true;
        }
    }
    return false;
}

}  // namespace

LogisticRecalibration logistic_recalibration_grouped(std::span<const double> p, std::span<const double> trials,
                                                     std::span<const double> events) {
    if (p.size() != trials.size() || p.size() != events.size())
        throw std::invalid_argument("calibration: probabilities, trials and events differ in length");
    LogisticRecalibration out;
    LogitGroups groups{std::vector<double>(p.size()), trials, events};
    double n_total = 0.0, events_total = 0.0;
    for (std::size_t i = 0; i < p.size(); ++i) {
        std::int64_t clamped = 0;
        groups.x[i] = logit(clamp_probability(p[i], clamped));
        out.clamped += clamped * static_cast<std::int64_t>(trials[i]);
        n_total += trials[i];
        events_total += events[i];
    }
    out.predictions = static_cast<std::int64_t>(n_total);
    out.intercept = out.slope = out.calibration_in_the_large = not_a_number;
    out.intercept_se = out.slope_se = out.calibration_in_the_large_se = not_a_number;
    // One class only: no finite estimate exists.
    if (events_total == 0.0 || events_total == n_total) return out;
    fit_intercept_and_slope(groups, out);
    const bool converged_in_the_large = fit_calibration_in_the_large(groups, out);
    out.converged = out.converged && converged_in_the_large;
    return out;
}

std::vector<CalibrationBin> binned_calibration(std::span<const double> p, std::span<const std::uint8_t> y, int groups,
                                               double confidence) {
    check_lengths(p, y);
    std::vector<CalibrationBin> out;
    if (p.empty() || groups <= 0) return out;
    const auto order = ascending_order(p);
    const std::size_t n = p.size();
    const std::size_t g = std::min<std::size_t>(static_cast<std::size_t>(groups), n);
    for (std::size_t k = 0; k < g; ++k) {
        const std::size_t first = k * n / g, last = (k + 1) * n / g;
        CalibrationBin bin;
        double sum = 0.0;
        for (std::size_t i = first; i < last; ++i) {
            sum += p[order[i]];
            bin.outcomes += y[order[i]] ? 1 : 0;
        }
        bin.predictions = static_cast<std::int64_t>(last - first);
        bin.predicted_low = p[order[first]];
        bin.predicted_high = p[order[last - 1]];
        bin.mean_predicted = sum / static_cast<double>(bin.predictions);
        bin.observed = static_cast<double>(bin.outcomes) / static_cast<double>(bin.predictions);
        bin.observed_interval = wilson_interval(bin.outcomes, bin.predictions, confidence);
        out.push_back(bin);
    }
    return out;
}

SmoothedCurve smoothed_calibration(std::span<const double> p, std::span<const std::uint8_t> y, int points,
                                   double bandwidth) {
    check_lengths(p, y);
    SmoothedCurve out;
    if (p.empty() || points <= 0) return out;
    std::int64_t clamped = 0;
    std::vector<double> x(p.size());
    for (std::size_t i = 0; i < p.size(); ++i) x[i] = logit(clamp_probability(p[i], clamped));
    const auto [lo_it, hi_it] = std::minmax_element(x.begin(), x.end());
    const double lo = *lo_it, hi = *hi_it;
    constexpr int bins = 2048;
    const double width = hi > lo ? (hi - lo) / (bins - 1) : 1.0;
    // Linear binning: each observation splits its weight between the two
    // nearest bin centres, which keeps the binned estimate O(width^2) close.
    std::vector<double> count(bins, 0.0), events(bins, 0.0);
    for (std::size_t i = 0; i < x.size(); ++i) {
        const double position = hi > lo ? (x[i] - lo) / width : 0.0;
        const int left = std::min(bins - 2, static_cast<int>(position));
        const double right_share = std::clamp(position - left, 0.0, 1.0);
        const double outcome = y[i] ? 1.0 : 0.0;
        count[left] += 1.0 - right_share;
        count[left + 1] += right_share;
        events[left] += (1.0 - right_share) * outcome;
        events[left + 1] += right_share * outcome;
    }
    if (bandwidth <= 0.0) {
        double sum = 0.0, sum_sq = 0.0;
        for (double xi : x) sum += xi;
        const double m = sum / static_cast<double>(x.size());
        for (double xi : x) sum_sq += (xi - m) * (xi - m);
        const double sd = x.size() > 1 ? std::sqrt(sum_sq / static_cast<double>(x.size() - 1)) : 0.0;
        // Quartiles by selection, not a full sort: this runs on every prediction.
        std::vector<double> copy = x;
        const auto lower_at = static_cast<std::ptrdiff_t>((copy.size() - 1) / 4);
        const auto upper_at = static_cast<std::ptrdiff_t>(3 * (copy.size() - 1) / 4);
        std::nth_element(copy.begin(), copy.begin() + upper_at, copy.end());
        const double upper_quartile = copy[static_cast<std::size_t>(upper_at)];
        std::nth_element(copy.begin(), copy.begin() + lower_at, copy.begin() + upper_at);
        const double iqr = upper_quartile - copy[static_cast<std::size_t>(lower_at)];
        double spread = std::min(sd, iqr / 1.34);
        if (!(spread > 0.0)) spread = sd > 0.0 ? sd : 1.0;
        bandwidth = 0.9 * spread * std::pow(static_cast<double>(x.size()), -0.2);
        bandwidth = std::max(bandwidth, 2.0 * width);
    }
    out.bandwidth_logit = bandwidth;
    for (double g : even_grid(lo, hi, points)) {
        double weight = 0.0, weight_sq = 0.0, weighted_events = 0.0;
        for (int b = 0; b < bins; ++b) {
            const double u = (lo + b * width - g) / bandwidth;
            if (std::abs(u) > 6.0) continue;  // exp(-18) is below any reported digit
            const double k = std::exp(-0.5 * u * u);
            weight += k * count[b];
            weight_sq += k * k * count[b];
            weighted_events += k * events[b];
        }
        SmoothedPoint point;
        point.predicted = expit(g);
        point.observed = weight > 0 ? weighted_events / weight : not_a_number;
        point.effective_n = weight_sq > 0 ? weight * weight / weight_sq : 0.0;
        out.points.push_back(point);
    }
    return out;
}

}  // namespace tocsin
