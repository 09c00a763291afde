// Sweeps build a grid of plans from one plan without editing the scenario.
#include <doctest/doctest.h>

#include "models/errors.hpp"
#include "study/sweep.hpp"
#include "test_support.hpp"

using namespace tocsin;
using tocsin::testing::ScratchDir;
using tocsin::testing::read_file;

TEST_CASE("sweep.axis_forms") {
    using Values = std::vector<std::string>;
    CHECK(parse_sweep_axis("plan.rule.threshold=50:80:10").values == Values{"50", "60", "70", "80"});
    // A fractional step still includes the end (no floating-point drift).
    CHECK(parse_sweep_axis("plan.rule.rise=0.1:0.3:0.1").values.size() == 3);
    CHECK(parse_sweep_axis("plan.rule.snooze_minutes=60,120,240").values == Values{"60", "120", "240"});
    // Text values: a colon inside a list is not a range.
    CHECK(parse_sweep_axis("plan.review.times=08:00,08:00+20:00").values == Values{"08:00", "08:00+20:00"});
    CHECK(parse_sweep_axis("plan.review.scope=unit,hospital").values == Values{"unit", "hospital"});
    CHECK_THROWS_WITH_AS(parse_sweep_axis("plan.review.scope=unit,,hospital"), doctest::Contains("empty value"),
                         std::runtime_error);
    CHECK_THROWS_WITH_AS(parse_sweep_axis("threshold"), doctest::Contains("PATH=VALUES"), std::runtime_error);
    CHECK_THROWS_WITH_AS(parse_sweep_axis("plan.rule.threshold=80:50:5"), doctest::Contains("ends before"), std::runtime_error);
    CHECK_THROWS_WITH_AS(parse_sweep_axis("plan.rule.threshold=1:5:0"), doctest::Contains("positive"), std::runtime_error);
}

TEST_CASE("sweep.grid") {
    ScratchDir dir;
    const std::string base =
        "scenario_schema: 1\nname: t\ntime_zone: UTC\nshifts: [{name: day, starts: \"07:00\"}]\n"
        "outcome: {window_hours: 12}\npopulation: {replay: {encounters: e.csv, scores: s.csv}}\n"
        "plans:\n  - {name: a, rule: {threshold: 60}}\n  - {name: b, rule: {threshold: 70, snooze_minutes: 30}}\n";
    const std::string path = dir.file("s.yaml", base);
    SweepRequest req;
    req.base_plan = "b";
    req.axes = {parse_sweep_axis("plan.rule.threshold=50,60"), parse_sweep_axis("plan.rule.snooze_minutes=60:180:60")};
    const Scenario sc = sweep_scenario(path, req);
    REQUIRE(sc.simulation.plans.size() == 6);
    // Short names: t for the threshold, s for the snooze; the description
    // spells them out.
    CHECK(sc.simulation.plans[0].name == "b t50 s60");
    CHECK(sc.simulation.plans[5].name == "b t60 s180");
    CHECK(sc.simulation.plans[5].description == "Swept from b: threshold=60, snooze_minutes=180.");
    CHECK(sc.simulation.plans[5].rule.threshold == 60);
    CHECK(sc.simulation.plans[5].rule.snooze == minutes(180));

    req.keep_other_plans = true;
    CHECK(sweep_scenario(path, req).simulation.plans.size() == 8);

    SUBCASE("a key the plan does not have yet is added") {
        SweepRequest r;
        r.base_plan = "a";
        r.axes = {parse_sweep_axis("plan.rule.persistence=1,2,3")};
        const Scenario s = sweep_scenario(path, r);
        CHECK(s.simulation.plans[2].rule.persistence == 3);
        CHECK(s.simulation.plans[2].name == "a persistence3");
    }
    SUBCASE("a value that is not a number, for a number key, is refused naming the axis") {
        SweepRequest r;
        r.axes = {parse_sweep_axis("plan.rule.threshold=50,x")};
        CHECK_THROWS_WITH_AS(sweep_scenario(path, r),
                             doctest::Contains("sweep axis 'plan.rule.threshold': the value 'x' is refused: "
                                               "'threshold' takes a finite number"),
                             InputError);
        r.axes = {parse_sweep_axis("plan.rule.threshold=1,inf")};
        CHECK_THROWS_WITH_AS(sweep_scenario(path, r), doctest::Contains("the value 'inf' is refused"), InputError);
    }
    SUBCASE("an invalid swept value is reported with its key") {
        SweepRequest r;
        r.axes = {parse_sweep_axis("plan.rule.persistence=0,1")};
        CHECK_THROWS_WITH_AS(sweep_scenario(path, r), doctest::Contains("rule.persistence"), std::runtime_error);
    }
    SUBCASE("a misspelt key is caught by the strict loader") {
        SweepRequest r;
        r.axes = {parse_sweep_axis("plan.rule.treshold=50")};
        CHECK_THROWS_WITH_AS(sweep_scenario(path, r), doctest::Contains("did you mean 'threshold'"), std::runtime_error);
    }
    SUBCASE("the scenario file can declare the sweep") {
        const std::string with = dir.file("w.yaml", base + "sweep:\n  plan: a\n  vary:\n    - {key: plan.rule.threshold, from: 40, to: 60, step: 10}\n");
        const Scenario s = sweep_scenario(with, SweepRequest{});
        REQUIRE(s.simulation.plans.size() == 3);
        CHECK(s.simulation.plans[1].name == "a t50");
    }
    SUBCASE("grids beyond the limit are refused") {
        SweepRequest r;
        r.axes = {parse_sweep_axis("plan.rule.threshold=1:100:1"), parse_sweep_axis("plan.rule.rise=1:100:1")};
        CHECK_THROWS_WITH_AS(sweep_scenario(path, r), doctest::Contains("10000 plans"), std::runtime_error);
    }
}

