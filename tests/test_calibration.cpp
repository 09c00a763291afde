// Calibration: observed/expected, logistic recalibration by IRLS, binned and
// smoothed curves.
#include <doctest/doctest.h>

#include <boost/random/bernoulli_distribution.hpp>
#include <boost/random/normal_distribution.hpp>
#include <cmath>
#include <vector>

#include "analysis/calibration.hpp"
#include "models/random_streams.hpp"

using namespace tocsin;

namespace {

double expit(double x) { return 1.0 / (1.0 + std::exp(-x)); }

// Predicted probabilities p with logit(p) ~ Normal(-1.5, 1.2), and outcomes
// drawn from the *true* risk expit(a + b * logit(p)).
void simulate(double a, double b, int n, std::uint64_t seed, std::vector<double>& p, std::vector<std::uint8_t>& y) {
    RandomEngine engine = make_stream(seed, 0, StreamPurpose::trajectory, 0);
    boost::random::normal_distribution<double> lp(-1.5, 1.2);
    for (int i = 0; i < n; ++i) {
        const double x = lp(engine);
        p.push_back(expit(x));
        boost::random::bernoulli_distribution<double> outcome(expit(a + b * x));
        y.push_back(outcome(engine) ? 1 : 0);
    }
}

}  // namespace

TEST_CASE("calibration.irls_recovers_intercept_and_slope") {
    // Known miscalibration: true risk = expit(-0.4 + 0.7 logit(p)), i.e.
    // predictions too high and too extreme. With n = 20,000 the fitted SEs
    // are about 0.03 (intercept) and 0.02 (slope). The MLE is asymptotically
    // normal, so |estimate - truth| < 4 SE fails with probability < 1e-4 per
    // parameter; the seed is fixed, so this is a deterministic check that the
    // fit is unbiased to within its own stated precision.
    for (auto [a, b] : {std::pair{-0.4, 0.7}, std::pair{0.3, 1.2}, std::pair{0.0, 1.0}}) {
        std::vector<double> p;
        std::vector<std::uint8_t> y;
        simulate(a, b, 20000, 42, p, y);
        const LogisticRecalibration fit = logistic_recalibration(p, y);
        CAPTURE(a);
        CAPTURE(b);
        REQUIRE(fit.converged);
        CHECK(fit.intercept_se > 0.01);
        CHECK(fit.intercept_se < 0.06);
        CHECK(std::abs(fit.intercept - a) < 4.0 * fit.intercept_se);
        CHECK(std::abs(fit.slope - b) < 4.0 * fit.slope_se);
        CHECK(fit.clamped == 0);
    }
}

TEST_CASE("calibration.grouped_fit_equals_ungrouped") {
    // Probabilities on a coarse grid so many predictions share one value.
    std::vector<double> p;
    std::vector<std::uint8_t> y;
    simulate(0.2, 0.9, 5000, 3, p, y);
    for (double& v : p) v = std::round(v * 20.0) / 20.0;
    for (double& v : p) v = std::min(0.95, std::max(0.05, v));  // keep off 0 and 1, on the grid
    std::vector<double> gp, trials, events;
    for (int k = 0; k <= 20; ++k) {
        const double level = k / 20.0;
        double t = 0, e = 0;
        for (std::size_t i = 0; i < p.size(); ++i)
            if (p[i] == level) {
                t += 1;
                e += y[i];
            }
        if (t > 0) {
            gp.push_back(level);
            trials.push_back(t);
            events.push_back(e);
        }
    }
    const auto one = logistic_recalibration(p, y);
    const auto grouped = logistic_recalibration_grouped(gp, trials, events);
    CHECK(grouped.intercept == doctest::Approx(one.intercept).epsilon(1e-9));
    CHECK(grouped.slope == doctest::Approx(one.slope).epsilon(1e-9));
    CHECK(grouped.slope_se == doctest::Approx(one.slope_se).epsilon(1e-9));
    CHECK(grouped.calibration_in_the_large == doctest::Approx(one.calibration_in_the_large).epsilon(1e-9));
    CHECK(grouped.predictions == 5000);
}

