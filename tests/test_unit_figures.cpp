// Per-ward figures: a hand-worked story on two wards where the pooled 90th
// percentile of notices per night stays within a budget while one ward's own
// does not, so the budget question answers differently per ward; per-unit
// counts that add up to the pooled ones; the unit teams' staff minutes; and
// the replicated per-unit intervals.
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <string>
#include <vector>

#include "analysis/comparison.hpp"
#include "analysis/unit_figures.hpp"
#include "analysis/workload.hpp"
#include "models/population_source.hpp"
#include "report/unit_tables.hpp"
#include "staff_stories.hpp"
#include "study/run.hpp"

using namespace tocsin;

namespace {

Instant at(int day, int hour, int minute = 0) {
    return days_from_civil(2026, 3, day) * 86400 + hour * 3600 + minute * 60;
}

// Two wards, A and B; day 07:00-19:00 and night 19:00-07:00 (UTC); the
// reporting period 2 Mar 07:00 to 12 Mar 07:00 holds ten nights per ward
// (the nights of 2, 3, ..., 11 March).
//   0 a-case  on A, outcome 5 Mar 03:00     1 a-other on A, no outcome
//   2 b-case  on B, outcome 3 Mar 02:00     3 b-missed on B, outcome 8 Mar 12:00, never noticed
//   4 b-other on B, no outcome
struct TwoWards {
    Population pop;
    ShiftCalendar cal;
    AnalysisSettings settings;
    SimulationSetup setup;
    ReplicationRecord record;

    TwoWards() {
        pop.units = {"A", "B"};
        const Instant in = at(1, 12), out = at(13, 12);
        pop.encounters = {{"a-case", 0, in, out, at(5, 3)},
                          {"a-other", 0, in, out, std::nullopt},
                          {"b-case", 1, in, out, at(3, 2)},
                          {"b-missed", 1, in, out, at(8, 12)},
                          {"b-other", 1, in, out, std::nullopt}};
        pop.period_start = in;
        pop.period_end = out;
        cal = ShiftCalendar(ShiftPattern{{7 * 60, 19 * 60}, {"day", "night"}, {false, true}}, TimeZone::utc(), at(1, 0),
                            at(14, 0));
        settings.period_start = at(2, 7);
        settings.period_end = at(12, 7);
        for (const char* name : {"busy-ward", "even"}) {
            Plan p;
            p.name = name;
            setup.plans.push_back(p);
            record.plans.emplace_back();
        }
    }
    void notice(std::size_t plan, std::uint32_t encounter, Instant when) {
        Notice n;
        n.at = when;
        n.encounter = encounter;
        n.unit = pop.encounters[encounter].unit;
        record.plans[plan].notices.push_back(n);
    }
    ReportingShifts reporting() const { return reporting_shifts(settings, pop, cal); }
    std::vector<PlanFigures> figures() const {
        std::vector<PlanFigures> f;
        for (const PlanRecord& r : record.plans) f.push_back(plan_figures(settings, pop, cal, reporting(), r));
        return f;
    }
};

// busy-ward: A gets one page a night (a-other, but a-case on the night of 4
// March at 22:00, 5 h before its outcome); B gets five pages on the night of
// 2 March (four for b-other from 20:00 hourly, then b-case on 3 March at
// 00:30, 1.5 h before its outcome), five on the night of 3 March and three on
// the night of 4 March (b-other), none on the other seven nights. One day
// page on B (6 March 12:00) and one page after the period on A (12 March
// 10:00) count among the notices, never among the nights.
// even: two pages every night on each ward, at 22:00 and 23:00; on A the
// night of 4 March both are for a-case, the rest for a-other and b-other.
TwoWards story() {
    TwoWards s;
    for (int day = 2; day <= 11; ++day) s.notice(0, day == 4 ? 0 : 1, at(day, 22));
    for (int hour = 20; hour <= 23; ++hour) s.notice(0, 4, at(2, hour));
    s.notice(0, 2, at(3, 0, 30));
    for (int k = 0; k < 5; ++k) s.notice(0, 4, at(3, 20 + k));
    for (int k = 0; k < 3; ++k) s.notice(0, 4, at(4, 20 + k));
    s.notice(0, 4, at(6, 12));
    s.notice(0, 1, at(12, 10));
    for (int day = 2; day <= 11; ++day)
        for (int hour : {22, 23}) {
            s.notice(1, day == 4 ? 0 : 1, at(day, hour));
            s.notice(1, 4, at(day, hour));
        }
    return s;
}

const UnitFigures& row_of(const std::vector<UnitFigures>& rows, const std::string& plan, const std::string& unit) {
    for (const UnitFigures& r : rows)
        if (r.plan == plan && r.unit == unit) return r;
    FAIL("no row for " << plan << " on " << unit);
    throw;  // unreachable
}

}  // namespace