TEST_CASE("sweep.size_is_checked_before_anything_is_built") {
    // A range's count is worked out from from, to and step: ten million
    // values are refused without being made, naming the option and the limit.
    try {
        parse_sweep_axis("plan.rule.threshold=0:1e7:1");
        FAIL("a ten-million-value range was accepted");
    } catch (const InputError& e) {
        CHECK(e.file == "command line");
        CHECK(e.field == "--vary");
        CHECK(std::string(e.what()).find("10000001 values") != std::string::npos);
        CHECK(std::string(e.what()).find("limit of 5000") != std::string::npos);
    }

    ScratchDir dir;
    const std::string base =
        "scenario_schema: 1\nname: t\ntime_zone: UTC\nshifts: [{name: day, starts: \"07:00\"}]\n"
        "outcome: {window_hours: 12}\npopulation: {replay: {encounters: e.csv, scores: s.csv}}\n"
        "plans:\n  - {name: a, rule: {threshold: 60}}\n";
    const std::string path = dir.file("s.yaml", base);

    SUBCASE("the grid's size is the product of the axes' counts, whatever its size") {
        // Six axes of 4096 = 2^12 values make 2^72 plans, which a 64-bit
        // product wraps to 0.
        SweepRequest r;
        for (const char* key : {"threshold", "snooze_minutes", "rise", "persistence", "max_per_shift", "rearm_below"})
            r.axes.push_back(parse_sweep_axis(std::string("plan.rule.") + key + "=1:4096:1"));
        try {
            sweep_scenario(path, r);
            FAIL("a grid of 2^72 plans was accepted");
        } catch (const InputError& e) {
            CHECK(e.field == "--vary");
            CHECK(std::string(e.what()).find("4096 x 4096 x 4096 x 4096 x 4096 x 4096 values") != std::string::npos);
            CHECK(std::string(e.what()).find("limit of 5000") != std::string::npos);
        }
    }
    SUBCASE("a range in the scenario's sweep section is refused at its line") {
        const std::string with = dir.file(
            "w.yaml", base + "sweep:\n  vary:\n    - {key: plan.rule.threshold, from: 0, to: 1e7, step: 1}\n");
        try {
            sweep_scenario(with, SweepRequest{});
            FAIL("a ten-million-value range was accepted");
        } catch (const InputError& e) {
            CHECK(e.file == with);
            CHECK(e.line == 11);
            CHECK(e.field == "sweep.vary[0]");
            CHECK(std::string(e.what()).find("limit of 5000") != std::string::npos);
        }
    }
    SUBCASE("a request that cannot be built is an input error naming its option") {
        SweepRequest r;
        r.base_plan = "nope";
        r.axes = {parse_sweep_axis("plan.rule.threshold=50")};
        CHECK_THROWS_WITH_AS(sweep_scenario(path, r), doctest::Contains("command line: --plan: no plan named 'nope'"),
                             InputError);
        r.base_plan.clear();
        r.axes = {parse_sweep_axis("plan.rules.threshold=50")};
        CHECK_THROWS_WITH_AS(sweep_scenario(path, r), doctest::Contains("no key 'rules'"), InputError);
        CHECK_THROWS_AS(sweep_scenario(path, SweepRequest{}), InputError);  // nothing to sweep
    }
}

