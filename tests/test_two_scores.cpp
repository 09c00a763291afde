// Two scores on the same stays: reading them from a log (a column of the scores
// file or a file of their own, exclusions per score), plans choosing their
// score, and the paired comparison (analysis/score_comparison.hpp), each worked
// by hand.
#include <doctest/doctest.h>

#include <cmath>
#include <limits>

#include "analysis/results.hpp"
#include "analysis/score_comparison.hpp"
#include "models/bootstrap.hpp"
#include "report/report.hpp"
#include "report/score_comparison_tables.hpp"
#include "models/errors.hpp"
#include "models/replay.hpp"
#include "sim/simulate.hpp"
#include "study/scenario.hpp"
#include "test_support.hpp"

using namespace tocsin;
using tocsin::testing::ScratchDir;

namespace {

Instant midnight(int year, int month, int day) { return days_from_civil(year, month, day) * 86400; }

const char* encounters =
    "encounter,unit,admitted,discharged,outcome_at\n"
    "A,ward 1,2026-03-03T08:00:00Z,2026-03-05T08:00:00Z,2026-03-04T08:00:00Z\n"
    "B,ward 1,2026-03-03T09:00:00Z,2026-03-04T09:00:00Z,\n";

// A shared file: `score` (the first) and `bedside`; B's first score is blank on one row.
const char* shared_scores =
    "encounter,scored_at,available_at,score,bedside\n"
    "A,2026-03-03T12:00:00Z,2026-03-03T12:05:00Z,70,6\n"
    "A,2026-03-03T16:00:00Z,2026-03-03T16:05:00Z,,8\n"
    "B,2026-03-03T12:00:00Z,2026-03-03T12:05:00Z,40,\n"
    "B,2026-03-03T16:00:00Z,2026-03-03T16:05:00Z,45,2\n"
    "B,2026-03-04T10:00:00Z,2026-03-04T10:05:00Z,50,3\n";  // after B's discharge: excluded for both

ReplaySource shared_source(const ScratchDir& dir) {
    ReplaySource src{dir.file("enc.csv", encounters), dir.file("scores.csv", shared_scores), 0};
    src.score_name = "candidate";
    src.other_scores.push_back({.name = "bedside", .path = src.scores_path, .column = "bedside", .score_high = 20});
    return src;
}

Population two_score_population(const std::vector<std::pair<double, double>>& maxima, const std::vector<bool>& cases) {
    Population pop;
    pop.units = {"ward"};
    pop.score_name = "a";
    pop.other_scores.push_back({.name = "b"});
    pop.score_start = {0};
    pop.other_scores[0].score_start = {0};
    for (std::size_t i = 0; i < maxima.size(); ++i) {
        Encounter e{.id = "E" + std::to_string(i), .unit = 0, .admitted = 0, .discharged = 100 * 3600};
        if (cases[i]) e.outcome_at = 50 * 3600;
        pop.encounters.push_back(e);
        if (!std::isnan(maxima[i].first)) {
            pop.scores.push_back({3600, 3600, maxima[i].first});
            pop.scores.push_back({7200, 7200, -1});  // lower: the maximum is the first value
        }
        pop.score_start.push_back(pop.scores.size());
        if (!std::isnan(maxima[i].second)) pop.other_scores[0].scores.push_back({3600, 3600, maxima[i].second});
        pop.other_scores[0].score_start.push_back(pop.other_scores[0].scores.size());
    }
    return pop;
}

}  // namespace

