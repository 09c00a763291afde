// Staff stories: a handful of notices, a tiny roster, and the task log derived
// by hand in the comments. Times are UTC; the day shift is 07:00-19:00 and the
// night shift 19:00-07:00.
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <map>
#include <tuple>

#include "analysis/workload.hpp"
#include "report/run_tables.hpp"
#include "staff_stories.hpp"

using namespace tocsin;
using namespace tocsin::test;

namespace {

StaffRun run_story(const std::vector<Notice>& notices, const StaffModel& model, const StaffPlan& plan,
                   Instant until, std::uint64_t seed = 1) {
    const ShiftCalendar calendar = calendar_from(march(2, 7, 0), march(4, 7, 0));
    const ReplicationSeed draws{seed, 0};
    return simulate_staff(notices, model, plan, calendar, until, draws);
}

// The row of `table` whose first columns equal `keys`.
const std::vector<Cell>& row_of(const Table& table, const std::vector<std::string>& keys) {
    for (const auto& row : table.rows) {
        bool match = true;
        for (std::size_t k = 0; k < keys.size(); ++k) match = match && std::get<std::string>(row[k]) == keys[k];
        if (match) return row;
    }
    FAIL("no row for " << keys.front());
    throw;  // unreachable
}

template <class T>
T cell(const Table& table, const std::vector<Cell>& row, const std::string& column) {
    const auto at = std::find(table.columns.begin(), table.columns.end(), column) - table.columns.begin();
    REQUIRE(static_cast<std::size_t>(at) < table.columns.size());
    return std::get<T>(row[at]);
}

}  // namespace

TEST_CASE("staff.two_nurses_three_tasks_one_escalation") {
    // Two ward nurses (30 min per evaluation) and one charge nurse (20 min) on
    // nights; a task not taken up by a ward nurse within the timeout goes to the
    // charge nurse. Notices at 21:00, 21:05 and 21:10 on 2 March.
    const std::vector<Notice> notices = {notice_at(march(2, 21, 0)), notice_at(march(2, 21, 5)),
                                         notice_at(march(2, 21, 10))};
    auto model_with_timeout = [](double timeout_minutes) {
        return model_of({role("ward nurse", {2, 2}, FixedMinutes{30}), role("charge nurse", {1, 1}, FixedMinutes{20})},
                        {{"ward nurse", "charge nurse", timeout_minutes}});
    };
    const StaffPlan plan;  // first role 0 (ward nurse), FIFO, hand over
    const Instant until = march(2, 23, 0);

    SUBCASE("timeout 10 min: the third task escalates") {
        // 21:00 nurse A starts task 0 (ends 21:30); 21:05 nurse B starts task 1
        // (ends 21:35); 21:10 task 2 waits; 21:20 its timeout falls while both are
        // busy, so it moves to the charge nurse, who is free: 21:20-21:40.
        const StaffModel model = model_with_timeout(10);
        const StaffRun run = run_story(notices, model, plan, until);
        REQUIRE(run.tasks.size() == 3);
        CHECK(run.tasks[0].started_at == march(2, 21, 0));
        CHECK(run.tasks[0].ended_at == march(2, 21, 30));
        CHECK(run.tasks[0].fate == TaskFate::finished);
        CHECK(run.tasks[1].started_at == march(2, 21, 5));
        CHECK(run.tasks[1].ended_at == march(2, 21, 35));
        const TaskRecord& t2 = run.tasks[2];
        CHECK(t2.escalations == 1);
        CHECK(t2.role == 1);
        CHECK(t2.first_role == 0);
        CHECK(t2.started_at == march(2, 21, 20));
        CHECK(t2.ended_at == march(2, 21, 40));
        CHECK(t2.wait_seconds() == minutes(10));
        CHECK(t2.fate == TaskFate::escalated_then_finished);

        const PlanStaffRun pr{"night pages", &model, plan, &run};
        const ShiftCalendar calendar = calendar_from(march(2, 7, 0), march(4, 7, 0));
        const Table workload = staff_workload_table(staff_workload(std::span(&pr, 1), calendar));
        // Shifts in the run (07:00 to 23:00): the day shift and the night shift.
        const auto& ward = row_of(workload, {"night pages", "ward nurse"});
        CHECK(cell<std::int64_t>(workload, ward, "team_shifts") == 2);
        CHECK(cell<std::int64_t>(workload, ward, "staff_shifts") == 4);
        CHECK(cell<std::int64_t>(workload, ward, "tasks_arrived") == 3);
        CHECK(cell<std::int64_t>(workload, ward, "tasks_started") == 2);
        // 60 busy minutes, all at night: shifts {0, 60} -> mean 30.
        CHECK(cell<double>(workload, ward, "staff_minutes_per_shift_mean") == doctest::Approx(30));
        // Rostered: 2 nurses x (12 h day + 4 h of night until 23:00) = 1920 min.
        CHECK(cell<double>(workload, ward, "utilisation") == doctest::Approx(60.0 / 1920.0));
        CHECK(cell<double>(workload, ward, "wait_minutes_max") == doctest::Approx(0));
        const auto& charge = row_of(workload, {"night pages", "charge nurse"});
        CHECK(cell<std::int64_t>(workload, charge, "tasks_arrived") == 1);
        CHECK(cell<double>(workload, charge, "wait_minutes_median") == doctest::Approx(10));

        const Table escalations = escalation_table(tocsin::escalations(std::span(&pr, 1)));
        REQUIRE(escalations.rows.size() == 1);
        CHECK(cell<std::int64_t>(escalations, escalations.rows[0], "tasks_escalated") == 1);
        CHECK(cell<double>(escalations, escalations.rows[0], "timeout_minutes") == doctest::Approx(10));
    }
    SUBCASE("timeout 20 min: a finish at the timeout instant wins") {
        // Task 2's timeout falls at 21:30, the instant nurse A finishes task 0.
        // Finishes run before timeouts, so nurse A takes it up: 21:30-22:00.
        const StaffRun run = run_story(notices, model_with_timeout(20), plan, until);
        CHECK(run.tasks[2].escalations == 0);
        CHECK(run.tasks[2].role == 0);
        CHECK(run.tasks[2].started_at == march(2, 21, 30));
        CHECK(run.tasks[2].ended_at == march(2, 22, 0));
        CHECK(run.tasks[2].fate == TaskFate::finished);
    }
}

