// Other work (sim/other_work.hpp): hand-worked stories of how it competes
// with alert tasks for the same staff, and the draws of its arrivals.
#include <doctest/doctest.h>

#include <cmath>

#include "sim/other_work.hpp"
#include "staff_stories.hpp"

using namespace tocsin;
using namespace tocsin::test;

namespace {

const ReplicationSeed draws{7, 0};

// One hospital-wide role of one person on every shift; alert tasks take a
// fixed 10 minutes; other work of class 0 ("ward calls") with `priority`.
StaffModel one_nurse(OtherWorkPriority priority) {
    Role r = role("rapid response nurse", {1, 1}, FixedMinutes{10.0});
    r.other_work.push_back(OtherWorkClass{"ward calls", {}, FixedMinutes{15.0}, priority});
    return model_of({r}, {});
}

OtherTask call_at(Instant at, double minutes) { return OtherTask{at, static_cast<Seconds>(minutes * 60), 0, 0, 0}; }

StaffRun run(const std::vector<Notice>& notices, const std::vector<OtherTask>& other, const StaffModel& model,
             QueueDiscipline discipline = QueueDiscipline::fifo) {
    StaffPlan plan;
    plan.discipline = discipline;
    return simulate_staff(notices, other, model, plan, calendar_from(march(2, 7, 0), march(3, 7, 0)), march(3, 7, 0),
                          draws);
}

}  // namespace

TEST_CASE("other_work.equal_priority_is_first_come_first_served") {
    // 10:00 a ward call (20 min) occupies the only nurse until 10:20. A notice
    // at 10:05 waits 15 minutes, starts at 10:20 and ends at 10:30.
    const StaffRun r = run({notice_at(march(2, 10, 5))}, {call_at(march(2, 10, 0), 20)},
                           one_nurse(OtherWorkPriority::with_alerts));
    REQUIRE(r.tasks.size() == 1);
    REQUIRE(r.other_tasks.size() == 1);
    CHECK(r.other_tasks[0].started_at == march(2, 10, 0));
    CHECK(r.other_tasks[0].ended_at == march(2, 10, 20));
    CHECK(r.other_tasks[0].fate == TaskFate::finished);
    CHECK(r.tasks[0].started_at == march(2, 10, 20));
    CHECK(r.tasks[0].wait_seconds() == minutes(15));
    CHECK(r.tasks[0].ended_at == march(2, 10, 30));
    // The team's busy integral holds both: 20 + 10 minutes.
    CHECK(r.teams[0].busy_staff_seconds == doctest::Approx(30 * 60));
}

TEST_CASE("other_work.priority_above_and_below_alerts") {
    // A notice at 10:00 holds the nurse until 10:10. A second notice joins the
    // queue at 10:02, a ward call (15 min) at 10:05.
    const std::vector<Notice> notices = {notice_at(march(2, 10, 0)), notice_at(march(2, 10, 2))};
    const std::vector<OtherTask> call = {call_at(march(2, 10, 5), 15)};
    SUBCASE("above: the call is taken up at 10:10 although it came later; the notice waits until 10:25") {
        const StaffRun r = run(notices, call, one_nurse(OtherWorkPriority::above_alerts));
        CHECK(r.other_tasks[0].started_at == march(2, 10, 10));
        CHECK(r.tasks[1].started_at == march(2, 10, 25));
        CHECK(r.tasks[1].ended_at == march(2, 10, 35));
    }
    SUBCASE("equal: first come, first served: the notice at 10:10, the call at 10:20") {
        const StaffRun r = run(notices, call, one_nurse(OtherWorkPriority::with_alerts));
        CHECK(r.tasks[1].started_at == march(2, 10, 10));
        CHECK(r.other_tasks[0].started_at == march(2, 10, 20));
    }
    SUBCASE("below: a call waiting since 10:01 still lets a 10:05 notice go first") {
        const StaffRun r = run({notices[0], notice_at(march(2, 10, 5))}, {call_at(march(2, 10, 1), 15)},
                               one_nurse(OtherWorkPriority::below_alerts));
        CHECK(r.tasks[1].started_at == march(2, 10, 10));
        CHECK(r.other_tasks[0].started_at == march(2, 10, 20));
        CHECK(r.other_tasks[0].wait_seconds() == minutes(19));
    }
    SUBCASE("equal under highest score first: the call has no score and goes after waiting notices") {
        const StaffRun r = run({notices[0], notice_at(march(2, 10, 5))}, {call_at(march(2, 10, 1), 15)},
                               one_nurse(OtherWorkPriority::with_alerts), QueueDiscipline::priority_by_score);
        CHECK(r.tasks[1].started_at == march(2, 10, 10));
        CHECK(r.other_tasks[0].started_at == march(2, 10, 20));
    }
    SUBCASE("nothing preempts: a call of priority above arriving at 10:05 waits for the evaluation begun at 10:00") {
        const StaffRun r = run({notices[0]}, call, one_nurse(OtherWorkPriority::above_alerts));
        CHECK(r.tasks[0].ended_at == march(2, 10, 10));
        CHECK(r.other_tasks[0].started_at == march(2, 10, 10));
    }
}