TEST_CASE("two_scores.a_column_of_the_scores_file_is_read_with_its_own_exclusions") {
    ScratchDir dir;
    const Population pop = load_replay(shared_source(dir), TimeZone::utc());
    REQUIRE(pop.score_count() == 2);
    CHECK(pop.score_name == "candidate");
    CHECK(pop.other_scores[0].name == "bedside");
    // A (index 0): candidate 70 only (its second row is blank); bedside 6 and 8.
    REQUIRE(pop.scores_of(0).size() == 1);
    CHECK(pop.scores_of(0)[0].value == 70);
    REQUIRE(pop.scores_of(0, 1).size() == 2);
    CHECK(pop.scores_of(0, 1)[1].value == 8);
    // B: candidate 40, 45; bedside 2 (its first row is blank); the row after discharge excluded for each.
    CHECK(pop.scores_of(1).size() == 2);
    REQUIRE(pop.scores_of(1, 1).size() == 1);
    CHECK(pop.scores_of(1, 1)[0].value == 2);
    CHECK(pop.excluded.scores_by_reason.at("not recorded in this row (empty score)") == 1);
    CHECK(pop.excluded.scores_by_reason.at("available at or after discharge") == 1);
    CHECK(pop.other_scores[0].excluded_by_reason.at("not recorded in this row (empty bedside)") == 1);
    CHECK(pop.other_scores[0].excluded_by_reason.at("available at or after discharge") == 1);
    // The exclusions table names each score's own reasons.
    int named = 0;
    for (const Exclusion& x : exclusions(pop))
        if (x.what == Excluded::scores) {
            CHECK((x.reason.rfind("candidate: ", 0) == 0 || x.reason.rfind("bedside: ", 0) == 0));
            ++named;
        }
    CHECK(named == 4);
    CHECK(score_index(pop, "bedside") == std::optional<std::size_t>(1));
    CHECK(score_index(pop, "candidate") == std::optional<std::size_t>(0));
    CHECK_FALSE(score_index(pop, "other").has_value());
    // One score alone, under its own name, with its own exclusions.
    const Population bedside = with_only_score(pop, 1);
    CHECK(bedside.score_count() == 1);
    CHECK(bedside.score_name == "bedside");
    CHECK(bedside.scores.size() == 3);
    CHECK(bedside.excluded.scores_by_reason.count("not recorded in this row (empty bedside)") == 1);
}

TEST_CASE("two_scores.a_file_of_its_own_and_errors_name_the_score_column") {
    ScratchDir dir;
    ReplaySource src{dir.file("enc.csv", encounters),
                     dir.file("scores.csv", "encounter,scored_at,available_at,score\n"
                                            "A,2026-03-03T12:00:00Z,,70\n"),
                     0};
    src.score_name = "candidate";
    src.other_scores.push_back(
        {.name = "bedside", .path = dir.file("bedside.csv", "encounter,scored_at,available_at,bedside\n"
                                                           "A,2026-03-03T12:00:00Z,,6\n"
                                                           "B,2026-03-03T12:00:00Z,,25\n"),
         .column = "bedside", .score_high = 20});
    try {
        load_replay(src, TimeZone::utc());
        FAIL("expected an error");
    } catch (const InputError& e) {
        CHECK(e.file == src.other_scores[0].path);
        CHECK(e.line == 3);
        CHECK(e.column == 4);
        CHECK(e.field == "bedside");
        CHECK(std::string(e.what()).find("outside score_range [0, 20]") != std::string::npos);
    }
    // Skipped rows are counted under the file's own name.
    src.bad_rows = BadRows::skip;
    const Population pop = load_replay(src, TimeZone::utc());
    CHECK(pop.excluded.rows_skipped.at("bedside.csv: score outside score_range").count == 1);
    CHECK(pop.scores_of(0, 1).size() == 1);
    // An empty value in a file of one score is still a bad row there.
    src.other_scores[0].path = dir.file("b2.csv", "encounter,scored_at,available_at,bedside\nA,2026-03-03T12:00:00Z,,\n");
    src.bad_rows = BadRows::stop;
    CHECK_THROWS_AS(load_replay(src, TimeZone::utc()), InputError);
}

TEST_CASE("two_scores.a_bootstrap_replication_carries_every_score_of_the_stays_it_copies") {
    ScratchDir dir;
    const Population log = load_replay(shared_source(dir), TimeZone::utc());
    BootstrapConfig config;
    config.block_days = 1;
    config.warm_up_days = 0;
    config.tail_days = 0;
    config.same_weekday = false;
    const Population copy = bootstrap_population(log, config, 7, 1);
    REQUIRE(copy.score_count() == 2);
    CHECK(copy.other_scores[0].name == "bedside");
    CHECK(copy.other_scores[0].score_start.size() == copy.encounters.size() + 1);
    // Every copied stay keeps both its scores: a copy of A has 1 and 2 values, of B 2 and 1.
    for (std::size_t e = 0; e < copy.encounters.size(); ++e) {
        const bool is_a = copy.encounters[e].id.rfind("A", 0) == 0;
        CHECK(copy.scores_of(e).size() == (is_a ? 1u : 2u));
        CHECK(copy.scores_of(e, 1).size() == (is_a ? 2u : 1u));
    }
}