TEST_CASE("unit_figures.hand_worked_two_wards") {
    const TwoWards s = story();
    const std::vector<PlanFigures> f = s.figures();
    const std::vector<UnitFigures> rows = unit_figures(s.setup, s.settings, s.pop, s.cal, s.reporting(), s.record, f);
    REQUIRE(rows.size() == 4);
    const UnitFigures &busy_a = row_of(rows, "busy-ward", "A"), &busy_b = row_of(rows, "busy-ward", "B");

    // busy-ward, ward A: ten nights of one page: mean 1, p90 1, worst 1; 11 pages with the one after the period.
    CHECK(busy_a.notices == 11);
    CHECK(*busy_a.night_mean == doctest::Approx(1.0));
    CHECK(*busy_a.night_p90 == doctest::Approx(1.0));
    CHECK(*busy_a.night_max == doctest::Approx(1.0));
    // Ward B's nights sorted: 0 x 7, 3, 5, 5. Mean 13/10; the 90th percentile
    // (Hyndman & Fan 1996, type 7) at position 0.9 x 9 = 8.1 between the
    // ninth (5) and tenth (5) values: 5; worst 5. 14 pages with the day one.
    CHECK(busy_b.notices == 14);
    CHECK(*busy_b.night_mean == doctest::Approx(1.3));
    CHECK(*busy_b.night_p90 == doctest::Approx(5.0));
    CHECK(*busy_b.night_max == doctest::Approx(5.0));
    // All 20 shifts on B (ten days, ten nights), sorted: 0 x 16, 1 (the day
    // page), 3, 5, 5: mean 14/20; 90th percentile at 0.9 x 19 = 17.1:
    // 3 + 0.1 x (5 - 3) = 3.2; worst 5.
    CHECK(*busy_b.shift_mean == doctest::Approx(0.7));
    CHECK(*busy_b.shift_p90 == doctest::Approx(3.2));
    CHECK(*busy_b.shift_max == doctest::Approx(5.0));
    // Notices before time zero to patients who went on to the outcome: one
    // of B's 14 (b-case at 00:30), one of A's 11 (a-case on 4 March).
    CHECK(*busy_b.notice_ppv == doctest::Approx(1.0 / 14.0));
    CHECK(*busy_a.notice_ppv == doctest::Approx(1.0 / 11.0));
    CHECK(*f[0].notice_ppv == doctest::Approx(2.0 / 25.0));
    // Patients per night on B: 2 (b-other and b-case), 1, 1, then seven nights of 0.
    CHECK(*busy_b.patients_per_night_mean == doctest::Approx(0.4));
    CHECK(*busy_b.patients_per_night_max == doctest::Approx(2.0));
    // Pooled over the 20 unit-nights, sorted: 0 x 7, 1 x 10, 3, 5, 5. The 90th
    // percentile at position 0.9 x 19 = 17.1: 3 + 0.1 x (5 - 3) = 3.2, under
    // ward B's own 5: the pooled figure hides the busy ward.
    CHECK(*f[0].per_unit_night_p90 == doctest::Approx(3.2));
    CHECK(*f[0].per_unit_night_mean == doctest::Approx(23.0 / 20.0));
    CHECK(*f[0].worst_unit_night_p90 == doctest::Approx(5.0));
    CHECK(*f[0].worst_unit_night_mean == doctest::Approx(1.3));
    // Catches: a-case on A (5 h ahead); b-case on B (1.5 h ahead), b-missed not.
    CHECK(busy_a.cases == 1);
    CHECK(busy_a.caught == 1);
    CHECK(*busy_a.lead_median_hours == doctest::Approx(5.0));
    CHECK(busy_b.cases == 2);
    CHECK(busy_b.caught == 1);
    CHECK(*busy_b.sensitivity == doctest::Approx(0.5));
    CHECK(*busy_b.lead_median_hours == doctest::Approx(1.5));
    CHECK_FALSE(busy_a.team_minutes_per_shift_mean.has_value());  // no staff in this story

    // even: two pages every night on each ward: pooled and worst 90th percentile 2; catches a-case only.
    CHECK(*f[1].per_unit_night_p90 == doctest::Approx(2.0));
    CHECK(*f[1].worst_unit_night_p90 == doctest::Approx(2.0));
    CHECK(f[1].caught == 1);
    CHECK(*row_of(rows, "even", "A").lead_median_hours == doctest::Approx(5.0));

    SUBCASE("per-unit counts add up to the pooled counts") {
        for (std::size_t p = 0; p < f.size(); ++p) {
            const UnitFigures &a = rows[2 * p], &b = rows[2 * p + 1];
            CHECK(a.notices + b.notices == f[p].notices);
            CHECK(a.cases + b.cases == f[p].cases);
            CHECK(a.caught + b.caught == f[p].caught);
        }
    }

    SUBCASE("the budget question: pooled against the worst ward") {
        // "No more than 4 pages a night, 9 nights in 10": pooled, both plans are
        // within (3.2 and 2) and busy-ward wins with 2 catches against 1; per
        // ward, busy-ward's ward B is at 5, so only even is within and wins.
        const ReplicatedFigures rf = collect_figures({"busy-ward", "even"}, {f});
        const std::size_t caught = metric_index(*find_metric("caught"));
        const BudgetAnswer pooled = best_within_budget(rf, metric_index(*find_metric("per_unit_night_p90")), 4, caught);
        const BudgetAnswer per_ward = best_within_budget(rf, metric_index(*find_metric("worst_unit_night_p90")), 4, caught);
        REQUIRE(pooled.best);
        CHECK(*pooled.best == 0);
        CHECK(pooled.within.size() == 2);
        REQUIRE(per_ward.best);
        CHECK(*per_ward.best == 1);
        CHECK(per_ward.within == std::vector<std::size_t>{1});
        // And the run's default is the per-ward form.
        CHECK(RunSettings{}.budget_metric == "worst_unit_night_p90");
    }

    SUBCASE("the table holds one row per plan and unit with the pooled names") {
        const Table t = plan_unit_summary_table(rows, 0);
        CHECK(t.name == "plan_unit_summary");
        CHECK(t.rows.size() == 4);
        CHECK(t.columns[2] == "notices");
        CHECK(std::find(t.columns.begin(), t.columns.end(), "per_unit_night_p90") != t.columns.end());
        CHECK(std::get<std::int64_t>(t.rows[1][2]) == 14);  // busy-ward on B
    }
}

