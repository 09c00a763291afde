// Discrimination measures: AUC, DeLong variance, Wilson intervals, counts at
// thresholds, and the radix ordering they all rest on.
#include <doctest/doctest.h>

#include <algorithm>
#include <boost/random/normal_distribution.hpp>
#include <boost/random/uniform_int_distribution.hpp>
#include <cmath>
#include <vector>

#include "analysis/roc.hpp"
#include "models/random_streams.hpp"
#include "report/evaluation_tables.hpp"

using namespace tocsin;

namespace {

// Expand a rating-scale table (count per rating) into one observation per image.
void expand(const std::vector<int>& counts, std::uint8_t label, std::vector<double>& scores,
            std::vector<std::uint8_t>& labels) {
    for (std::size_t rating = 0; rating < counts.size(); ++rating)
        for (int k = 0; k < counts[rating]; ++k) {
            scores.push_back(static_cast<double>(rating + 1));
            labels.push_back(label);
        }
}

// The O(n^2) definition of DeLong's placement values, written independently
// of the library: for each positive, the share of negatives below it (ties
// half); for each negative, the share of positives above it (ties half).
struct BruteForce {
    double auc, variance;
};
BruteForce delong_brute_force(const std::vector<double>& s, const std::vector<std::uint8_t>& y) {
    std::vector<double> pos, neg;
    for (std::size_t i = 0; i < s.size(); ++i) (y[i] ? pos : neg).push_back(s[i]);
    auto psi = [](double a, double b) { return a > b ? 1.0 : a == b ? 0.5 : 0.0; };
    std::vector<double> v10, v01;
    for (double x : pos) {
        double t = 0;
        for (double z : neg) t += psi(x, z);
        v10.push_back(t / static_cast<double>(neg.size()));
    }
    for (double z : neg) {
        double t = 0;
        for (double x : pos) t += psi(x, z);
        v01.push_back(t / static_cast<double>(pos.size()));
    }
    auto mean = [](const std::vector<double>& v) {
        double t = 0;
        for (double x : v) t += x;
        return t / static_cast<double>(v.size());
    };
    auto var = [&](const std::vector<double>& v) {
        const double m = mean(v);
        double t = 0;
        for (double x : v) t += (x - m) * (x - m);
        return t / static_cast<double>(v.size() - 1);
    };
    return {mean(v10), var(v10) / static_cast<double>(pos.size()) + var(v01) / static_cast<double>(neg.size())};
}

}  // namespace

TEST_CASE("roc.hanley_mcneil_rating_example") {
    // Hanley & McNeil (1982), Radiology 143:29-36, Table 1 (from memory): 109 CT images
    // rated 1 (definitely normal) to 5 (definitely abnormal). Counts are from
    // memory of the paper's table; they are the widely reproduced example.
    //   rating:       1   2   3   4   5
    //   normal (58): 33   6   6  11   2
    //   abnormal(51): 3   2   2  11  33
    std::vector<double> s;
    std::vector<std::uint8_t> y;
    expand({33, 6, 6, 11, 2}, 0, s, y);
    expand({3, 2, 2, 11, 33}, 1, s, y);

    // By hand: each abnormal image earns 1 per normal rated lower, 1/2 per tie.
    //   rating 1:  3 x (0  + 33/2) =   49.5
    //   rating 2:  2 x (33 +  6/2) =   72
    //   rating 3:  2 x (39 +  6/2) =   84
    //   rating 4: 11 x (45 + 11/2) =  555.5
    //   rating 5: 33 x (56 +  2/2) = 1881
    // sum 2642 over 51 x 58 = 2958 pairs: AUC = 2642 / 2958 = 0.893171...
    const double auc = auc_mann_whitney(s, y);
    CHECK(auc == doctest::Approx(2642.0 / 2958.0).epsilon(1e-14));
    // The paper reports the area as 0.893 (from memory) - agreement to 3 decimals.
    CHECK(std::abs(auc - 0.893) < 0.0005);

    // The paper's standard error uses its Q1 = A/(2-A), Q2 = 2A^2/(1+A)
    // approximations and is reported as 0.032 (from memory, 3 decimals).
    const double se = hanley_mcneil_standard_error(auc, 51, 58);
    CHECK(std::abs(se - 0.032) < 0.0005);

    // DeLong's SE on the same data uses the empirical components instead; it
    // must agree with the O(n^2) definition, and sits near (not at) the
    // approximation: 0.0307 against 0.0325 (our own computation, no source).
    const AucEstimate d = auc_delong(s, y);
    CHECK(d.auc == doctest::Approx(auc).epsilon(1e-14));
    CHECK(d.standard_error * d.standard_error ==
          doctest::Approx(delong_brute_force(s, y).variance).epsilon(1e-12));
    CHECK(std::abs(d.standard_error - se) < 0.003);
}

