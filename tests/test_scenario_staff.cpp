// Staff in the scenario file: roles with rosters by shift name, minutes per
// task, escalation edges, and each plan's queue. Errors point at file:line.
#include <doctest/doctest.h>

#include "models/errors.hpp"
#include "study/scenario.hpp"
#include "test_support.hpp"

using namespace tocsin;

namespace {

// A minimal scenario with staff; without `plan_extra` (appended to the one
// plan) "roles:" is line 14 and the first role starts at line 15; `tail`
// comes after the roles.
std::string scenario_with(const std::string& roles, const std::string& plan_extra = "", const std::string& tail = "") {
    return "scenario_schema: 1\n"                                 // 1
           "name: test\n"                                         // 2
           "time_zone: UTC\n"                                     // 3
           "shifts:\n"                                            // 4
           "  - {name: day, starts: \"07:00\"}\n"                 // 5
           "  - {name: night, starts: \"19:00\", night: true}\n"  // 6
           "outcome: {window_hours: 12}\n"                        // 7
           "population:\n"                                        // 8
           "  replay: {encounters: e.csv, scores: s.csv}\n"       // 9
           "plans:\n"                                             // 10
           "  - name: p\n"                                        // 11
           "    role: ward nurse\n"                               // 12
           "    rule: {threshold: 60}\n"                          // 13
           + plan_extra +                                         //
           "roles:\n" + roles + tail;                            // 14
}

const std::string two_roles =
    "  - name: ward nurse\n"
    "    team: each_unit\n"
    "    roster: {night: 1, day: 3}\n"
    "    roster_by_weekday: {sunday: {day: 2, night: 1}}\n"
    "    minutes: {distribution: gamma, mean: 12, sd: 6}\n"
    "  - name: charge nurse\n"
    "    roster: {day: 1, night: 1}\n"
    "    minutes: {distribution: empirical, values: [5, 10, 20]}\n";

InputError load_error(const std::string& text) { return tocsin::testing::scenario_error(text); }

}  // namespace

TEST_CASE("scenario.staff_valid") {
    const Scenario sc = parse_scenario(
        scenario_with(two_roles, "    queue: priority\n    at_shift_end: drop\n",
                      "escalation:\n  - {from: ward nurse, to: charge nurse, after_minutes: 15}\n"),
        "s.yaml", "");
    REQUIRE(sc.simulation.roles.size() == 2);
    CHECK(sc.simulation.roles[0].per_unit);
    CHECK(sc.simulation.roles[0].roster.by_shift == std::vector<int>{3, 1});  // by shift name, in shift order
    REQUIRE(sc.simulation.roles[0].roster.by_weekday.size() == 7);
    CHECK(sc.simulation.roles[0].roster.by_weekday[6] == std::vector<int>{2, 1});  // Sunday
    CHECK(sc.simulation.roles[0].roster.by_weekday[0] == std::vector<int>{3, 1});  // Monday falls back to roster
    CHECK(std::get<GammaMinutes>(sc.simulation.roles[0].minutes_per_task).sd_minutes == 6);
    CHECK(std::get<EmpiricalMinutes>(sc.simulation.roles[1].minutes_per_task).minutes == std::vector<double>{5, 10, 20});
    CHECK_FALSE(sc.simulation.roles[1].per_unit);
    CHECK(sc.simulation.plans[0].staffing.first_role == 0);
    CHECK(sc.simulation.plans[0].staffing.discipline == QueueDiscipline::priority_by_score);
    CHECK(sc.simulation.plans[0].staffing.at_shift_end == ShiftEndPolicy::drop);
    REQUIRE(sc.simulation.escalation.next(0).has_value());
    CHECK(sc.simulation.escalation.next(0)->timeout_seconds == 15 * 60);
    const std::string text = describe_scenario(sc);
    CHECK(text.find("escalation: ward nurse -(15 min)-> charge nurse; worst case 15 min to reach charge nurse") !=
          std::string::npos);
    CHECK(text.find("ward nurse (a team on each unit): day 3, night 1; sunday day 2, night 1; gamma") != std::string::npos);
}