TEST_CASE("staff.queue_discipline") {
    // One nurse, 30 min each. Notices 21:00 (score 0.5), 21:05 (0.2), 21:10 (0.9).
    // FIFO:     task 0 21:00-21:30, task 1 21:30-22:00, task 2 22:00-22:30.
    // Priority: task 0 21:00-21:30, task 2 21:30-22:00, task 1 22:00-22:30.
    const std::vector<Notice> notices = {notice_at(march(2, 21, 0), 0.5), notice_at(march(2, 21, 5), 0.2),
                                         notice_at(march(2, 21, 10), 0.9)};
    const StaffModel model = model_of({role("ward nurse", {1, 1}, FixedMinutes{30})});
    StaffPlan plan;
    SUBCASE("fifo") {
        const StaffRun run = run_story(notices, model, plan, march(2, 23, 0));
        CHECK(run.tasks[1].started_at == march(2, 21, 30));
        CHECK(run.tasks[2].started_at == march(2, 22, 0));
    }
    SUBCASE("priority by score") {
        plan.discipline = QueueDiscipline::priority_by_score;
        const StaffRun run = run_story(notices, model, plan, march(2, 23, 0));
        CHECK(run.tasks[2].started_at == march(2, 21, 30));
        CHECK(run.tasks[1].started_at == march(2, 22, 0));
    }
}