TEST_CASE("roc.delong_matches_brute_force") {
    // Random scores rounded to one decimal so that ties between and within
    // classes are common; several sizes including very unbalanced ones.
    for (int n_pos : {2, 7, 60, 300}) {
        for (int n_neg : {3, 41, 500}) {
            RandomEngine engine = make_stream(7, 0, StreamPurpose::trajectory, static_cast<std::uint64_t>(n_pos * 1000 + n_neg));
            boost::random::normal_distribution<double> noise(0.0, 1.0);
            std::vector<double> s;
            std::vector<std::uint8_t> y;
            for (int i = 0; i < n_pos + n_neg; ++i) {
                const bool positive = i < n_pos;
                s.push_back(std::round((noise(engine) + (positive ? 0.8 : 0.0)) * 10.0) / 10.0);
                y.push_back(positive ? 1 : 0);
            }
            // Interleave so the classes are not in blocks in the input.
            std::reverse(s.begin() + n_pos / 2, s.end());
            std::reverse(y.begin() + n_pos / 2, y.end());
            CAPTURE(n_pos);
            CAPTURE(n_neg);
            const BruteForce b = delong_brute_force(s, y);
            const AucEstimate d = auc_delong(s, y, 0.95);
            CHECK(d.auc == doctest::Approx(b.auc).epsilon(1e-12));
            CHECK(auc_mann_whitney(s, y) == doctest::Approx(b.auc).epsilon(1e-12));
            CHECK(d.standard_error * d.standard_error == doctest::Approx(b.variance).epsilon(1e-10));
            const double z = 1.959963984540054;  // standard normal 97.5th percentile
            CHECK(d.interval.lower == doctest::Approx(std::max(0.0, b.auc - z * std::sqrt(b.variance))).epsilon(1e-10));
            CHECK(d.interval.upper == doctest::Approx(std::min(1.0, b.auc + z * std::sqrt(b.variance))).epsilon(1e-10));
        }
    }
}

TEST_CASE("roc.degenerate_classes") {
    const std::vector<double> s{1, 2, 3};
    const std::vector<std::uint8_t> all_negative{0, 0, 0};
    CHECK(std::isnan(auc_mann_whitney(s, all_negative)));
    CHECK(std::isnan(auc_delong(s, all_negative).auc));
    // Perfect separation: AUC 1, both placement vectors constant, SE 0.
    const AucEstimate d = auc_delong(s, std::vector<std::uint8_t>{0, 1, 1});
    CHECK(d.auc == 1.0);
    CHECK(d.interval.upper == 1.0);
}

TEST_CASE("roc.wilson_newcombe_examples") {
    // Newcombe (1998), Statistics in Medicine 17:857-872: the paper's four
    // worked examples, method 3 (Wilson score interval without continuity
    // correction), 95%, to its 4 decimals. Values are from memory of the
    // paper's results table (table number not checked); statsmodels'
    // proportion_confint(method="wilson") gives the same to 4 decimals.
    struct Example {
        int k, n;
        double lower, upper;
    };
    for (const Example& e : {Example{81, 263, 0.2553, 0.3662}, Example{15, 148, 0.0624, 0.1605},
                             Example{0, 20, 0.0000, 0.1611}, Example{1, 29, 0.0061, 0.1718}}) {
        CAPTURE(e.k);
        CAPTURE(e.n);
        const Interval ci = wilson_interval(e.k, e.n, 0.95);
        CHECK(std::abs(ci.lower - e.lower) < 0.00005);
        CHECK(std::abs(ci.upper - e.upper) < 0.00005);
    }
    // 0/20 by hand: the upper bound is z^2 / (n + z^2) = 3.8415 / 23.8415.
    const double z = 1.959963984540054;
    CHECK(wilson_interval(0, 20).upper == doctest::Approx(z * z / (20 + z * z)).epsilon(1e-12));
    CHECK(wilson_interval(0, 20).lower == 0.0);
    CHECK(wilson_interval(20, 20).upper == 1.0);
    const Interval none = wilson_interval(0, 0);
    CHECK(none.lower == 0.0);
    CHECK(none.upper == 1.0);
}

