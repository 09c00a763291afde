// Loading the chart, handoff and review channels: each channel's own section,
// and rule clauses that make no sense for a channel rejected with the reason.
#include <doctest/doctest.h>

#include "models/errors.hpp"
#include "study/scenario.hpp"

using namespace tocsin;

namespace {

// A minimal valid scenario whose one plan is given; without `extra` the plan's keys start on line 12.
std::string scenario_text(const std::string& plan, const std::string& extra = "") {
    return "scenario_schema: 1\n"                                 // 1
           "name: test\n"                                         // 2
           "time_zone: UTC\n"                                     // 3
           "shifts:\n"                                            // 4
           "  - {name: day, starts: \"07:00\"}\n"                 // 5
           "  - {name: night, starts: \"19:00\", night: true}\n"  // 6
           "outcome: {window_hours: 12}\n"                        // 7
           "population:\n"                                        // 8
           "  replay: {encounters: e.csv, scores: s.csv}\n"       // 9
           + extra +                                              // optional top-level sections
           "plans:\n"
           "  - name: p\n" + plan;
}

const std::string openings =
    "chart_openings:\n"
    "  roles: [{name: nurse, clinicians_per_unit: 4, openings_per_hour: [1.5]}, {name: doctor, openings_per_hour: [0.1]}]\n";

std::string error_of(const std::string& text) {
    try {
        parse_scenario(text, "s.yaml", "");
    } catch (const InputError& e) {
        return e.what();
    }
    return "no error";
}

}  // namespace

TEST_CASE("channel_scenario.valid") {
    SUBCASE("chart interruption") {
        const Scenario sc = parse_scenario(
            scenario_text("    channel: chart_interruption\n    role: doctor\n    rule: {threshold: 60, quiet_from: \"01:00\", quiet_until: \"05:00\"}\n"
                          "    chart: {interruption_minutes: 2, acceptance_probability: 0.4}\n",
                          openings),
            "s.yaml", "");
        REQUIRE(sc.simulation.chart_openings);
        CHECK(sc.simulation.chart_openings->replay_path.empty());
        CHECK(sc.simulation.chart_openings->roles[0].openings_per_hour[13] == 1.5);
        CHECK(sc.simulation.chart_openings->roles[1].clinicians_per_unit == 1);
        CHECK(sc.simulation.plans[0].chart.role == 1);
        CHECK(sc.simulation.plans[0].chart.acceptance_probability == 0.4);
    }
    SUBCASE("handoff list: shift starts by default") {
        const Scenario sc = parse_scenario(
            scenario_text("    channel: handoff_list\n    rule: {threshold: 55, snooze_minutes: 720}\n    handoff: {minutes_per_flag: 3}\n"),
            "s.yaml", "");
        CHECK(sc.simulation.plans[0].handoff.times_minutes.empty());
        CHECK(sc.simulation.plans[0].handoff.follow_up_probability == 1);
    }
    SUBCASE("ranked review: the floor is optional; team capacity from staffing") {
        // 2 clinicians x 60 minutes / 15 minutes per review = 8 reviews per round.
        const Scenario sc = parse_scenario(
            scenario_text("    channel: ranked_review\n"
                          "    review: {times: [\"20:00\", \"08:00\"], top_n: 12, scope: hospital, skip_reviewed_hours: 24,\n"
                          "             minutes_per_review: 15, team_size: 2, team_minutes_per_round: 60}\n"),
            "s.yaml", "");
        const Plan& p = sc.simulation.plans[0];
        CHECK(std::isinf(p.rule.threshold));
        CHECK(p.review.times_minutes == std::vector<int>{8 * 60, 20 * 60});
        CHECK(p.review.scope == ReviewScope::hospital);
        CHECK(p.review.skip_reviewed == hours(24));
        CHECK_FALSE(p.rule.snooze);  // the skip is the review's own setting, not the rule's snooze
        CHECK(p.review.max_reviews_per_round == 8);
    }
}

TEST_CASE("channel_scenario.clauses_that_make_no_sense") {
    const std::string review = "    channel: ranked_review\n    review: {times: [\"08:00\"], top_n: 5, minutes_per_review: 10}\n";
    CHECK(error_of(scenario_text(review + "    rule: {threshold: 50, quiet_from: \"22:00\", quiet_until: \"06:00\"}\n"))
              .find("a ranked review happens only at its review.times, so quiet hours do not apply") != std::string::npos);
    CHECK(error_of(scenario_text(review + "    rule: {threshold: 50, snooze_minutes: 60}\n"))
              .find("skips recently reviewed patients with review.skip_reviewed_hours") != std::string::npos);
    CHECK(error_of(scenario_text(review + "    rule: {threshold: 50, max_per_shift: 1}\n"))
              .find("a patient is reviewed at most once per round") != std::string::npos);
    const std::string handoff = "    channel: handoff_list\n    handoff: {minutes_per_flag: 2}\n";
    const std::string e = error_of(scenario_text(handoff + "    rule: {threshold: 50, max_per_shift: 2}\n"));
    CHECK(e.find("s.yaml:14:") == 0);  // at the rule, line 14
    CHECK(e.find("plans[0].rule.max_per_shift: a handoff list flags a patient at most once per handoff") != std::string::npos);
    CHECK(error_of(scenario_text(handoff + "    rule: {threshold: 50, quiet_from: \"22:00\", quiet_until: \"06:00\"}\n"))
              .find("quiet hours do not apply; leave a time out of handoff.times") != std::string::npos);
}