TEST_CASE("two_scores.a_plan_reads_the_score_it_names") {
    // Stay A's candidate score never reaches 60; its bedside score does (8 >= 7).
    ScratchDir dir;
    const Population pop = load_replay(shared_source(dir), TimeZone::utc());
    SimulationSetup setup;
    Plan on_first{.name = "first-60", .channel = Channel::page, .role = "responder"};
    on_first.rule.threshold = 75;
    Plan on_bedside = on_first;
    on_bedside.name = "bedside-7";
    on_bedside.score = 1;
    on_bedside.rule.threshold = 7;
    setup.plans = {on_first, on_bedside};
    setup.shifts = ShiftPattern{{7 * 60, 19 * 60}, {"day", "night"}, {false, true}};
    const ShiftCalendar calendar(setup.shifts, TimeZone::utc(), midnight(2026, 3, 1), midnight(2026, 3, 8));
    const ReplicationRecord record = simulate_replication(setup, pop, calendar, 0, 1);
    CHECK(record.plans[0].notices.empty());
    REQUIRE(record.plans[1].notices.size() == 1);
    CHECK(record.plans[1].notices[0].score == 8);
    CHECK(record.plans[1].occasions == 3);  // the bedside values it saw
}

TEST_CASE("two_scores.scenario_keys_are_checked") {
    const std::string head = R"(scenario_schema: 1
name: t
time_zone: UTC
score_name: candidate
shifts: [{name: day, starts: "07:00"}]
outcome: {window_hours: 24}
)";
    const std::string plans = "plans:\n  - {name: p, score: nope, rule: {threshold: 5}}\n";
    const auto e = testing::scenario_error(head + R"(population:
  replay: {encounters: e.csv, scores: s.csv}
  other_scores:
    - {name: bedside, column: bedside}
)" + plans);
    CHECK(e.field.find("score") != std::string::npos);
    CHECK(std::string(e.what()).find("candidate, bedside") != std::string::npos);
    const auto twice = testing::scenario_error(head + R"(population:
  replay: {encounters: e.csv, scores: s.csv}
  other_scores:
    - {name: candidate, column: bedside}
)" + plans);
    CHECK(std::string(twice.what()).find("first score's name") != std::string::npos);
    const auto same_column = testing::scenario_error(head + R"(population:
  replay: {encounters: e.csv, scores: s.csv}
  other_scores:
    - {name: bedside}
)" + plans);
    CHECK(same_column.field.find("column") != std::string::npos);
}

TEST_CASE("two_scores.threshold_flagging_matches_the_count_as_near_as_the_values_allow") {
    const double nan = std::numeric_limits<double>::quiet_NaN();
    const std::vector<double> v{1, 2, 2, 2, 3, 5, nan};
    CHECK(threshold_flagging(v, 1) == 5);  // exactly one value >= 5
    CHECK(threshold_flagging(v, 2) == 3);  // 3 and 5
    // 3 wanted: ">= 3" flags 2 values, ">= 2" flags 5; |3 - 2| = 1 < |5 - 3| = 2, so ">= 3".
    CHECK(threshold_flagging(v, 3) == 3);
    CHECK(threshold_flagging(v, 4) == 2);  // |4-2| = 2 against |5-4| = 1: ">= 2"
    CHECK(threshold_flagging(v, 6) == 1);
    CHECK(std::isinf(threshold_flagging(v, 0)));
    CHECK(threshold_flagging({1, 3}, 1) == 3);
}