TEST_CASE("roc.counts_at_thresholds") {
    // Six encounters; flagged means score >= threshold.
    //   score: 1  2  2  3  4  5
    //   case:  0  0  1  0  1  1
    // threshold 2: flagged 2,2,3,4,5 -> TP 3, FP 2 (the 2 and the 3), FN 0, TN 1
    // threshold 4: flagged 4,5       -> TP 2, FP 0, FN 1, TN 3
    // threshold 9: nothing flagged   -> TP 0, FP 0, FN 3, TN 3
    const std::vector<double> s{3, 1, 2, 5, 2, 4};
    const std::vector<std::uint8_t> y{0, 0, 0, 1, 1, 1};
    const std::vector<double> t{2, 4, 9};
    const auto c = counts_at_thresholds(s, y, t);
    REQUIRE(c.size() == 3);
    CHECK(c[0].true_positives == 3);
    CHECK(c[0].false_positives == 2);
    CHECK(c[0].false_negatives == 0);
    CHECK(c[0].true_negatives == 1);
    CHECK(c[1].true_positives == 2);
    CHECK(c[1].false_positives == 0);
    CHECK(c[1].false_negatives == 1);
    CHECK(c[1].true_negatives == 3);
    CHECK(c[2].true_positives == 0);
    CHECK(c[2].false_negatives == 3);

    const auto measures = threshold_measures(c, {"grid", "given", "given"}, 0.95);
    REQUIRE(measures.size() == 3);
    CHECK(measures[0].source == "grid");
    CHECK(measures[1].source == "given");
    // At threshold 4: sensitivity 2/3, specificity 3/3, PPV 2/2, NPV 3/4, flagged 2/6.
    const ThresholdMeasures& m = measures[1];
    REQUIRE(m.sensitivity);
    REQUIRE(m.specificity);
    REQUIRE(m.ppv);
    REQUIRE(m.npv);
    REQUIRE(m.share_flagged);
    CHECK(m.sensitivity->value == doctest::Approx(2.0 / 3.0));
    CHECK(m.specificity->value == 1.0);
    CHECK(m.ppv->value == 1.0);
    CHECK(m.npv->value == doctest::Approx(0.75));
    CHECK(m.share_flagged->value == doctest::Approx(2.0 / 6.0));
    // Nothing flagged at the highest threshold: no PPV.
    CHECK_FALSE(measures[2].ppv);

    // The table (report/) puts each proportion before its interval.
    const Table table = threshold_table(measures, "x", "x");
    REQUIRE(table.rows.size() == 3);
    const auto& row = table.rows[1];
    CHECK(std::get<double>(row[6]) == doctest::Approx(2.0 / 3.0));
    CHECK(std::get<double>(row[9]) == 1.0);
    CHECK(std::get<double>(row[12]) == 1.0);
    CHECK(std::get<double>(row[15]) == doctest::Approx(0.75));
    CHECK(std::get<double>(row[18]) == doctest::Approx(2.0 / 6.0));
    CHECK(std::holds_alternative<std::monostate>(table.rows[2][12]));
    CHECK(std::get<double>(row[7]) == doctest::Approx(wilson_interval(2, 3).lower));
    // At threshold 9 nothing is flagged: PPV has no denominator, so it is empty.
    CHECK(std::holds_alternative<std::monostate>(table.rows[2][12]));
    CHECK(std::get<std::string>(table.rows[0][0]) == "grid");
}

