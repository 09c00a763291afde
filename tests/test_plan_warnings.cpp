// Warnings about plans whose figures say more about the scenario than about
// the plans: a threshold outside the scores seen, plans with identical figures.
#include <doctest/doctest.h>

#include <limits>

#include "analysis/plan_warnings.hpp"
#include "models/population_source.hpp"
#include "report/report_run.hpp"
#include "report/run_text.hpp"

using namespace tocsin;

namespace {

Plan page(const std::string& name, double threshold, Channel channel = Channel::page) {
    Plan p;
    p.name = name;
    p.channel = channel;
    p.rule.threshold = threshold;
    return p;
}

PlanFigures figures(std::int64_t notices, std::int64_t caught, std::vector<std::int64_t> unit_shifts) {
    PlanFigures f;
    f.notices = notices;
    f.caught = caught;
    f.unit_shift_counts = std::move(unit_shifts);
    return f;
}

// The usable scores: every whole number from `lowest` to `highest`, once.
ScoreSample whole_numbers(int lowest, int highest) {
    ScoreSample s;
    for (int v = lowest; v <= highest; ++v) s.ascending.push_back(v);
    return s;
}

const ScoreSample points_seen = whole_numbers(3, 97);

// Two weeks of two small wards whose scores are probabilities (baseline
// logit -3, about 0.05), scored against thresholds of every kind.
const std::string probability_scenario =
    "scenario_schema: 1\n"
    "name: warnings\n"
    "time_zone: UTC\n"
    "seed: 5\n"
    "shifts:\n"
    "  - {name: day, starts: \"07:00\"}\n"
    "  - {name: night, starts: \"19:00\", night: true}\n"
    "outcome: {window_hours: 12}\n"
    "population:\n"
    "  generate:\n"
    "    start: 2026-01-05T00:00:00Z\n"
    "    end: 2026-01-19T00:00:00Z\n"
    "    units:\n"
    "      - {name: north, beds: 20, arrivals_per_hour: [0.25]}\n"
    "      - {name: south, beds: 20, arrivals_per_hour: [0.25]}\n"
    "    scores: {scale: probability, baseline: -3, between_patient_sd: 0.5, within_patient_sd: 0.4,"
    " drift_size: 2.5}\n"
    "plans:\n"
    "  - name: points-20\n"            // the trial's mistake turned round: points thresholds on probabilities
    "    rule: {threshold: 20, snooze_minutes: 240}\n"
    "  - name: points-30\n"
    "    rule: {threshold: 30, snooze_minutes: 240}\n"
    "  - name: prob-0.3\n"
    "    rule: {threshold: 0.3, snooze_minutes: 240}\n"
    "  - name: below\n"
    "    rule: {threshold: -1, snooze_minutes: 240}\n"
    "  - name: review-all\n"           // no floor: nothing to check
    "    channel: ranked_review\n"
    "    review: {times: [\"08:00\"], top_n: 2, scope: unit, skip_reviewed_hours: 12, minutes_per_review: 5}\n";

}  // namespace

TEST_CASE("plan_warnings.threshold_outside_the_scores_seen") {
    const std::vector<Plan> plans = {page("in-range", 50), page("at-the-top", 97), page("at-the-bottom", 3),
                                     page("above", 0.2 * 1000), page("below", 0.2),
                                     page("review-no-floor", -std::numeric_limits<double>::infinity(), Channel::ranked_review),
                                     page("review-floor-200", 200, Channel::ranked_review)};
    std::vector<PlanFigures> f;
    for (std::size_t i = 0; i < plans.size(); ++i) f.push_back(figures(static_cast<std::int64_t>(i), 0, {}));
    const PlanWarnings w = plan_warnings(plans, {points_seen}, f);
    REQUIRE(w.thresholds.size() == 3);
    CHECK(w.thresholds[0].plan == "above");
    CHECK(w.thresholds[0].above);
    CHECK(w.thresholds[0].threshold == 200);
    CHECK(w.thresholds[0].observed.lowest == 3);
    CHECK(w.thresholds[0].observed.highest == 97);
    CHECK(w.thresholds[1].plan == "below");
    CHECK_FALSE(w.thresholds[1].above);
    CHECK(w.thresholds[2].plan == "review-floor-200");  // a review's floor is a threshold like any other
    CHECK(w.identical.empty());
    // 3 is the lowest score, inside the range, but every score reaches it.
    REQUIRE(w.low_thresholds.size() == 1);
    CHECK(w.low_thresholds[0].plan == "at-the-bottom");
    // Without scores there is no range to be outside of.
    CHECK(plan_warnings(plans, {ScoreSample{}}, f).thresholds.empty());
    CHECK(plan_warnings(plans, {ScoreSample{}}, f).low_thresholds.empty());
}