TEST_CASE("staff.shift_end") {
    // One nurse on each shift, 30 min per task. A notice at 18:50 starts at
    // once and would end at 19:20, after the day nurse's shift ends at 19:00.
    const std::vector<Notice> notices = {notice_at(march(2, 18, 50))};
    const ShiftCalendar calendar = calendar_from(march(2, 7, 0), march(4, 7, 0));
    StaffPlan plan;
    SUBCASE("hand over: the night nurse finishes it at 19:20") {
        const StaffModel model = model_of({role("ward nurse", {1, 1}, FixedMinutes{30})});
        const StaffRun run = run_story(notices, model, plan, march(2, 23, 0));
        CHECK(run.tasks[0].handed_over);
        CHECK(run.tasks[0].ended_at == march(2, 19, 20));
        CHECK(run.tasks[0].overtime_seconds == 0);
        CHECK(run.tasks[0].fate == TaskFate::finished);
        // Staff minutes are counted where they were worked: 10 by day, 20 by night.
        const PlanStaffRun pr{"p", &model, plan, &run};
        const Table w = staff_workload_table(staff_workload(std::span(&pr, 1), calendar));
        CHECK(cell<double>(w, w.rows[0], "staff_minutes_per_shift_mean") == doctest::Approx(15));
        CHECK(cell<double>(w, w.rows[0], "staff_minutes_per_shift_p90") == doctest::Approx(10 + 0.9 * 10));
        CHECK(cell<std::int64_t>(w, w.rows[0], "handed_over") == 1);
    }
    SUBCASE("hand over with nobody on nights: overtime, and a queued task is never taken up") {
        // The night roster is empty, so the day nurse finishes task 0 in 20 min
        // of overtime. Task 1 (18:55) waits behind it; nobody comes until 07:00,
        // after the run ends at 23:00: never taken up.
        const StaffModel model = model_of({role("ward nurse", {1, 0}, FixedMinutes{30})});
        const std::vector<Notice> two = {notice_at(march(2, 18, 50)), notice_at(march(2, 18, 55))};
        const StaffRun run = run_story(two, model, plan, march(2, 23, 0));
        CHECK_FALSE(run.tasks[0].handed_over);
        CHECK(run.tasks[0].overtime_seconds == minutes(20));
        CHECK(run.tasks[0].ended_at == march(2, 19, 20));
        CHECK(run.tasks[1].fate == TaskFate::never_taken_up);
        CHECK_FALSE(run.tasks[1].started());
        const PlanStaffRun pr{"p", &model, plan, &run};
        const Table w = staff_workload_table(staff_workload(std::span(&pr, 1), calendar));
        CHECK(cell<double>(w, w.rows[0], "overtime_minutes") == doctest::Approx(20));
        CHECK(cell<std::int64_t>(w, w.rows[0], "never_taken_up") == 1);
    }
    SUBCASE("hand over to a smaller night team: the task nearest completion stays with its nurse") {
        // Two day nurses, one night nurse. Task 0 at 18:40 (ends 19:10), task 1 at
        // 18:50 (ends 19:20). At 19:00 one nurse comes on for two tasks in
        // progress: task 0, ten minutes from done, is finished by its day nurse in
        // 10 min of overtime; task 1 is handed over and ends at 19:20. A notice
        // at 19:05 waits for the night nurse until 19:20 (the overtime nurse
        // takes nothing new), so it runs 19:20-19:50.
        const StaffModel model = model_of({role("ward nurse", {2, 1}, FixedMinutes{30})});
        const std::vector<Notice> three = {notice_at(march(2, 18, 40)), notice_at(march(2, 18, 50)),
                                           notice_at(march(2, 19, 5))};
        const StaffRun run = run_story(three, model, plan, march(2, 23, 0));
        CHECK_FALSE(run.tasks[0].handed_over);
        CHECK(run.tasks[0].overtime_seconds == minutes(10));
        CHECK(run.tasks[0].ended_at == march(2, 19, 10));
        CHECK(run.tasks[1].handed_over);
        CHECK(run.tasks[1].overtime_seconds == 0);
        CHECK(run.tasks[1].ended_at == march(2, 19, 20));
        CHECK(run.tasks[2].started_at == march(2, 19, 20));
        CHECK(run.tasks[2].ended_at == march(2, 19, 50));
    }
    SUBCASE("drop: abandoned at 19:00 and counted") {
        plan.at_shift_end = ShiftEndPolicy::drop;
        const StaffModel model = model_of({role("ward nurse", {1, 1}, FixedMinutes{30})});
        const StaffRun run = run_story(notices, model, plan, march(2, 23, 0));
        CHECK(run.tasks[0].fate == TaskFate::dropped_at_shift_end);
        CHECK(run.tasks[0].started_at == march(2, 18, 50));
        CHECK(run.tasks[0].ended_at == march(2, 19, 0));
        const PlanStaffRun pr{"p", &model, plan, &run};
        const Table w = staff_workload_table(staff_workload(std::span(&pr, 1), calendar));
        CHECK(cell<std::int64_t>(w, w.rows[0], "dropped") == 1);
        CHECK(cell<double>(w, w.rows[0], "staff_minutes_per_shift_mean") == doctest::Approx(5));
    }
}