TEST_CASE("other_work.never_escalates_and_at_one_instant_the_notice_goes_first") {
    // Escalation after 5 minutes to a doctor on duty. At 10:00 a notice and a
    // call arrive together; the notice (numbered first) takes the nurse until
    // 10:10. The call waits 10 minutes at its own role, never moving to the
    // doctor, while a second notice at 10:01 escalates at 10:06 to the doctor.
    Role nurse = role("nurse", {1, 1}, FixedMinutes{10.0});
    nurse.other_work.push_back(OtherWorkClass{"ward calls", {}, FixedMinutes{15.0}, OtherWorkPriority::with_alerts});
    const StaffModel model = model_of({nurse, role("doctor", {1, 1}, FixedMinutes{10.0})}, {{"nurse", "doctor", 5.0}});
    const StaffRun r = run({notice_at(march(2, 10, 0)), notice_at(march(2, 10, 1))}, {call_at(march(2, 10, 0), 15)}, model);
    CHECK(r.tasks[0].started_at == march(2, 10, 0));
    CHECK(r.other_tasks[0].started_at == march(2, 10, 10));
    CHECK(r.other_tasks[0].role == 0);
    CHECK(r.other_tasks[0].escalations == 0);
    CHECK(r.tasks[1].role == 1);
    CHECK(r.tasks[1].started_at == march(2, 10, 6));
    CHECK(r.tasks[1].fate == TaskFate::escalated_then_finished);
}

TEST_CASE("other_work.handed_over_at_shift_end_like_alert_work") {
    // A 60-minute call begun at 18:30 is handed over at 19:00 to the night
    // nurse, who finishes it at 19:30; a notice at 19:10 waits until then.
    const StaffRun r = run({notice_at(march(2, 19, 10))}, {call_at(march(2, 18, 30), 60)},
                           one_nurse(OtherWorkPriority::with_alerts));
    CHECK(r.other_tasks[0].handed_over);
    CHECK(r.other_tasks[0].ended_at == march(2, 19, 30));
    CHECK(r.tasks[0].started_at == march(2, 19, 30));
}

TEST_CASE("other_work.arrivals_follow_the_rate_by_hour") {
    // 0.5 tasks per hour from 08:00 to 19:59, none at night, over 400 days
    // on UTC: expected 0.5 x 12 x 400 = 2,400 tasks; the count is Poisson, so
    // its standard deviation is sqrt(2400) = 49; tolerance 4 sd (196).
    Role r = role("ward nurse", {1, 1}, FixedMinutes{10.0}, true);
    OtherWorkClass care{"regular care", {}, ExponentialMinutes{12.0}, OtherWorkPriority::below_alerts};
    for (int h = 8; h < 20; ++h) care.per_hour[static_cast<std::size_t>(h)] = 0.5;
    r.other_work.push_back(care);
    const Instant from = march(2, 0, 0), until = from + days(400);
    const std::vector<Role> roles = {r};
    const auto tasks = generate_other_work(roles, 2, TimeZone::utc(), from, until, draws);
    CHECK(expected_other_work(care, TimeZone::utc(), from, until) == doctest::Approx(2400.0));
    for (std::uint32_t unit : {0u, 1u}) {
        CAPTURE(unit);
        double count = 0, minutes_sum = 0;
        for (const OtherTask& t : tasks)
            if (t.unit == unit) {
                ++count;
                minutes_sum += static_cast<double>(t.service_seconds) / 60.0;
                const int hour = static_cast<int>((t.at % 86400) / 3600);
                CHECK((hour >= 8 && hour < 20));
            }
        CHECK(std::abs(count - 2400.0) < 4 * std::sqrt(2400.0));
        // Mean minutes: exponential of mean 12, sd 12 / sqrt(2400) = 0.245; 4 sd.
        CHECK(std::abs(minutes_sum / count - 12.0) < 4 * 12.0 / std::sqrt(count));
    }
    for (std::size_t k = 1; k < tasks.size(); ++k) CHECK(tasks[k - 1].at <= tasks[k].at);
}

TEST_CASE("other_work.draws_are_keyed_by_role_unit_and_class") {
    // Adding a class, or a role with its own other work ahead of it, moves no
    // task of an existing class (common random numbers).
    Role nurse = role("ward nurse", {1, 1}, FixedMinutes{10.0});
    nurse.other_work.push_back(OtherWorkClass{"regular care", {}, ExponentialMinutes{12.0}, OtherWorkPriority::below_alerts});
    nurse.other_work[0].per_hour.fill(0.3);
    Role rrt = role("rapid response nurse", {1, 1}, FixedMinutes{10.0});
    rrt.other_work.push_back(OtherWorkClass{"ward calls", {}, FixedMinutes{20.0}, OtherWorkPriority::above_alerts});
    rrt.other_work[0].per_hour.fill(0.2);
    const Instant from = march(2, 0, 0), until = from + days(30);
    const std::vector<Role> alone = {nurse};
    std::vector<Role> more = {rrt, nurse};
    more[1].other_work.insert(more[1].other_work.begin(),
                              OtherWorkClass{"admissions", {}, FixedMinutes{30.0}, OtherWorkPriority::with_alerts});
    more[1].other_work[0].per_hour.fill(0.1);
    const auto a = generate_other_work(alone, 1, TimeZone::utc(), from, until, draws);
    const auto b = generate_other_work(more, 1, TimeZone::utc(), from, until, draws);
    std::vector<std::pair<Instant, Seconds>> care_a, care_b;
    for (const OtherTask& t : a) care_a.emplace_back(t.at, t.service_seconds);
    for (const OtherTask& t : b)
        if (t.role == 1 && t.work_class == 1) care_b.emplace_back(t.at, t.service_seconds);
    CHECK(care_a.size() > 100);
    CHECK(care_a == care_b);
    // Another seed or replication gives other tasks.
    const auto c = generate_other_work(alone, 1, TimeZone::utc(), from, until, ReplicationSeed{7, 1});
    CHECK((c.size() != a.size() || c.front().at != a.front().at));
}