TEST_CASE("plan_warnings.threshold_inside_the_scores_but_below_nearly_all_of_them") {
    // Scores 0, 1, ..., 99 (100 of them), as a 0-100 score that includes 0:
    // the range check passes any threshold from 0 to 99. Worked by hand:
    // the 5th percentile (type 1: the 5th smallest) is 4; a threshold t in
    // (k-1, k] is reached by the 100 - k scores k..99.
    const ScoreSample scores = whole_numbers(0, 99);
    CHECK(scores.percentile(0.05) == 4);
    CHECK(scores.share_at_or_above(0.2) == doctest::Approx(0.99));
    const std::vector<Plan> plans = {page("trial-0.2", 0.2), page("trial-0.4", 0.4), page("at-p5", 4),
                                     page("five", 5), page("five-and-a-half", 5.5), page("sensible-60", 60)};
    std::vector<PlanFigures> f;
    for (std::size_t i = 0; i < plans.size(); ++i) f.push_back(figures(static_cast<std::int64_t>(i), 0, {}));
    const PlanWarnings w = plan_warnings(plans, {scores}, f);
    CHECK(w.thresholds.empty());
    REQUIRE(w.low_thresholds.size() == 4);
    CHECK(w.low_thresholds[0].plan == "trial-0.2");
    CHECK(w.low_thresholds[0].share_reaching == doctest::Approx(0.99));  // 1..99
    CHECK(w.low_thresholds[0].low_percentile == 4);
    CHECK(w.low_thresholds[0].observed.lowest == 0);
    CHECK(w.low_thresholds[0].observed.highest == 99);
    CHECK(w.low_thresholds[1].plan == "trial-0.4");
    CHECK(w.low_thresholds[2].plan == "at-p5");
    CHECK(w.low_thresholds[2].share_reaching == doctest::Approx(0.96));  // 4..99
    CHECK(w.low_thresholds[3].plan == "five");
    CHECK(w.low_thresholds[3].share_reaching == doctest::Approx(0.95));  // 5..99: exactly the limit
    // 5.5 is reached by 6..99, 94 of 100: no warning, nor for 60.
    const std::vector<std::string> lines = plan_warning_lines(w);
    REQUIRE(lines.size() == 4);
    CHECK(lines[0] == "Warning: plan trial-0.2's threshold, 0.2, is at or below the 5th percentile of the usable "
                      "scores of replication 0 (4; scores 0 to 99): 99% of scores reach it, so the plan fires on "
                      "nearly every score. Is the threshold on the scores' scale?");
    // A sensible threshold alone: no warning at all.
    CHECK(plan_warnings({page("sensible-60", 60)}, {scores}, {figures(3, 1, {})}).empty());
}

TEST_CASE("plan_warnings.a_probability_threshold_on_scores_with_many_zeros") {
    // 0-100 scores, 30 in 100 of them 0 (then 1..70): the 5th percentile is
    // 0, so 0.3 is reached by 70% of scores and the percentile check is
    // silent; the threshold's scale gives it away.
    ScoreSample scores;
    scores.ascending.assign(30, 0.0);
    for (int v = 1; v <= 70; ++v) scores.ascending.push_back(v);
    scores.ascending.back() = 100;  // the top of the scale seen
    const std::vector<Plan> plans = {page("trial-0.3", 0.3), page("sensible-40", 40), page("one", 1)};
    const std::vector<PlanFigures> f = {figures(1, 0, {}), figures(2, 0, {}), figures(3, 0, {})};
    const PlanWarnings w = plan_warnings(plans, {scores}, f);
    CHECK(w.thresholds.empty());
    CHECK(w.low_thresholds.empty());
    REQUIRE(w.probability_thresholds.size() == 1);  // 1 is a whole point, not a probability
    CHECK(w.probability_thresholds[0].plan == "trial-0.3");
    CHECK(w.probability_thresholds[0].share_reaching == doctest::Approx(0.70));  // 1..69 and 100
    CHECK(plan_warning_lines(w)[0] ==
          "Warning: plan trial-0.3's threshold, 0.3, looks like a probability, but the usable scores of replication 0 "
          "run from 0 to 100, beyond 1: 70% of scores reach it. Is the threshold on the scores' scale?");
    // On probabilities (0 to 0.9) the same threshold is sensible: no warning.
    ScoreSample probabilities;
    for (int v = 0; v <= 90; ++v) probabilities.ascending.push_back(v / 100.0);
    CHECK(plan_warnings({page("prob-0.3", 0.3)}, {probabilities}, {figures(1, 0, {})}).empty());
}