TEST_CASE("two_scores.paired_comparison_worked_by_hand") {
    const double nan = std::numeric_limits<double>::quiet_NaN();
    // Six stays with both scores, one with score a only, one with b only.
    // (a, b, case):
    const std::vector<std::pair<double, double>> maxima{{9, 2}, {8, 7}, {3, 6}, {7, 1}, {2, 3}, {1, 5}, {4, nan}, {nan, 4}};
    const std::vector<bool> cases{true, true, true, false, false, false, false, true};
    const Population pop = two_score_population(maxima, cases);
    Plan plan{.name = "a-7", .channel = Channel::page};
    plan.rule.threshold = 7;
    ScoreComparisonOptions options;
    options.evaluations_per_case = {5};
    const ScoreComparison c = compare_scores(pop, {plan}, options);
    REQUIRE(c.auc.size() == 1);
    const ScorePairAuc& a = c.auc[0];
    CHECK(a.stays == 6);
    CHECK(a.cases == 3);
    CHECK(a.only_first == 1);
    CHECK(a.only_other == 1);
    REQUIRE(a.test.has_value());
    // AUC of a over the 9 case-control pairs: cases 9, 8, 3 against controls 7, 2, 1:
    // 9 and 8 beat all three, 3 beats 2 and 1: 8 / 9. Of b: cases 2, 7, 6 against 1, 3, 5:
    // 2 beats 1; 7 and 6 beat all three: 7 / 9.
    CHECK(a.test->auc_a == doctest::Approx(8.0 / 9.0).epsilon(1e-12));
    CHECK(a.test->auc_b == doctest::Approx(7.0 / 9.0).epsilon(1e-12));
    REQUIRE(c.thresholds.size() == 1);
    const ThresholdComparison& x = c.thresholds[0];
    // a >= 7 flags 9, 8 (cases) and 7 (control): 3 stays. b's three highest: 7, 6, 5: b >= 5.
    CHECK(x.matched_threshold == 5);
    // Cases: stay 0 (a only), 1 (both), 2 (b only). Non-cases: 3 (a only), 5 (b only), 4 neither.
    CHECK(x.cases_by == FlagCounts{1, 1, 1, 0});
    CHECK(x.non_cases_by == FlagCounts{0, 1, 1, 1});
    // N = 5: pt = 0.2, odds 0.25. a: TP 2, FP 1; b: TP 2, FP 1: net benefit (2 - 0.25) / 6 each.
    CHECK(x.net_benefit_plan == doctest::Approx(1.75 / 6).epsilon(1e-12));
    CHECK(x.net_benefit_other == doctest::Approx(1.75 / 6).epsilon(1e-12));
    CHECK(x.difference == doctest::Approx(0).epsilon(1e-12));
    CHECK(x.difference_interval.lower <= 0);
    CHECK(x.difference_interval.upper >= 0);
    // One score: nothing to compare.
    CHECK(compare_scores(with_only_score(pop, 0), {plan}, options).auc.empty());
}

TEST_CASE("two_scores.the_resampled_interval_has_the_spread_of_resampling_stays") {
    // 400 stays in the four cells that move the difference, and 600 alike.
    // Resampling stays, the difference D = (1/n) sum X_i with X the stay's
    // share; its standard deviation is sqrt(Var(X) / n). The 95% percentile
    // interval's width over 2 x 1.96 estimates it; with 20,000 resamples that
    // estimate's relative error is about 1 / sqrt(2 x 20,000) = 0.5% for the
    // SD, more for percentiles (about 1.5%); 5% is over three of those.
    std::vector<std::pair<double, double>> maxima;
    std::vector<bool> cases;
    auto add = [&](int n, double a, double b, bool c) {
        for (int i = 0; i < n; ++i) {
            maxima.emplace_back(a, b);
            cases.push_back(c);
        }
    };
    add(150, 9, 1, true);    // case, plan's score only
    add(50, 1, 9, true);     // case, other only
    add(120, 9, 1, false);   // non-case, plan's score only
    add(80, 1, 9, false);    // non-case, other only
    add(100, 9, 9, true);    // alike
    add(500, 1, 1, false);
    const Population pop = two_score_population(maxima, cases);
    Plan plan{.name = "a-5", .channel = Channel::page};
    plan.rule.threshold = 5;
    ScoreComparisonOptions options;
    options.evaluations_per_case = {5};
    options.resamples = 20000;
    const ScoreComparison c = compare_scores(pop, {plan}, options);
    REQUIRE(c.thresholds.size() == 1);
    const ThresholdComparison& x = c.thresholds[0];
    CHECK(x.matched_threshold == 9);
    const double n = 1000, odds = 0.25;
    const std::vector<std::pair<double, double>> cells{{150, 1}, {50, -1}, {120, -odds}, {80, odds}};
    double mean = 0, square = 0;
    for (auto [count, share] : cells) {
        mean += count / n * share;
        square += count / n * share * share;
    }
    CHECK(x.difference == doctest::Approx(mean).epsilon(1e-12));
    const double sd = std::sqrt((square - mean * mean) / n);
    const double width = x.difference_interval.upper - x.difference_interval.lower;
    CHECK(width / (2 * 1.959964) == doctest::Approx(sd).epsilon(0.05));
}