TEST_CASE("unit_figures.unit_team_minutes") {
    // test_staff.cpp's per-unit story: one ward nurse on each of two units,
    // then a rapid-response nurse for the hospital after 15 min; notices at
    // 21:00 on units 0, 1, 0. Unit 0's nurse works 21:00-21:30, unit 1's the
    // same; the third task goes to the rapid-response nurse (hospital-wide,
    // not a unit team). Shifts in the run (until 23:00): day 2 and night 2.
    using namespace tocsin::test;
    const StaffModel model =
        model_of({role("ward nurse", {1, 1}, FixedMinutes{30}, true), role("rapid-response nurse", {1, 1}, FixedMinutes{30})},
                 {{"ward nurse", "rapid-response nurse", 15}}, 2);
    const std::vector<Notice> notices = {notice_at(march(2, 21, 0), 0.5, 0), notice_at(march(2, 21, 0), 0.5, 1),
                                         notice_at(march(2, 21, 0), 0.5, 0)};
    const ShiftCalendar calendar = calendar_from(march(2, 7, 0), march(4, 7, 0));
    const StaffRun run = simulate_staff(notices, model, StaffPlan{}, calendar, march(2, 23, 0), ReplicationSeed{1, 0});
    const PlanStaffRun pr{"plan", &model, StaffPlan{}, &run};
    const auto minutes = unit_team_minutes(pr, calendar);
    REQUIRE(minutes.size() == 2);
    CHECK(minutes[0] == std::vector<double>{0.0, 30.0});
    CHECK(minutes[1] == std::vector<double>{0.0, 30.0});
    // The ward nurse's pooled minutes per team-shift average the units' own:
    // (0 + 30 + 0 + 30) / 4 = 15.
    const auto workload = staff_workload(std::span(&pr, 1), calendar);
    REQUIRE(workload.size() == 2);
    CHECK(*workload[0].staff_minutes_per_shift_mean == doctest::Approx(15.0));

    SUBCASE("a path without a unit team has none") {
        const StaffModel hospital = model_of({role("rapid-response nurse", {1, 1}, FixedMinutes{30})}, {}, 2);
        const StaffRun r = simulate_staff(notices, hospital, StaffPlan{}, calendar, march(2, 23, 0), ReplicationSeed{1, 0});
        CHECK(unit_team_minutes(PlanStaffRun{"plan", &hospital, StaffPlan{}, &r}, calendar).empty());
    }
}

