// A plan's own escalation and roster (plans[].escalation, plans[].roster): a
// review and a page plan share the rapid response nurse, and only the pages
// escalate to the physician. Times are UTC; the day shift is 07:00-19:00.
#include <doctest/doctest.h>

#include <string>

#include "models/errors.hpp"
#include "sim/setup.hpp"
#include "staff_stories.hpp"
#include "study/scenario.hpp"
#include "test_support.hpp"

using namespace tocsin;
using namespace tocsin::test;

namespace {

// Rapid response nurse (1 on each shift, 30 min per task) escalating to the
// physician (1 on each shift, 10 min) after 20 minutes; the page plan keeps
// that edge, the review declares none.
SimulationSetup shared_nurse() {
    SimulationSetup setup;
    setup.shifts = day_night();
    setup.roles = {role("rapid response nurse", {1, 1}, FixedMinutes{30}),
                   role("physician", {1, 1}, FixedMinutes{10})};
    setup.escalation = build_escalation_graph(std::vector<std::string>{"rapid response nurse", "physician"},
                                              std::vector<EscalationEdge>{{"rapid response nurse", "physician", 20}},
                                              roles_ever_staffed(setup.roles));
    Plan page;
    page.name = "page";
    Plan review = page;  // a second page plan, to the same nurse, without the edge
    review.name = "quiet page";
    review.escalation = EscalationGraph({"rapid response nurse", "physician"});  // no edges
    setup.plans = {page, review};
    return setup;
}

StaffRun run_plan(const SimulationSetup& setup, const Plan& plan) {
    // Two notices for two patients, at 10:00 and 10:05 on Monday 2 March.
    const std::vector<Notice> notices = {notice_at(march(2, 10, 0), 0.5, 0, 0), notice_at(march(2, 10, 5), 0.5, 0, 1)};
    const ShiftCalendar calendar = calendar_from(march(2, 7, 0), march(3, 7, 0));
    return simulate_staff(notices, staff_model(setup, plan, 1), plan.staffing, calendar, march(3, 7, 0),
                          ReplicationSeed{1, 0});
}

}  // namespace

TEST_CASE("plan_staffing.two_page_plans_share_a_role_one_without_escalation") {
    const SimulationSetup setup = shared_nurse();
    // Page plan: the nurse takes the 10:00 notice until 10:30. The 10:05 one
    // waits; at 10:25 (20 min) it moves to the physician, free, who takes it up
    // at once and finishes at 10:35.
    const StaffRun page = run_plan(setup, setup.plans[0]);
    REQUIRE(page.tasks.size() == 2);
    CHECK(page.tasks[0].started_at == march(2, 10, 0));
    CHECK(page.tasks[0].fate == TaskFate::finished);
    CHECK(page.tasks[1].role == 1);
    CHECK(page.tasks[1].escalations == 1);
    CHECK(page.tasks[1].started_at == march(2, 10, 25));
    CHECK(page.tasks[1].ended_at == march(2, 10, 35));
    CHECK(page.tasks[1].fate == TaskFate::escalated_then_finished);
    // The second page plan, same nurse, no edge: the 10:05 task waits for the nurse,
    // who is free at 10:30 and finishes it at 11:00.
    const StaffRun review = run_plan(setup, setup.plans[1]);
    REQUIRE(review.tasks.size() == 2);
    CHECK(review.tasks[1].role == 0);
    CHECK(review.tasks[1].escalations == 0);
    CHECK(review.tasks[1].started_at == march(2, 10, 30));
    CHECK(review.tasks[1].ended_at == march(2, 11, 0));
    CHECK(review.tasks[1].fate == TaskFate::finished);
}

TEST_CASE("plan_staffing.own_roster_replaces_the_role_s_for_that_plan_only") {
    SimulationSetup setup = shared_nurse();
    setup.plans[1].roster = Roster{{2, 1}, {}};  // two nurses on days for the review
    // Two nurses: the 10:05 task is taken up at once by the second.
    const StaffRun review = run_plan(setup, setup.plans[1]);
    CHECK(review.tasks[1].started_at == march(2, 10, 5));
    CHECK(review.tasks[1].role == 0);
    // The page plan still has one nurse and still escalates at 10:25.
    CHECK(run_plan(setup, setup.plans[0]).tasks[1].started_at == march(2, 10, 25));
    // The model a plan gets: the role's roster replaced, weekday rows dropped.
    setup.roles[0].roster.by_weekday.assign(7, {1, 1});
    const StaffModel m = staff_model(setup, setup.plans[1], 1);
    CHECK(m.roles[0].roster.by_shift == std::vector<int>{2, 1});
    CHECK(m.roles[0].roster.by_weekday.empty());
    CHECK(m.roles[1].roster.by_shift == std::vector<int>{1, 1});
    CHECK_FALSE(m.escalation.next(0).has_value());
    CHECK(staff_model(setup, setup.plans[0], 1).escalation.next(0).has_value());
}