TEST_CASE("two_scores.each_plan_on_another_score_meets_the_first_scores_plan_nearest_in_burden") {
    // Plans A1, A2 on the first score, B1 on the other, P (a handoff list) on
    // the first score but another channel. Three replications of (burden, caught):
    const std::size_t burden = metric_index(*find_metric("per_unit_night_mean"));
    const std::size_t benefit = metric_index(*find_metric("caught"));
    const std::vector<std::vector<std::pair<double, double>>> values{
        {{1, 10}, {1, 12}, {1, 14}},  // A1: mean burden 1
        {{3, 20}, {3, 22}, {3, 21}},  // A2: mean burden 3
        {{2.5, 15}, {2.5, 16}, {2.5, 20}},  // B1: mean burden 2.5, nearest A2
        {{2.4, 30}, {2.4, 30}, {2.4, 30}},  // H: nearer still, but another channel
    };
    ReplicatedFigures f;
    f.plans = {"A1", "A2", "B1", "H"};
    f.replications = 3;
    f.values.assign(4, std::vector<std::vector<double>>(plan_metrics().size(), std::vector<double>(3, 0)));
    for (std::size_t p = 0; p < 4; ++p)
        for (std::size_t r = 0; r < 3; ++r) {
            f.values[p][burden][r] = values[p][r].first;
            f.values[p][benefit][r] = values[p][r].second;
        }
    std::vector<Plan> plans(4);
    for (std::size_t p = 0; p < 4; ++p) plans[p].name = f.plans[p];
    plans[2].score = 1;
    plans[3].channel = Channel::handoff_list;
    const auto matched = matched_plans(f, plans, {"a", "b"}, burden, benefit);
    REQUIRE(matched.size() == 1);
    CHECK(matched[0].plan == "B1");
    CHECK(matched[0].versus == "A2");
    CHECK(matched[0].plan_score == "b");
    CHECK(matched[0].burden_difference.mean == doctest::Approx(-0.5));
    // caught, B1 - A2 by replication: -5, -6, -1: mean -4, sd sqrt(7), t(0.975, 2) = 4.303 (Student's t table):
    // -4 -/+ 4.303 x sqrt(7 / 3).
    CHECK(matched[0].benefit_difference.mean == doctest::Approx(-4));
    CHECK(matched[0].benefit_difference.low == doctest::Approx(-4 - 4.302653 * std::sqrt(7.0 / 3)).epsilon(1e-5));
    CHECK(matched[0].benefit_difference.high == doctest::Approx(-4 + 4.302653 * std::sqrt(7.0 / 3)).epsilon(1e-5));
}

TEST_CASE("two_scores.the_report_draws_both_decision_curves_only_for_probabilities") {
    ScoreComparison c;
    c.auc.push_back({.first = "a", .other = "b"});
    Evaluation first, other;
    ReportInput without;
    add_score_comparison(without, c, first, {other}, "basis", {}, "");
    CHECK_FALSE(without.score_comparison_curves.has_value());
    CHECK(without.score_comparison_note.find("Decision curves need each score read as a probability") != std::string::npos);
    REQUIRE(without.score_comparison_roc.has_value());
    CHECK(without.score_comparison_roc->curves.size() == 2);
    CHECK(without.score_comparison_roc->curves[1].dashed);
    DecisionCurveResult curve;
    curve.points = {DecisionCurvePoint{.threshold_probability = 0.1, .net_benefit_model = 0.02, .net_benefit_treat_all = 0.01},
                    DecisionCurvePoint{.threshold_probability = 0.2, .net_benefit_model = 0.01, .net_benefit_treat_all = -0.05}};
    first.decision_curve = curve;
    other.decision_curve = curve;
    ReportInput with;
    add_score_comparison(with, c, first, {other}, "basis", {}, "");
    REQUIRE(with.score_comparison_curves.has_value());
    REQUIRE(with.score_comparison_curves->curves.size() == 4);  // a, b, evaluate everyone, no one
    CHECK(with.score_comparison_curves->curves[1].name == "b");
    CHECK(with.score_comparison_curves->curves[1].dashed);
    CHECK(with.score_comparison_note.find("Decision curves need") == std::string::npos);
}