TEST_CASE("calibration.one_class_or_separation_is_not_converged") {
    const std::vector<double> p{0.1, 0.2, 0.3};
    CHECK_FALSE(logistic_recalibration(p, std::vector<std::uint8_t>{0, 0, 0}).converged);
    CHECK(std::isnan(logistic_recalibration(p, std::vector<std::uint8_t>{0, 0, 0}).slope));
    // Complete separation: the slope runs off to infinity.
    CHECK_FALSE(logistic_recalibration(p, std::vector<std::uint8_t>{0, 0, 1}).converged);
    CHECK_THROWS(logistic_recalibration(std::vector<double>{1.5}, std::vector<std::uint8_t>{1}));
}

TEST_CASE("calibration.observed_expected_by_hand") {
    // Five predictions 0.1, 0.2, 0.2, 0.5, 0.5: expected 1.5; two outcomes.
    // O/E = 2 / 1.5 = 1.3333. SE(ln O) = sqrt(1/2 - 1/5) = sqrt(0.3) = 0.5477;
    // 95% interval 1.3333 x exp(-/+ 1.96 x 0.5477) = 0.4557 to 3.9012.
    const std::vector<double> p{0.1, 0.2, 0.2, 0.5, 0.5};
    const std::vector<std::uint8_t> y{0, 1, 0, 1, 0};
    const ObservedExpected oe = observed_expected(p, y);
    CHECK(oe.expected == doctest::Approx(1.5));
    CHECK(oe.ratio == doctest::Approx(2.0 / 1.5));
    CHECK(oe.interval.lower == doctest::Approx(0.4557).epsilon(1e-3));
    CHECK(oe.interval.upper == doctest::Approx(3.9012).epsilon(1e-3));
    CHECK(std::isnan(observed_expected(p, std::vector<std::uint8_t>(5, 0)).interval.lower));
}

TEST_CASE("calibration.binned_groups_by_hand") {
    // Six predictions into 3 equal-count groups by probability:
    //   {0.05, 0.10} no outcome; {0.30, 0.40} one outcome; {0.70, 0.90} two.
    const std::vector<double> p{0.9, 0.05, 0.4, 0.1, 0.7, 0.3};
    const std::vector<std::uint8_t> y{1, 0, 1, 0, 1, 0};
    const auto bins = binned_calibration(p, y, 3);
    REQUIRE(bins.size() == 3);
    CHECK(bins[0].mean_predicted == doctest::Approx(0.075));
    CHECK(bins[0].observed == 0.0);
    CHECK(bins[1].predicted_low == 0.3);
    CHECK(bins[1].predicted_high == 0.4);
    CHECK(bins[1].observed == 0.5);
    CHECK(bins[2].outcomes == 2);
    CHECK(bins[2].observed_interval.upper == 1.0);
}

TEST_CASE("calibration.smoothed_curve_follows_a_calibrated_score") {
    // A perfectly calibrated score (a = 0, b = 1), n = 40,000. At each grid
    // point the smoothed observed share estimates the true risk expit(x)
    // averaged over the kernel; with effective n >= 400 its binomial SE is at
    // most sqrt(0.25 / 400) = 0.025. Kernel smoothing bias over a bandwidth of
    // ~0.13 logit units is below 0.01 here, so 4 SE + 0.01 = 0.11 is generous
    // for any single point; we check every point with enough data.
    std::vector<double> p;
    std::vector<std::uint8_t> y;
    simulate(0.0, 1.0, 40000, 9, p, y);
    const SmoothedCurve curve = smoothed_calibration(p, y, 30);
    REQUIRE(curve.points.size() == 30);
    CHECK(curve.bandwidth_logit > 0.0);
    int checked = 0;
    for (const SmoothedPoint& s : curve.points) {
        if (s.effective_n < 400) continue;
        ++checked;
        CAPTURE(s.predicted);
        const double se = std::sqrt(s.predicted * (1 - s.predicted) / s.effective_n);
        CHECK(std::abs(s.observed - s.predicted) < 4.0 * se + 0.01);
    }
    CHECK(checked >= 15);
}