namespace {

// The page plan is at line 11 and the review plan at line 15; `page_extra` and
// `review_extra` are appended to each (shifting later lines).
std::string scenario_with(const std::string& page_extra, const std::string& review_extra, bool with_roles = true) {
    std::string text = "scenario_schema: 1\n"                                  // 1
                       "name: test\n"                                          // 2
                       "time_zone: UTC\n"                                      // 3
                       "shifts:\n"                                             // 4
                       "  - {name: day, starts: \"07:00\"}\n"                  // 5
                       "  - {name: night, starts: \"19:00\", night: true}\n"   // 6
                       "outcome: {window_hours: 12}\n"                         // 7
                       "population:\n"                                         // 8
                       "  replay: {encounters: e.csv, scores: s.csv}\n"        // 9
                       "plans:\n"                                              // 10
                       "  - name: page\n"                                      // 11
                       "    role: rapid response nurse\n"                      // 12
                       "    rule: {threshold: 60}\n"                           // 13
                       + page_extra +
                       "  - name: review\n"                                    // 14
                       "    channel: ranked_review\n"                          // 15
                       "    role: rapid response nurse\n"                      // 16
                       "    review: {times: [\"08:00\"], top_n: 2, minutes_per_review: 10}\n"  // 17
                       + review_extra;
    if (with_roles)
        text += "roles:\n"
                "  - name: rapid response nurse\n"
                "    roster: {day: 1, night: 1}\n"
                "    minutes: {distribution: fixed, minutes: 30}\n"
                "  - name: physician\n"
                "    roster: {day: 1, night: 0}\n"
                "    minutes: {distribution: fixed, minutes: 10}\n"
                "escalation:\n"
                "  - {from: rapid response nurse, to: physician, after_minutes: 20}\n";
    return text;
}

InputError load_error(const std::string& text) { return tocsin::testing::scenario_error(text); }

}  // namespace

TEST_CASE("plan_staffing.scenario_keys") {
    const Scenario sc = parse_scenario(scenario_with("    escalation: []\n    roster: {night: 0, day: 2}\n", ""), "s.yaml", "");
    const Plan& page = sc.simulation.plans[0];
    const Plan& review = sc.simulation.plans[1];
    REQUIRE(page.escalation.has_value());
    CHECK_FALSE(page.escalation->next(0).has_value());
    REQUIRE(page.roster.has_value());
    CHECK(page.roster->by_shift == std::vector<int>{2, 0});  // by shift name, in shift order
    CHECK_FALSE(review.escalation.has_value());
    CHECK_FALSE(review.roster.has_value());
    const std::string text = describe_scenario(sc);
    CHECK(text.find("own escalation: rapid response nurse (no escalation") != std::string::npos);
    CHECK(text.find("own roster of rapid response nurse: day 2, night 0") != std::string::npos);
    // A review is done by its review team, not the roles: no escalation to describe.
    CHECK(text.find("reviews are done by the review team") != std::string::npos);
    // A plan's own path, different from the scenario's.
    const Scenario other = parse_scenario(
        scenario_with("    escalation:\n      - {from: rapid response nurse, to: physician, after_minutes: 5}\n", ""),
        "s.yaml", "");
    REQUIRE(other.simulation.plans[0].escalation.has_value());
    CHECK(other.simulation.plans[0].escalation->next(0)->timeout_seconds == 5 * 60);
    CHECK(other.simulation.escalation.next(0)->timeout_seconds == 20 * 60);
}

TEST_CASE("plan_staffing.errors_name_file_line_and_key") {
    SUBCASE("an edge naming an undeclared role") {
        const InputError e = load_error(scenario_with(
            "    escalation:\n"                                                  // 14
            "      - {from: rapid response nurse, to: doctor, after_minutes: 5}\n",  // 15
            ""));
        CHECK(e.file == "s.yaml");
        CHECK(e.line == 15);
        CHECK(e.field == "plans[0].escalation");
        CHECK(std::string(e.what()).find("doctor") != std::string::npos);
    }
    SUBCASE("an edge without its timeout") {
        const InputError e = load_error(scenario_with("    escalation: [{from: rapid response nurse, to: physician}]\n", ""));
        CHECK(e.line == 14);
        CHECK(e.field.find("plans[0].escalation[0]") != std::string::npos);
        CHECK(std::string(e.what()).find("after_minutes") != std::string::npos);
    }
    SUBCASE("escalation given as a section, not a list") {
        const InputError e = load_error(scenario_with("    escalation: {from: rapid response nurse}\n", ""));
        CHECK(e.line == 14);
        CHECK(std::string(e.what()).find("expected a list") != std::string::npos);
    }
    SUBCASE("a roster naming an undeclared shift") {
        const InputError e = load_error(scenario_with("    roster: {day: 1, evening: 1}\n", ""));
        CHECK(e.line == 14);
        CHECK(e.field == "plans[0].roster.evening");
        CHECK(std::string(e.what()).find("unknown shift 'evening' (declared shifts: day, night)") != std::string::npos);
    }
    SUBCASE("a roster leaving nobody where the plan's tasks end up") {
        // Without its own escalation the page plan keeps the edge to the
        // physician; with no physician the path ends at the nurse, here 0.
        const InputError e = load_error(scenario_with("    escalation: []\n    roster: {day: 0, night: 0}\n", ""));
        CHECK(e.line == 15);
        CHECK(e.field == "plans[0].roster");
        CHECK(std::string(e.what()).find("nobody is on duty on any shift at 'rapid response nurse'") != std::string::npos);
    }
    SUBCASE("a review's own escalation or roster") {
        // Reviews are done by the review team, not queued to the roles.
        for (const std::string key : {"escalation: []", "roster: {day: 1, night: 1}"}) {
            CAPTURE(key);
            const InputError e = load_error(scenario_with("", "    " + key + "\n"));
            CHECK(e.line == 18);
            CHECK(e.field == "plans[1]." + key.substr(0, key.find(':')));
            CHECK(std::string(e.what()).find("review team") != std::string::npos);
        }
    }
    SUBCASE("own staffing without roles") {
        const InputError e = load_error(scenario_with("    roster: {day: 1, night: 1}\n", "", false));
        CHECK(e.line == 14);
        CHECK(e.field.find("roster") != std::string::npos);
        CHECK(std::string(e.what()).find("needs roles") != std::string::npos);
    }
}