TEST_CASE("channel_scenario.sections_and_roles") {
    // Each channel needs its own section and refuses the others'.
    CHECK(error_of(scenario_text("    channel: handoff_list\n    rule: {threshold: 50}\n"))
              .find("a handoff_list plan needs a 'handoff' section") != std::string::npos);
    CHECK(error_of(scenario_text("    rule: {threshold: 50}\n    review: {times: [\"08:00\"], top_n: 5, minutes_per_review: 10}\n"))
              .find("a 'review' section applies only to channel ranked_review, not page") != std::string::npos);
    CHECK(error_of(scenario_text("    channel: pager\n    rule: {threshold: 50}\n")).find("unknown channel 'pager'") !=
          std::string::npos);
    // A page still needs a threshold; a review does not.
    CHECK(error_of(scenario_text("    rule: {persistence: 2}\n")).find("required key 'threshold' is missing") != std::string::npos);
    CHECK(error_of(scenario_text("    channel: handoff_list\n    handoff: {minutes_per_flag: 2}\n"))
              .find("required key 'rule' is missing") != std::string::npos);
    // Chart interruptions need chart openings, and a role among them.
    const std::string chart = "    channel: chart_interruption\n    rule: {threshold: 50}\n    chart: {interruption_minutes: 1}\n";
    CHECK(error_of(scenario_text(chart)).find("needs the top-level chart_openings section") != std::string::npos);
    CHECK(error_of(scenario_text(chart + "    role: porter\n", openings)).find("role must be one of the chart_openings roles") !=
          std::string::npos);
    CHECK(error_of(scenario_text(chart, "chart_openings:\n  roles: [{name: nurse}]\n"))
              .find("generated chart openings need a rate for each role") != std::string::npos);
    CHECK(error_of(scenario_text(chart, "chart_openings:\n  roles: [{name: nurse, openings_per_hour: [1, 2]}]\n"))
              .find("expected one rate (all day) or 24 rates") != std::string::npos);
    CHECK(error_of(scenario_text(chart, "chart_openings:\n  replay: o.csv\n  roles: [{name: nurse}]\n")) == "no error");
    // Review capacity: one way or the other, and complete.
    const std::string r = "    channel: ranked_review\n    review: {times: [\"08:00\"], top_n: 5, minutes_per_review: 10, ";
    CHECK(error_of(scenario_text(r + "max_reviews_per_round: 4, team_size: 2, team_minutes_per_round: 30}\n"))
              .find("either as max_reviews_per_round or as team_size") != std::string::npos);
    CHECK(error_of(scenario_text(r + "team_size: 2}\n")).find("needs both team_size and team_minutes_per_round") !=
          std::string::npos);
    CHECK(error_of(scenario_text(r + "scope: ward}\n")).find("unknown scope 'ward' (expected: unit or hospital)") !=
          std::string::npos);
    CHECK(error_of(scenario_text("    channel: ranked_review\n    review: {times: [\"8am\"], top_n: 5, minutes_per_review: 10}\n"))
              .find("expected a list of local times of day") != std::string::npos);
}

TEST_CASE("channel_scenario.score_lookup") {
    SUBCASE("read: minutes per look-up, probability by hour, the role among the openers") {
        const Scenario sc = parse_scenario(
            scenario_text("    channel: score_lookup\n    role: nurse\n    rule: {threshold: 60, snooze_minutes: 240}\n"
                          "    lookup: {minutes_per_lookup: 0.5, probability: [0.2]}\n",
                          openings),
            "s.yaml", "");
        const Plan& p = sc.simulation.plans[0];
        CHECK(p.channel == Channel::score_lookup);
        CHECK(p.chart.role == 0);
        CHECK(p.chart.interruption_minutes == 0.5);
        CHECK(p.chart.lookup_probability[0] == 0.2);
        CHECK(p.chart.lookup_probability[23] == 0.2);
    }
    const std::string lookup = "    channel: score_lookup\n    rule: {threshold: 50}\n";
    CHECK(error_of(scenario_text(lookup, openings)).find("a score_lookup plan needs a 'lookup' section") != std::string::npos);
    CHECK(error_of(scenario_text(lookup + "    lookup: {minutes_per_lookup: 1, probability: [0.5]}\n"))
              .find("a score_lookup plan needs the top-level chart_openings section") != std::string::npos);
    const std::string e = error_of(scenario_text(lookup + "    lookup: {minutes_per_lookup: 1, probability: [1.5]}\n", openings));
    CHECK(e.find("plans[0].lookup.probability: rates must be between 0 and 1") != std::string::npos);
    CHECK(error_of(scenario_text("    channel: score_lookup\n    rule: {threshold: 50, quiet_from: \"22:00\", quiet_until: \"06:00\"}\n"
                                 "    lookup: {minutes_per_lookup: 1, probability: [0.5]}\n",
                                 openings))
              .find("a look-up interrupts nobody, so quiet hours do not apply") != std::string::npos);
    CHECK(error_of(scenario_text(lookup + "    chart: {interruption_minutes: 1}\n    lookup: {minutes_per_lookup: 1, probability: [0.5]}\n",
                                 openings))
              .find("a 'chart' section applies only to channel chart_interruption, not score_lookup") != std::string::npos);
}