TEST_CASE("staff.run_end_and_loss") {
    const StaffModel model = model_of({role("ward nurse", {1, 1}, FixedMinutes{30})});
    SUBCASE("a task still in progress when the run ends") {
        // 22:50 start, would end 23:20; the run ends at 23:00.
        const StaffRun run = run_story({notice_at(march(2, 22, 50))}, model, StaffPlan{}, march(2, 23, 0));
        CHECK(run.tasks[0].fate == TaskFate::in_progress_at_end);
        CHECK(run.tasks[0].ended_at == march(2, 23, 0));
    }
    SUBCASE("loss system: the second notice finds the nurse busy and is dropped") {
        StaffPlan plan;
        plan.when_all_busy = WhenAllBusy::drop;
        const StaffRun run =
            run_story({notice_at(march(2, 21, 0)), notice_at(march(2, 21, 10)), notice_at(march(2, 21, 30))}, model,
                      plan, march(2, 23, 0));
        CHECK(run.tasks[0].fate == TaskFate::finished);
        CHECK(run.tasks[1].fate == TaskFate::dropped_nobody_free);
        CHECK(run.tasks[1].ended_at == march(2, 21, 10));
        // 21:30: the nurse finishes task 0 at that instant, before the notice is handled.
        CHECK(run.tasks[2].started_at == march(2, 21, 30));
    }
}

TEST_CASE("staff.per_unit_teams") {
    // One ward nurse on each of two units, one rapid-response nurse for the
    // hospital after 15 min. Notices at 21:00 on unit 0, unit 1, unit 0:
    // unit 0's nurse takes the first, unit 1's the second; the third waits on
    // unit 0 and at 21:15 goes to the rapid-response nurse (21:15-21:45).
    const StaffModel model =
        model_of({role("ward nurse", {1, 1}, FixedMinutes{30}, true), role("rapid-response nurse", {1, 1}, FixedMinutes{30})},
                 {{"ward nurse", "rapid-response nurse", 15}}, 2);
    const std::vector<Notice> notices = {notice_at(march(2, 21, 0), 0.5, 0), notice_at(march(2, 21, 0), 0.5, 1),
                                         notice_at(march(2, 21, 0), 0.5, 0)};
    const StaffRun run = run_story(notices, model, StaffPlan{}, march(2, 23, 0));
    CHECK(run.tasks[0].started_at == march(2, 21, 0));
    CHECK(run.tasks[1].started_at == march(2, 21, 0));
    CHECK(run.tasks[2].role == 1);
    CHECK(run.tasks[2].started_at == march(2, 21, 15));
    REQUIRE(run.teams.size() == 3);  // ward nurse on units 0 and 1, rapid response
    // Waiting integral: task 2 waited 15 min on unit 0's team.
    CHECK(run.teams[0].waiting_task_seconds == doctest::Approx(15 * 60));
    CHECK(run.teams[1].waiting_task_seconds == doctest::Approx(0));
}

TEST_CASE("staff.roster_by_weekday") {
    Roster roster;
    roster.by_shift = {3, 2};
    roster.by_weekday.assign(7, {3, 2});
    roster.by_weekday[6] = {1, 1};  // Sunday
    const ShiftCalendar calendar = calendar_from(march(7, 7, 0), march(9, 8, 0));  // Sat 7 .. Mon 9 March
    std::map<std::string, int> heads;
    for (const Shift& s : calendar.shifts())
        heads[std::to_string(s.weekday) + "/" + std::to_string(s.pattern_index)] = headcount(roster, s);
    CHECK(heads.at("5/0") == 3);  // Saturday day
    CHECK(heads.at("6/0") == 1);  // Sunday day
    CHECK(heads.at("6/1") == 1);  // Sunday night
    CHECK(heads.at("0/0") == 3);  // Monday day

    // A Sunday day shift with one nurse: the second of two simultaneous notices waits.
    StaffModel model = model_of({role("ward nurse", {3, 2}, FixedMinutes{30})});
    model.roles[0].roster = roster;
    const ShiftCalendar cal = calendar_from(march(8, 7, 0), march(9, 7, 0));
    const ReplicationSeed draws{1, 0};
    const StaffRun run = simulate_staff(std::vector<Notice>{notice_at(march(8, 10, 0)), notice_at(march(8, 10, 0))},
                                        model, StaffPlan{}, cal, march(8, 18, 0), draws);
    CHECK(run.tasks[1].started_at == march(8, 10, 30));
}