TEST_CASE("roc.ascending_order_is_a_stable_sort") {
    // Large enough to take the radix path; negatives, zeros of both signs,
    // ties, and a wide exponent range.
    RandomEngine engine = make_stream(11, 0, StreamPurpose::trajectory, 0);
    boost::random::uniform_int_distribution<int> pick(0, 5);
    boost::random::normal_distribution<double> noise(0.0, 1.0);
    std::vector<double> v;
    for (int i = 0; i < 20000; ++i) {
        switch (pick(engine)) {
            case 0: v.push_back(std::round(noise(engine) * 3.0)); break;
            case 1: v.push_back(noise(engine) * 1e6); break;
            case 2: v.push_back(noise(engine) * 1e-6); break;
            case 3: v.push_back(i % 2 ? 0.0 : -0.0); break;
            default: v.push_back(noise(engine)); break;
        }
    }
    const auto order = ascending_order(v);
    std::vector<std::uint32_t> expected(v.size());
    for (std::uint32_t i = 0; i < v.size(); ++i) expected[i] = i;
    // -0.0 and 0.0 compare equal, but the radix key puts -0.0 first; compare
    // values rather than indices where they differ only by the sign of zero.
    std::stable_sort(expected.begin(), expected.end(), [&](auto a, auto b) { return v[a] < v[b]; });
    REQUIRE(order.size() == expected.size());
    int mismatched_values = 0, mismatched_nonzero_indices = 0;
    for (std::size_t i = 0; i < order.size(); ++i) {
        if (v[order[i]] != v[expected[i]]) ++mismatched_values;
        if (v[order[i]] != 0.0 && order[i] != expected[i]) ++mismatched_nonzero_indices;
    }
    CHECK(mismatched_values == 0);
    CHECK(mismatched_nonzero_indices == 0);
}

TEST_CASE("roc.paired_delong_hand_worked") {
    // DeLong, DeLong & Clarke-Pearson (1988), section 3, on 2 cases and 3
    // controls, worked by hand. Encounters in order: case 1, case 2,
    // control 1, control 2, control 3.
    //   score A: 0.9 0.4 | 0.1 0.5 0.4   (case 2 ties control 3)
    //   score B: 0.3 0.8 | 0.2 0.6 0.9
    // Placements of the cases (share of controls below, ties one half):
    //   A: case 1 above all 3 -> 1; case 2 above control 1, ties control 3 -> 1.5/3 = 0.5
    //   B: case 1 above control 1 -> 1/3; case 2 above controls 1, 2 -> 2/3
    // Placements of the controls (share of cases above, ties one half):
    //   A: control 1 -> 1; control 2 (case 1 above) -> 0.5; control 3 (case 1 above, case 2 tied) -> 0.75
    //   B: control 1 -> 1; control 2 (case 2 above) -> 0.5; control 3 -> 0
    // AUC A = (1 + 0.5) / 2 = 0.75, AUC B = (1/3 + 2/3) / 2 = 0.5, difference 0.25.
    // Sample (co)variances, n - 1 divisor:
    //   cases (divisor 1):    S10_AA = 0.25^2 + 0.25^2 = 1/8; S10_BB = (1/6)^2 * 2 = 1/18;
    //                         S10_AB = 0.25 * (-1/6) + (-0.25) * (1/6) = -1/12
    //   controls (divisor 2): S01_AA = (0.0625 + 0.0625 + 0) / 2 = 1/16; S01_BB = (0.25 + 0 + 0.25) / 2 = 1/4;
    //                         S01_AB = (0.25 * 0.5 + (-0.25) * 0 + 0 * (-0.5)) / 2 = 1/16
    // Var A = (1/8)/2 + (1/16)/3 = 1/12; Var B = (1/18)/2 + (1/4)/3 = 1/9;
    // Cov = (-1/12)/2 + (1/16)/3 = -1/48.
    // Var(A - B) = 1/12 + 1/9 + 2/48 = 17/72; SE = sqrt(17/72) = 0.485913;
    // z = 0.25 / SE = 0.514496; p = erfc(z / sqrt 2) = 0.606905;
    // interval 0.25 -/+ 1.959964 SE = -0.702371 to 1.202371, clipped to 1 above.
    const std::vector<double> a{0.9, 0.4, 0.1, 0.5, 0.4}, b{0.3, 0.8, 0.2, 0.6, 0.9};
    const std::vector<std::uint8_t> y{1, 1, 0, 0, 0};
    const PairedAucComparison c = paired_auc_delong(a, b, y);
    CHECK(c.cases == 2);
    CHECK(c.controls == 3);
    CHECK(c.auc_a == doctest::Approx(0.75).epsilon(1e-14));
    CHECK(c.auc_b == doctest::Approx(0.5).epsilon(1e-14));
    CHECK(c.difference == doctest::Approx(0.25).epsilon(1e-14));
    CHECK(c.variance_a == doctest::Approx(1.0 / 12).epsilon(1e-14));
    CHECK(c.variance_b == doctest::Approx(1.0 / 9).epsilon(1e-14));
    CHECK(c.covariance == doctest::Approx(-1.0 / 48).epsilon(1e-14));
    const double se = std::sqrt(17.0 / 72.0);
    CHECK(c.standard_error == doctest::Approx(se).epsilon(1e-14));
    REQUIRE(c.z);
    REQUIRE(c.p);
    CHECK(*c.z == doctest::Approx(0.25 / se).epsilon(1e-14));
    CHECK(*c.p == doctest::Approx(std::erfc(0.25 / se / std::sqrt(2.0))).epsilon(1e-12));
    CHECK(c.interval.lower == doctest::Approx(0.25 - 1.959963984540054 * se).epsilon(1e-12));
    CHECK(c.interval.upper == 1.0);
    // Swapping the scores flips the sign and nothing else.
    const PairedAucComparison swapped = paired_auc_delong(b, a, y);
    CHECK(swapped.difference == doctest::Approx(-0.25).epsilon(1e-14));
    CHECK(swapped.standard_error == doctest::Approx(se).epsilon(1e-14));
    CHECK(*swapped.p == doctest::Approx(*c.p).epsilon(1e-14));
    CHECK(swapped.interval.lower == -1.0);
}