TEST_CASE("scenario.staff_errors") {
    SUBCASE("a roster names a shift that does not exist") {
        const InputError e = load_error(scenario_with("  - name: ward nurse\n"                    // 15
                                                      "    roster: {day: 3, evening: 1}\n"        // 16
                                                      "    minutes: {distribution: fixed, minutes: 10}\n"));
        CHECK(e.line == 16);
        CHECK(std::string(e.what()).find("unknown shift 'evening' (declared shifts: day, night)") != std::string::npos);
    }
    SUBCASE("a roster leaves a shift out") {
        const InputError e = load_error(scenario_with("  - name: ward nurse\n"
                                                      "    roster: {day: 3}\n"
                                                      "    minutes: {distribution: fixed, minutes: 10}\n"));
        CHECK(std::string(e.what()).find("no headcount for shift 'night'") != std::string::npos);
    }
    SUBCASE("a key the distribution does not use") {
        const InputError e = load_error(scenario_with("  - name: ward nurse\n"
                                                      "    roster: {day: 3, night: 1}\n"
                                                      "    minutes: {distribution: gamma, mean: 10, median: 8}\n"));  // 17
        CHECK(e.line == 17);
        CHECK(std::string(e.what()).find("'median' is not used by the gamma distribution (it takes: mean, sd)") !=
              std::string::npos);
    }
    SUBCASE("a plan names an undeclared role") {
        const InputError e = load_error(scenario_with("  - name: ward nurses\n"
                                                      "    roster: {day: 3, night: 1}\n"
                                                      "    minutes: {distribution: fixed, minutes: 10}\n"));
        CHECK(e.line == 12);
        CHECK(std::string(e.what()).find("unknown role 'ward nurse'; did you mean 'ward nurses'?") != std::string::npos);
    }
    SUBCASE("an escalation cycle points at its first edge and names every edge") {
        const InputError e = load_error(scenario_with(two_roles, "",
                                                      "escalation:\n"                                                // 23
                                                      "  - {from: ward nurse, to: charge nurse, after_minutes: 15}\n"  // 24
                                                      "  - {from: charge nurse, to: ward nurse, after_minutes: 10}\n"));
        CHECK(e.line == 24);
        CHECK(e.field == "escalation");
        CHECK(std::string(e.what()).find("escalation cycle 'ward nurse' -> 'charge nurse' -> 'ward nurse'") !=
              std::string::npos);
    }
    SUBCASE("an escalation ending at a role nobody staffs") {
        const InputError e = load_error(scenario_with(two_roles +
                                                          "  - name: night matron\n"
                                                          "    roster: {day: 0, night: 0}\n"
                                                          "    minutes: {distribution: fixed, minutes: 10}\n",
                                                      "",
                                                      "escalation:\n"
                                                      "  - {from: charge nurse, to: night matron, after_minutes: 20}\n"));
        CHECK(std::string(e.what()).find("ends at role 'night matron', which has nobody on any shift") !=
              std::string::npos);
    }
    SUBCASE("queue without roles") {
        std::string text = scenario_with("");
        text = text.substr(0, text.find("roles:\n"));
        text.insert(text.find("    rule:"), "    queue: priority\n");
        CHECK(std::string(load_error(text).what()).find("needs roles") != std::string::npos);
    }
}