TEST_CASE("staff.common_random_numbers") {
    // A task needs the same minutes whatever the roster: draws are keyed by the
    // notice and the escalation step, so a bigger team changes waits only.
    std::vector<Notice> notices;
    for (int k = 0; k < 40; ++k) notices.push_back(notice_at(march(2, 8, 0) + k * minutes(7)));
    auto run_with = [&](int nurses, std::uint64_t replication) {
        const StaffModel model = model_of({role("ward nurse", {nurses, nurses}, ExponentialMinutes{20})});
        const ShiftCalendar calendar = calendar_from(march(2, 7, 0), march(4, 7, 0));
        const ReplicationSeed draws{11, replication};
        return simulate_staff(notices, model, StaffPlan{}, calendar, march(3, 7, 0), draws);
    };
    const StaffRun one = run_with(1, 0), three = run_with(3, 0), again = run_with(1, 0), other = run_with(1, 1);
    int differ_in_wait = 0, differ_in_minutes_other_rep = 0;
    for (std::size_t k = 0; k < notices.size(); ++k) {
        CHECK(one.tasks[k].service_seconds == three.tasks[k].service_seconds);
        CHECK(one.tasks[k].started_at == again.tasks[k].started_at);
        differ_in_wait += one.tasks[k].started_at != three.tasks[k].started_at;
        differ_in_minutes_other_rep += one.tasks[k].service_seconds != other.tasks[k].service_seconds;
    }
    CHECK(differ_in_wait > 0);
    // Another replication draws independently. Two exponential draws of mean
    // 1,200 s rounded to whole seconds coincide with probability about
    // 1 / (2 x 1,200) (the sum of squared point probabilities), so among 40
    // pairs about 0.017 coincide; three or more would happen with probability
    // under 1e-6. (This seed has one: task 33 needs 16 s in both.)
    CHECK(differ_in_minutes_other_rep >= static_cast<int>(notices.size()) - 2);
}

TEST_CASE("staff.minutes_keyed_by_notice_not_by_position") {
    // Plan b has plan a's notices plus others interleaved (two of them for the
    // same patient at the same instant as one of a's): every notice of a gets
    // the same minutes in b, at the first role and, after an escalation, at the
    // second. Those minutes are the first draw of the task's own stream
    // (seed, replication, task_minutes, entity of encounter, instant,
    // occurrence, escalation step), computed here from the published key.
    const StaffModel model =
        model_of({role("ward nurse", {0, 0}, GammaMinutes{15, 6}), role("charge nurse", {3, 3}, ExponentialMinutes{20})},
                 {{"ward nurse", "charge nurse", 10}});
    const ShiftCalendar calendar = calendar_from(march(2, 7, 0), march(4, 7, 0));
    std::vector<Notice> a, b;
    for (int k = 0; k < 30; ++k) {
        const Notice n = notice_at(march(2, 8, 0) + k * minutes(11), 0.5, 0, static_cast<std::uint32_t>(k % 7));
        a.push_back(n);
        b.push_back(notice_at(n.at, 0.7, 0, 100 + static_cast<std::uint32_t>(k)));  // another patient, same instant
        b.push_back(n);
        if (k == 12) b.push_back(n);  // the same patient twice at one instant: the second is occurrence 1
    }
    const ReplicationSeed draws{17, 3};
    const StaffRun ra = simulate_staff(a, model, StaffPlan{}, calendar, march(3, 7, 0), draws);
    const StaffRun rb = simulate_staff(b, model, StaffPlan{}, calendar, march(3, 7, 0), draws);
    std::map<std::tuple<std::uint32_t, Instant, int>, Seconds> minutes_in_b;
    std::map<std::pair<std::uint32_t, Instant>, int> seen;
    for (const TaskRecord& t : rb.tasks) minutes_in_b[{t.encounter, t.created, seen[{t.encounter, t.created}]++}] = t.service_seconds;
    for (const TaskRecord& t : ra.tasks) {
        CAPTURE(t.notice);
        REQUIRE(t.started());
        CHECK(t.escalations == 1);  // nobody staffs the ward nurse role: every task reaches the charge nurse
        CHECK(t.service_seconds == minutes_in_b.at({t.encounter, t.created, 0}));
        SplitMixEngine own = make_short_stream(draws, StreamPurpose::task_minutes,
                                               task_minutes_entity(t.encounter, t.created, 0, 1));
        CHECK(t.service_seconds == draw_seconds(ExponentialMinutes{20}, own));
    }
    // The repeated notice is a task of its own with its own minutes.
    const Instant twice = march(2, 8, 0) + 12 * minutes(11);
    CHECK(minutes_in_b.at({12 % 7, twice, 1}) != minutes_in_b.at({12 % 7, twice, 0}));
}