TEST_CASE("roc.paired_delong_without_spread_is_no_test") {
    // Identical scores: every placement equal, difference exactly 0 and a
    // zero standard error; z and p are absent rather than 0/0.
    const std::vector<double> a{0.3, 0.7, 0.1, 0.7, 0.2, 0.5}, labels_as_scores{0, 1, 0, 1, 0, 1};
    const std::vector<std::uint8_t> y{0, 1, 0, 1, 0, 1};
    const PairedAucComparison same = paired_auc_delong(a, a, y);
    CHECK(same.difference == 0.0);
    CHECK(same.standard_error == 0.0);
    CHECK_FALSE(same.z);
    CHECK_FALSE(same.p);
    CHECK(same.interval.lower == 0.0);
    CHECK(same.interval.upper == 0.0);
    CHECK(same.covariance == doctest::Approx(same.variance_a).epsilon(1e-14));
    // A perfect score against a constant one: every case's placement is 1
    // against 0.5, every control's 1 against 0.5, so the difference is 0.5
    // with no spread at all: still no test (pROC would give z = infinity).
    const std::vector<double> constant(6, 4.0);
    const PairedAucComparison perfect = paired_auc_delong(labels_as_scores, constant, y);
    CHECK(perfect.auc_a == 1.0);
    CHECK(perfect.auc_b == 0.5);
    CHECK(perfect.difference == 0.5);
    CHECK(perfect.standard_error == 0.0);
    CHECK_FALSE(perfect.z);
    CHECK_FALSE(perfect.p);
}

TEST_CASE("roc.paired_delong_refuses_bad_input") {
    const std::vector<double> a{0.1, 0.2, 0.3, 0.4}, b{0.4, 0.3, 0.2, 0.1};
    const std::vector<std::uint8_t> y{0, 1, 0, 1};
    CHECK_THROWS_WITH_AS(paired_auc_delong(a, std::vector<double>{0.1, 0.2, 0.3}, y),
                         "paired_auc_delong: score_a has 4 values, score_b 3 and the labels 4; all three must "
                         "describe the same encounters",
                         std::invalid_argument);
    CHECK_THROWS_AS(paired_auc_delong(a, b, std::vector<std::uint8_t>{0, 1, 0}), std::invalid_argument);
    CHECK_THROWS_WITH_AS(paired_auc_delong(a, std::vector<double>{0.4, std::nan(""), 0.2, 0.1}, y),
                         doctest::Contains("score_b[1] is nan, not a finite number"), std::invalid_argument);
    CHECK_THROWS_WITH_AS(paired_auc_delong(std::vector<double>{0.1, 0.2, HUGE_VAL, 0.4}, b, y),
                         doctest::Contains("score_a[2] is inf"), std::invalid_argument);
    CHECK_THROWS_WITH_AS(paired_auc_delong(a, b, std::vector<std::uint8_t>{0, 0, 0, 0}),
                         doctest::Contains("got 0 cases and 4 controls"), std::invalid_argument);
    CHECK_THROWS_WITH_AS(paired_auc_delong(a, b, std::vector<std::uint8_t>{1, 1, 1, 1}),
                         doctest::Contains("got 4 cases and 0 controls"), std::invalid_argument);
    CHECK_THROWS_WITH_AS(paired_auc_delong(a, b, std::vector<std::uint8_t>{0, 1, 0, 0}),
                         doctest::Contains("at least two cases and two controls"), std::invalid_argument);
}