TEST_CASE("unit_figures.replicated_intervals") {
    // Three replications of plan P on wards A and B; ward B is missing from
    // the third (its figure there is undefined and left out, as any other).
    // A's notices per night 1, 2, 4: mean 7/3, s = sqrt(((4/3)^2 + (1/3)^2 +
    // (5/3)^2) / 2) = sqrt(7/3); the 95% interval is mean +- t(0.975, 2) s /
    // sqrt(3) with t(0.975, 2) = 4.303 (Fisher & Yates 1938, Table III), so
    // 7/3 +- 3.794: -1.461 to 6.128 (three decimals from the table's t).
    auto row = [](const char* unit, double night_mean, std::int64_t notices) {
        UnitFigures u;
        u.plan = "P";
        u.unit = unit;
        u.night_mean = night_mean;
        u.notices = notices;
        return u;
    };
    const ReplicatedUnitFigures f =
        collect_unit_figures({"P"}, {{row("A", 1, 10), row("B", 3, 30)}, {row("A", 2, 20), row("B", 5, 50)}, {row("A", 4, 40)}});
    REQUIRE(f.units == std::vector<std::string>{"A", "B"});
    const std::size_t night = unit_metric_index("per_unit_night_mean");
    const MeanInterval a = mean_interval(f.of(0, 0, night));
    CHECK(a.n == 3);
    CHECK(a.mean == doctest::Approx(7.0 / 3.0));
    CHECK(a.low == doctest::Approx(-1.461).epsilon(0.001));
    CHECK(a.high == doctest::Approx(6.128).epsilon(0.001));
    // B: 3 and 5 in two replications: mean 4, s = sqrt(2), t(0.975, 1) = 12.706
    // (same table): 4 +- 12.706: -8.706 to 16.706.
    const MeanInterval b = mean_interval(f.of(0, 1, night));
    CHECK(b.n == 2);
    CHECK(b.mean == doctest::Approx(4.0));
    CHECK(b.high == doctest::Approx(16.706).epsilon(0.001));
    CHECK(std::isnan(f.of(0, 1, night)[2]));

    const Table t = plan_unit_comparison_table(f);
    CHECK(t.name == "plan_unit_comparison");
    CHECK(t.rows.size() == 2 * unit_metrics().size());
    bool found = false;
    for (const auto& r : t.rows)
        if (std::get<std::string>(r[1]) == "B" && std::get<std::string>(r[2]) == "notices") {
            found = true;
            CHECK(std::get<double>(r[3]) == doctest::Approx(40.0));
            CHECK(std::get<std::int64_t>(r[6]) == 2);
        }
    CHECK(found);
}

TEST_CASE("unit_figures.whole_run_adds_up") {
    // The demo (three generated wards, staff) through run_scenario with two
    // replications: in every replication each plan's per-ward notices, cases
    // and catches add up to its pooled ones exactly, the worst ward's night
    // 90th percentile is the highest of the wards' own, and (every ward has
    // the same nights) the pooled night mean is the mean of the wards' means.
    Scenario sc = load_scenario(std::string(TOCSIN_SOURCE_DIR) + "/scenarios/demo.yaml");
    sc.replications = 2;
    RunSettings settings;
    settings.evaluate = false;
    const RunOutput out = run_scenario(sc, population_factory(sc.population), settings);
    const ReplicatedFigures& f = out.figures;
    const ReplicatedUnitFigures& u = out.unit_figures;
    REQUIRE(u.units.size() == 3);
    REQUIRE(u.replications == 2);
    auto plan_metric = [](const char* name) { return metric_index(*find_metric(name)); };
    bool some_team_minutes = false;
    for (std::size_t p = 0; p < f.plans.size(); ++p)
        for (std::uint64_t r = 0; r < 2; ++r) {
            CAPTURE(f.plans[p]);
            for (const char* name : {"notices", "cases", "caught"}) {
                double sum = 0;
                for (std::size_t w = 0; w < 3; ++w) sum += u.of(p, w, unit_metric_index(name))[r];
                CHECK(sum == f.of(p, plan_metric(name))[r]);
            }
            double worst = 0, sum_means = 0;
            for (std::size_t w = 0; w < 3; ++w) {
                worst = std::max(worst, u.of(p, w, unit_metric_index("per_unit_night_p90"))[r]);
                sum_means += u.of(p, w, unit_metric_index("per_unit_night_mean"))[r];
                some_team_minutes |= std::isfinite(u.of(p, w, unit_metric_index("unit_team_minutes_per_shift_mean"))[r]);
            }
            CHECK(worst == f.of(p, plan_metric("worst_unit_night_p90"))[r]);
            CHECK(sum_means / 3 == doctest::Approx(f.of(p, plan_metric("per_unit_night_mean"))[r]).epsilon(1e-12));
        }
    CHECK(some_team_minutes);  // the demo's ward nurse is a unit team
    CHECK(out.first_replication.units.size() == 3 * f.plans.size());
    CHECK_FALSE(per_ward_text(u).empty());
}
