// Net benefit and decision curve (Vickers & Elkin 2006, Med Decis Making
// 26:565-574): NB = TP/n - FP/n * pt / (1 - pt).
#include <doctest/doctest.h>

#include <vector>

#include "analysis/net_benefit.hpp"
#include "report/evaluation_tables.hpp"

using namespace tocsin;

TEST_CASE("net_benefit.hand_built_table") {
    // Ten patients, predicted probability and outcome:
    //   p: 0.05 0.10 0.15 0.20 0.25 0.30 0.40 0.50 0.60 0.80
    //   y:    0    0    0    1    0    0    1    0    1    1
    // Prevalence 4/10.
    //
    // pt = 0.20: act on p >= 0.20 -> 0.20(y) 0.25 0.30 0.40(y) 0.50 0.60(y) 0.80(y)
    //   TP 4, FP 3; exchange rate 0.2/0.8 = 0.25
    //   NB model     = 4/10 - 3/10 x 0.25 = 0.4 - 0.075 = 0.325
    //   NB treat all = 4/10 - 6/10 x 0.25 = 0.4 - 0.15  = 0.25
    // pt = 0.50 (evaluate up to N = 2 per case found): act on p >= 0.5 -> 0.50 0.60(y) 0.80(y)
    //   TP 2, FP 1; exchange rate 0.5/0.5 = 1
    //   NB model     = 2/10 - 1/10 = 0.1
    //   NB treat all = 4/10 - 6/10 = -0.2
    const std::vector<double> p{0.05, 0.10, 0.15, 0.20, 0.25, 0.30, 0.40, 0.50, 0.60, 0.80};
    const std::vector<std::uint8_t> y{0, 0, 0, 1, 0, 0, 1, 0, 1, 1};
    const std::vector<double> pt{0.20, threshold_probability_from_evaluations_per_case(2.0)};
    const auto curve = decision_curve(p, y, pt);
    REQUIRE(curve.size() == 2);
    CHECK(curve[0].true_positives == 4);
    CHECK(curve[0].false_positives == 3);
    CHECK(curve[0].net_benefit_model == doctest::Approx(0.325));
    CHECK(curve[0].net_benefit_treat_all == doctest::Approx(0.25));
    CHECK(curve[0].net_benefit_treat_none == 0.0);
    CHECK(curve[1].threshold_probability == 0.5);
    CHECK(curve[1].true_positives == 2);
    CHECK(curve[1].false_positives == 1);
    CHECK(curve[1].net_benefit_model == doctest::Approx(0.1));
    CHECK(curve[1].net_benefit_treat_all == doctest::Approx(-0.2));

    const Table t = decision_curve_table(curve, 10, {"grid", "evaluations_per_case"}, "dc", "dc");
    REQUIRE(t.rows.size() == 2);
    CHECK(std::get<double>(t.rows[1][2]) == doctest::Approx(2.0));  // evaluations_per_case
    CHECK(std::get<std::string>(t.rows[1][0]) == "evaluations_per_case");
}

TEST_CASE("net_benefit.counts_for_a_plan") {
    // A plan that evaluated 30 patients of 200, catching 6 of the 10 cases:
    // TP 6, FP 24. At pt = 1/5 (willing to evaluate 5 per case found) the
    // exchange rate is 0.25: NB = 6/200 - 24/200 x 0.25 = 0.03 - 0.03 = 0.
    CHECK(net_benefit(6, 24, 200, threshold_probability_from_evaluations_per_case(5.0)) == doctest::Approx(0.0));
    CHECK_THROWS(threshold_probability_from_evaluations_per_case(1.0));
    CHECK_THROWS(net_benefit(1, 1, 10, 0.0));
}