TEST_CASE("sweep.staffing_axis") {
    // Varying the night roster of the role the swept plan pages: each value
    // becomes a copy of the role under its own name, with the escalation edge
    // out of it; the plan of that grid point pages the copy.
    ScratchDir dir;
    const std::string path = dir.file(
        "s.yaml",
        "scenario_schema: 1\nname: t\ntime_zone: UTC\n"
        "shifts: [{name: day, starts: \"07:00\"}, {name: night, starts: \"19:00\", night: true}]\n"
        "outcome: {window_hours: 12}\npopulation: {replay: {encounters: e.csv, scores: s.csv}}\n"
        "roles:\n"
        "  - {name: cover nurse, roster: {day: 2, night: 1}, minutes: {distribution: fixed, minutes: 20}}\n"
        "  - {name: physician, roster: {day: 1, night: 1}, minutes: {distribution: fixed, minutes: 30}}\n"
        "escalation: [{from: cover nurse, to: physician, after_minutes: 30}]\n"
        "plans:\n  - {name: p, role: cover nurse, rule: {threshold: 60}}\n");
    SweepRequest req;
    req.axes = {parse_sweep_axis("roles.cover nurse.roster.night=1,2,3"), parse_sweep_axis("plan.rule.threshold=50,60")};
    const Scenario sc = sweep_scenario(path, req);
    REQUIRE(sc.simulation.plans.size() == 6);
    CHECK(sc.simulation.plans[0].name == "p night1 t50");
    CHECK(sc.simulation.plans[0].role == "cover nurse (night=1)");
    CHECK(sc.simulation.plans[5].role == "cover nurse (night=3)");
    REQUIRE(sc.simulation.roles.size() == 5);  // the two declared, one copy per night value
    CHECK(sc.simulation.roles[4].name == "cover nurse (night=3)");
    CHECK(sc.simulation.roles[4].roster.by_shift[1] == 3);
    CHECK(sc.simulation.roles[4].roster.by_shift[0] == 2);  // the day roster is the original's
    // Each copy escalates like the original.
    CHECK(describe_scenario(sc).find("cover nurse (night=2) -(30 min)-> physician") != std::string::npos);

    SUBCASE("only the role the plan pages") {
        SweepRequest r;
        r.axes = {parse_sweep_axis("roles.physician.roster.night=1,2")};
        CHECK_THROWS_WITH_AS(sweep_scenario(path, r), doctest::Contains("varies the role the swept plan pages"),
                             std::runtime_error);
    }
    SUBCASE("a plan with its own roster is swept through plan.roster, not the role") {
        const std::string own = dir.file("own.yaml", read_file(path).replace(
            read_file(path).find("rule: {threshold: 60}"), 0, "roster: {day: 1, night: 1}, "));
        SweepRequest r;
        r.axes = {parse_sweep_axis("roles.cover nurse.roster.night=1,2")};
        CHECK_THROWS_WITH_AS(sweep_scenario(own, r), doctest::Contains("vary plan.roster.<shift> instead"), InputError);
        r.axes = {parse_sweep_axis("plan.roster.night=2,3")};
        const Scenario s = sweep_scenario(own, r);
        REQUIRE(s.simulation.plans.size() == 2);
        CHECK(s.simulation.plans[1].roster->by_shift == std::vector<int>{1, 3});
        CHECK(s.simulation.plans[1].name == "p night3");
    }
    SUBCASE("a plan's own escalation follows it to the copies of its role") {
        const std::string own = dir.file("own.yaml", read_file(path).replace(
            read_file(path).find("rule: {threshold: 60}"), 0,
            "escalation: [{from: cover nurse, to: physician, after_minutes: 5}], "));
        SweepRequest r;
        r.axes = {parse_sweep_axis("roles.cover nurse.roster.night=1,2")};
        const Scenario s = sweep_scenario(own, r);
        REQUIRE(s.simulation.plans[1].escalation.has_value());
        CHECK(s.simulation.plans[1].role == "cover nurse (night=2)");
        CHECK(s.simulation.plans[1].escalation->next(s.simulation.plans[1].staffing.first_role)->timeout_seconds == 5 * 60);
    }
}