TEST_CASE("staff.keyed_minutes_statistics") {
    // Keying each task's minutes by its own entity replaced one long stream per
    // plan by many one-task streams. 20,000 tasks (one patient per notice, 3 min
    // apart, ample staff) at a gamma role of mean 20 min and sd 8 min: the
    // sample mean is within 4 standard errors (8 / sqrt(20000) = 0.057 min), the
    // sample sd within 4 of its standard errors (about sd x sqrt((kurtosis - 1) / (4n)),
    // gamma shape 6.25 so excess kurtosis 6 / 6.25 = 0.96, kurtosis 3.96: 0.049 min),
    // and neighbouring tasks' minutes are uncorrelated (lag-1 correlation
    // within 4 / sqrt(n) = 0.028). Seed fixed.
    const int n = 20000;
    std::vector<Notice> notices;
    for (int k = 0; k < n; ++k)
        notices.push_back(notice_at(march(2, 8, 0) + k * minutes(3), 0.5, 0, static_cast<std::uint32_t>(k)));
    const StaffModel model = model_of({role("nurse", {40, 40}, GammaMinutes{20, 8})});
    const ShiftCalendar calendar = calendar_from(march(2, 7, 0), march(5, 7, 0) + days(40));
    const StaffRun run = simulate_staff(notices, model, StaffPlan{}, calendar, march(5, 7, 0) + days(40),
                                        ReplicationSeed{2026, 0});
    std::vector<double> x;
    for (const TaskRecord& t : run.tasks) {
        REQUIRE(t.started());
        x.push_back(static_cast<double>(t.service_seconds) / 60.0);
    }
    double mean = 0;
    for (double v : x) mean += v;
    mean /= n;
    double ss = 0, lag = 0;
    for (int k = 0; k < n; ++k) {
        ss += (x[k] - mean) * (x[k] - mean);
        if (k > 0) lag += (x[k] - mean) * (x[k - 1] - mean);
    }
    const double sd = std::sqrt(ss / (n - 1));
    CHECK(std::abs(mean - 20.0) < 4 * 8.0 / std::sqrt(n));
    CHECK(std::abs(sd - 8.0) < 4 * 8.0 * std::sqrt((3.96 - 1) / (4.0 * n)));
    CHECK(std::abs(lag / ss) < 4 / std::sqrt(n));
}

TEST_CASE("staff.bad_input") {
    const StaffModel model = model_of({role("ward nurse", {1, 1}, FixedMinutes{30})});
    const ShiftCalendar calendar = calendar_from(march(2, 7, 0), march(4, 7, 0));
    const ReplicationSeed draws{1, 0};
    const std::vector<Notice> unsorted = {notice_at(march(2, 21, 0)), notice_at(march(2, 20, 0))};
    CHECK_THROWS_WITH_AS(simulate_staff(unsorted, model, StaffPlan{}, calendar, march(3, 0, 0), draws),
                         doctest::Contains("sorted by time"), std::invalid_argument);
    const std::vector<Notice> late = {notice_at(march(3, 1, 0))};
    CHECK_THROWS_WITH_AS(simulate_staff(late, model, StaffPlan{}, calendar, march(3, 0, 0), draws),
                         doctest::Contains("outside the run"), std::invalid_argument);
    const std::vector<Notice> wrong_unit = {notice_at(march(2, 21, 0), 0.5, 4)};
    CHECK_THROWS_WITH_AS(simulate_staff(wrong_unit, model, StaffPlan{}, calendar, march(3, 0, 0), draws),
                         doctest::Contains("names unit 4"), std::invalid_argument);
    StaffModel short_roster = model;
    short_roster.roles[0].roster.by_shift = {1};
    CHECK(staff_model_problems(short_roster, day_night()).find("has 1 headcounts; expected 2") != std::string::npos);
    StaffModel negative = model;
    negative.roles[0].roster.by_weekday.assign(7, {1, 1});
    negative.roles[0].roster.by_weekday[2] = {1, -1};
    CHECK(staff_model_problems(negative, day_night()).find("roster for Wednesday: headcount must be >= 0") !=
          std::string::npos);
}
