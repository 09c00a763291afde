// Distinct patients noticed per unit per night and the notices' positive
// predictive value, on one hand-built story whose figures are counted by hand
// in the comments, and carried across replications by the comparison.
#include <doctest/doctest.h>

#include <algorithm>
#include <string>
#include <variant>
#include <vector>

#include "analysis/comparison.hpp"
#include "analysis/results.hpp"
#include "report/comparison_tables.hpp"
#include "report/run_tables.hpp"

using namespace tocsin;

namespace {

Instant at(int day, int hour, int minute = 0) {
    return days_from_civil(2026, 3, day) * 86400 + hour * 3600 + minute * 60;
}

// Two units, A and B; shifts day 07:00-19:00 and night 19:00-07:00 (UTC); the
// reporting period 2 Mar 07:00 to 4 Mar 07:00 holds four shifts: day 2,
// night 2, day 3, night 3, so four unit-nights.
//   P1 A, outcome 3 Mar 23:00.   P2 A, no outcome.   P3 B, no outcome.
//   P4 B, outcome 4 Mar 10:00.   P5 B, no outcome.   P6 A, outcome 3 Mar 12:00, never noticed.
struct Story {
    Population pop;
    ShiftCalendar cal;
    AnalysisSettings settings;
    PlanRecord record;

    Story() {
        pop.units = {"A", "B"};
        const Instant in = at(1, 12), out = at(5, 12);
        pop.encounters = {{"P1", 0, in, out, at(3, 23)}, {"P2", 0, in, out, std::nullopt},
                          {"P3", 1, in, out, std::nullopt}, {"P4", 1, in, out, at(4, 10)},
                          {"P5", 1, in, out, std::nullopt}, {"P6", 0, in, out, at(3, 12)}};
        pop.period_start = in;
        pop.period_end = out;
        cal = ShiftCalendar(ShiftPattern{{7 * 60, 19 * 60}, {"day", "night"}, {false, true}}, TimeZone::utc(), at(1, 0),
                            at(6, 0));
        settings.period_start = at(2, 7);
        settings.period_end = at(4, 7);
    }
    Story& notice(std::uint32_t encounter, Instant when) {
        Notice n;
        n.at = when;
        n.encounter = encounter;
        n.unit = pop.encounters[encounter].unit;
        record.notices.push_back(n);
        return *this;
    }
    PlanFigures figures() const {
        return plan_figures(settings, pop, cal, reporting_shifts(settings, pop, cal), record);
    }
};

}  // namespace