TEST_CASE("scenario.other_work") {
    const std::string nurse = "  - name: ward nurse\n"                                   // 15
                              "    roster: {day: 3, night: 1}\n"                         // 16
                              "    minutes: {distribution: fixed, minutes: 10}\n"        // 17
                              "    other_work:\n";                                       // 18
    SUBCASE("read: one rate all day, or 24; priority defaults to equal") {
        const Scenario sc = parse_scenario(
            scenario_with(nurse + "      - name: requests\n"
                                  "        per_hour: [1.5]\n"
                                  "        minutes: {distribution: exponential, mean: 8}\n"
                                  "      - name: calls\n"
                                  "        per_hour: [0, 0, 0, 0, 0, 0, 0, 0, 2, 2, 2, 2, 2, 2, 2, 2, 2, 2, 2, 2, 0, 0, 0, 0]\n"
                                  "        minutes: {distribution: fixed, minutes: 20}\n"
                                  "        priority: below\n"),
            "s.yaml", "");
        const auto& work = sc.simulation.roles[0].other_work;
        REQUIRE(work.size() == 2);
        CHECK(work[0].name == "requests");
        CHECK(work[0].per_hour[3] == 1.5);
        CHECK(work[0].priority == OtherWorkPriority::with_alerts);
        CHECK(std::get<ExponentialMinutes>(work[0].minutes).mean_minutes == 8);
        CHECK(work[1].per_hour[7] == 0);
        CHECK(work[1].per_hour[8] == 2);
        CHECK(work[1].priority == OtherWorkPriority::below_alerts);
    }
    SUBCASE("a rate list of the wrong length names the line and what was expected") {
        const InputError e = load_error(scenario_with(nurse + "      - name: requests\n"       // 19
                                                              "        per_hour: [1, 2]\n"      // 20
                                                              "        minutes: {distribution: fixed, minutes: 5}\n"));
        CHECK(e.line == 20);
        CHECK(std::string(e.what()).find("expected one rate (all day) or 24 rates (hour 00 first), found 2") !=
              std::string::npos);
    }
    SUBCASE("an unknown priority") {
        const InputError e = load_error(scenario_with(nurse + "      - name: requests\n"
                                                              "        per_hour: [1]\n"
                                                              "        minutes: {distribution: fixed, minutes: 5}\n"
                                                              "        priority: urgent\n"));  // 22
        CHECK(e.line == 22);
        CHECK(std::string(e.what()).find("unknown priority 'urgent' (expected above, equal or below)") != std::string::npos);
    }
    SUBCASE("two classes of one name, a negative rate, minutes missing") {
        const std::string item = "      - name: requests\n        per_hour: [1]\n        minutes: {distribution: fixed, minutes: 5}\n";
        CHECK(std::string(load_error(scenario_with(nurse + item + item)).what()).find("two classes of this role's other work are named 'requests'") !=
              std::string::npos);
        CHECK(std::string(load_error(scenario_with(nurse + "      - name: requests\n        per_hour: [-1]\n"
                                                           "        minutes: {distribution: fixed, minutes: 5}\n"))
                              .what())
                  .find("rates must be between 0 and 1000 tasks per team per hour") != std::string::npos);
        CHECK(std::string(load_error(scenario_with(nurse + "      - name: requests\n        per_hour: [1]\n")).what())
                  .find("minutes") != std::string::npos);
    }
}

TEST_CASE("scenario.review_capacity_declared_once") {
    // One capacity model for a ranked review: its review team (review.*) does
    // the reviews at minutes_per_review each within its capacity per round; the
    // roles' queues do not apply, so a queue or shift-end policy on the plan is
    // refused at its own line rather than silently ignored.
    const std::string review = "    channel: ranked_review\n"                                              // 14
                               "    review: {times: [\"08:00\"], top_n: 5, minutes_per_review: 10}\n";  // 15
    for (const std::string key : {"queue: priority", "at_shift_end: drop"}) {
        const InputError e = load_error(scenario_with(two_roles, review + "    " + key + "\n"));  // 16
        CHECK(e.line == 16);
        CHECK(std::string(e.what()).find("the roles' queues, escalation and rosters do not apply") != std::string::npos);
    }
    // Without those keys the same plan loads, its role one of the declared roles.
    const Scenario sc = parse_scenario(scenario_with(two_roles, review), "s.yaml", "");
    CHECK(sc.simulation.plans[0].review.minutes_per_review == 10);
}