TEST_CASE("plan_warnings.identical_plans_are_named_together") {
    const std::vector<Plan> plans = {page("a", 50), page("b", 60), page("c", 55), page("d", 70), page("e", 80)};
    const std::vector<PlanFigures> f = {figures(10, 2, {4, 6}), figures(7, 1, {3, 4}), figures(10, 2, {4, 6}),
                                        figures(10, 2, {6, 4}),  // same totals, other unit-shifts: not identical
                                        figures(7, 1, {3, 4})};
    const PlanWarnings w = plan_warnings(plans, {points_seen}, f);
    CHECK(w.thresholds.empty());
    REQUIRE(w.identical.size() == 2);
    CHECK(w.identical[0].plans == std::vector<std::string>{"a", "c"});
    CHECK(w.identical[1].plans == std::vector<std::string>{"b", "e"});
    // Catches alone set plans apart too.
    CHECK(plan_warnings({page("a", 50), page("b", 60)}, {points_seen}, {figures(10, 2, {4, 6}), figures(10, 3, {4, 6})})
              .empty());
    const std::vector<std::string> lines = plan_warning_lines(w);
    REQUIRE(lines.size() == 2);
    CHECK(lines[0].rfind("Warning: plans a and c gave identical figures in replication 0", 0) == 0);
    const PlanWarnings three = plan_warnings({page("x", 1), page("y", 2), page("z", 3)}, {ScoreSample{}},
                                             {figures(0, 0, {0}), figures(0, 0, {0}), figures(0, 0, {0})});
    CHECK(plan_warning_lines(three)[0].rfind("Warning: plans x, y and z gave identical figures", 0) == 0);
}

TEST_CASE("plan_warnings.a_run_warns_in_the_terminal_and_the_report") {
    const Scenario sc = parse_scenario(probability_scenario, "s.yaml", "");
    RunSettings settings;
    settings.evaluate = false;
    const RunOutput out = run_scenario(sc, population_factory(sc.population), settings);
    REQUIRE(out.warnings.thresholds.size() == 3);
    CHECK(out.warnings.thresholds[0].plan == "points-20");
    CHECK(out.warnings.thresholds[1].plan == "points-30");
    CHECK(out.warnings.thresholds[2].plan == "below");
    CHECK(out.warnings.thresholds[0].observed.highest < 1);
    // Neither points plan fires: identical, both with nothing.
    REQUIRE(out.warnings.identical.size() == 1);
    CHECK(out.warnings.identical[0].plans == std::vector<std::string>{"points-20", "points-30"});

    const std::string text = run_text(sc, out, settings);
    CHECK(text.find("Warning: plan points-20's threshold, 20, is above every usable score of replication 0 (") !=
          std::string::npos);
    CHECK(text.find("no score reaches it, so it never fires. Is the threshold on the scores' scale?\n") != std::string::npos);
    CHECK(text.find("Warning: plan below's threshold, -1, is below every usable score") != std::string::npos);
    CHECK(text.find("Warning: plans points-20 and points-30 gave identical figures in replication 0") != std::string::npos);
    CHECK(text.find("prob-0.3's threshold") == std::string::npos);
    for (const std::string& line : plan_warning_lines(out.warnings)) CHECK(line.find("review-all") == std::string::npos);
    // Before the figures, where a reader starts.
    CHECK(text.find("Warning: ") < text.find("Plans compared"));

    const std::string page_html = render_report(report_input_for_run(sc, out, settings));
    const std::size_t findings = page_html.find("<div class=\"findings\">");
    REQUIRE(findings != std::string::npos);
    CHECK(page_html.find("Warning: plans points-20 and points-30 gave identical figures", findings) != std::string::npos);
    CHECK(page_html.find("is above every usable score of replication 0", findings) != std::string::npos);
}