TEST_CASE("patients_and_ppv.hand_worked_story") {
    // Eleven notices:
    //   2 Mar 20:00 P1, 22:00 P1, 23:00 P2     A night 2: 3 notices, 2 patients
    //   3 Mar 02:00 P3                          B night 2: 1 notice,  1 patient
    //   3 Mar 10:00 P2, 12:00 P5                day shifts: not in the night figures
    //   3 Mar 21:00 P1, 4 Mar 01:00 P1          A night 3: 2 notices, 1 patient
    //   3 Mar 22:00 P4, 23:30 P4                B night 3: 2 notices, 1 patient
    //   4 Mar 08:00 P3                          after the reporting period
    // The 4 Mar 01:00 notice comes after P1's outcome (the simulation cannot
    // make one: scores stop at time zero); it counts among the notices, never
    // as one for a patient who went on to the outcome.
    Story s;
    s.notice(0, at(2, 20)).notice(0, at(2, 22)).notice(1, at(2, 23)).notice(2, at(3, 2));
    s.notice(1, at(3, 10)).notice(4, at(3, 12)).notice(0, at(3, 21)).notice(3, at(3, 22));
    s.notice(3, at(3, 23, 30)).notice(0, at(4, 1)).notice(2, at(4, 8));
    const PlanFigures f = s.figures();
    CHECK(f.notices == 11);
    // Notices per unit-night 3, 1, 2, 2: mean 2.
    CHECK(f.per_unit_night_mean == doctest::Approx(2.0));
    // Patients per unit-night, sorted 1, 1, 1, 2: mean 5/4; p90 at position
    // 0.9 x 3 = 2.7 between the third (1) and the fourth (2): 1.7; worst 2.
    REQUIRE(f.patients_per_unit_night_mean);
    CHECK(*f.patients_per_unit_night_mean == doctest::Approx(1.25));
    CHECK(*f.patients_per_unit_night_p90 == doctest::Approx(1.7));
    CHECK(*f.patients_per_unit_night_max == doctest::Approx(2.0));
    // Notices before time zero for patients who went on to the outcome: P1 at
    // 2 Mar 20:00, 22:00 and 3 Mar 21:00, P4 at 22:00 and 23:30: 5 of 11.
    REQUIRE(f.notice_ppv);
    CHECK(*f.notice_ppv == doctest::Approx(5.0 / 11.0));
    // Patients noticed: P1..P5; of them P1 and P4 went on to the outcome
    // (P6 had it but no notice, and does not count): 2 of 5.
    REQUIRE(f.patient_ppv);
    CHECK(*f.patient_ppv == doctest::Approx(0.4));

    SUBCASE("a patient noticed only after time zero is not counted as reached") {
        // P6 gets one notice, at 4 Mar 02:00 (A night 3), after its outcome:
        // 12 notices, still 5 true ones; 6 patients, still 2 of them.
        s.notice(5, at(4, 2));
        const PlanFigures g = s.figures();
        CHECK(*g.notice_ppv == doctest::Approx(5.0 / 12.0));
        CHECK(*g.patient_ppv == doctest::Approx(2.0 / 6.0));
        // A night 3 now has P1 and P6: 1, 1, 2, 2, mean 1.5.
        CHECK(*g.patients_per_unit_night_mean == doctest::Approx(1.5));
    }
    SUBCASE("no notice: nobody per night, and no PPV") {
        s.record.notices.clear();
        const PlanFigures g = s.figures();
        CHECK(*g.patients_per_unit_night_mean == 0);
        CHECK(*g.patients_per_unit_night_max == 0);
        CHECK_FALSE(g.notice_ppv);
        CHECK_FALSE(g.patient_ppv);
    }
    SUBCASE("the plan summary appends the new columns after the existing ones") {
        ReplicationResults r;
        r.plans.push_back({"plan", Channel::page, f});
        const Table t = plan_summary_table(r);
        REQUIRE(t.columns.size() >= 5);
        const std::vector<std::string> tail(t.columns.end() - 5, t.columns.end());
        CHECK(tail == std::vector<std::string>{"patients_per_unit_night_mean", "patients_per_unit_night_p90",
                                               "patients_per_unit_night_max", "notice_ppv", "patient_ppv"});
        CHECK(t.columns[t.columns.size() - 6] == "never_taken_up");
    }
}

TEST_CASE("patients_and_ppv.carried_across_replications") {
    // Two replications of the story: the second drops the 2 Mar 23:00 P2
    // notice, so A night 2 has one patient (P1): 1, 1, 1, 1, mean 1; PPV 5/10;
    // patients P1, P3, P4, P5 and P2 (still noticed on 3 Mar 10:00): 2 of 5.
    Story a;
    a.notice(0, at(2, 20)).notice(0, at(2, 22)).notice(1, at(2, 23)).notice(2, at(3, 2));
    a.notice(1, at(3, 10)).notice(4, at(3, 12)).notice(0, at(3, 21)).notice(3, at(3, 22));
    a.notice(3, at(3, 23, 30)).notice(0, at(4, 1)).notice(2, at(4, 8));
    Story b = a;
    b.record.notices.erase(b.record.notices.begin() + 2);
    const ReplicatedFigures rf = collect_figures({"plan"}, {{a.figures()}, {b.figures()}});
    for (const char* name : {"patients_per_unit_night_mean", "patients_per_unit_night_p90",
                             "patients_per_unit_night_max", "notice_ppv", "patient_ppv"})
        REQUIRE_MESSAGE(find_metric(name), name);
    auto mean_of = [&](const char* name) { return mean_interval(rf.of(0, metric_index(*find_metric(name)))); };
    CHECK(mean_of("patients_per_unit_night_mean").mean == doctest::Approx((1.25 + 1.0) / 2));
    CHECK(mean_of("patients_per_unit_night_mean").n == 2);
    CHECK(mean_of("notice_ppv").mean == doctest::Approx((5.0 / 11.0 + 0.5) / 2));
    CHECK(mean_of("patient_ppv").mean == doctest::Approx(0.4));
    CHECK(metric_names().find("notice_ppv") != std::string::npos);
    // The comparison table has a row, with an interval, for each new metric.
    const ComparisonTables t = comparison_tables(rf);
    const auto row = std::find_if(t.comparison.rows.begin(), t.comparison.rows.end(), [](const std::vector<Cell>& r) {
        return std::holds_alternative<std::string>(r[1]) && std::get<std::string>(r[1]) == "notice_ppv";
    });
    REQUIRE(row != t.comparison.rows.end());
    CHECK(std::holds_alternative<double>((*row)[3]));  // ci_low
    CHECK(std::get<std::int64_t>((*row)[5]) == 2);
}