TEST_CASE("sweep.text_values") {
    // Review times and scope are text: a list value is its items joined by '+'.
    ScratchDir dir;
    const std::string path = dir.file(
        "s.yaml",
        "scenario_schema: 1\nname: t\ntime_zone: UTC\nshifts: [{name: day, starts: \"07:00\"}]\n"
        "outcome: {window_hours: 12}\npopulation: {replay: {encounters: e.csv, scores: s.csv}}\n"
        "plans:\n  - name: r\n    channel: ranked_review\n"
        "    review: {times: [\"08:00\"], top_n: 4, minutes_per_review: 10}\n");
    SweepRequest req;
    req.axes = {parse_sweep_axis("plan.review.times=08:00,08:00+20:00"), parse_sweep_axis("plan.review.scope=unit,hospital")};
    const Scenario sc = sweep_scenario(path, req);
    REQUIRE(sc.simulation.plans.size() == 4);
    CHECK(sc.simulation.plans[0].review.times_minutes == std::vector<int>{8 * 60});
    CHECK(sc.simulation.plans[3].review.times_minutes == std::vector<int>{8 * 60, 20 * 60});
    CHECK(sc.simulation.plans[3].review.scope == ReviewScope::hospital);
    CHECK(sc.simulation.plans[3].name == "r times=08:00+20:00 scope=hospital");
    SUBCASE("from the scenario's sweep section") {
        const std::string with = dir.file("w.yaml", read_file(path) + "sweep:\n  vary:\n"
                                                                      "    - {key: plan.review.times, values: [\"08:00+20:00\", \"12:00\"]}\n");
        const Scenario s = sweep_scenario(with, SweepRequest{});
        REQUIRE(s.simulation.plans.size() == 2);
        CHECK(s.simulation.plans[0].review.times_minutes == std::vector<int>{8 * 60, 20 * 60});
    }
    SUBCASE("a value the key refuses names the axis and the key") {
        SweepRequest r;
        r.axes = {parse_sweep_axis("plan.review.scope=ward")};
        CHECK_THROWS_WITH_AS(sweep_scenario(path, r), doctest::Contains("unknown scope 'ward'"), InputError);
        r.axes = {parse_sweep_axis("plan.review.times=08:00,8am")};
        CHECK_THROWS_WITH_AS(sweep_scenario(path, r),
                             doctest::Contains("a swept value is not valid in plan 'r times=8am': plans[1].review.times"),
                             InputError);
        r.axes = {parse_sweep_axis("plan.review.times=08:00+")};
        CHECK_THROWS_WITH_AS(sweep_scenario(path, r), doctest::Contains("an empty list item"), InputError);
        r.axes = {parse_sweep_axis("plan.review=x")};
        CHECK_THROWS_WITH_AS(sweep_scenario(path, r), doctest::Contains("'review' is a section"), InputError);
        r.axes = {parse_sweep_axis("plan.review.top_n=four")};
        CHECK_THROWS_WITH_AS(sweep_scenario(path, r), doctest::Contains("'top_n' takes a finite number"), InputError);
    }
}
