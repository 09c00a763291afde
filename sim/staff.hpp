#pragma once
// Staff: roles with rosters answer the tasks that notices create. A task waits
// while everyone on duty in its role is busy; if nobody takes it up within the
// timeout on its role's escalation edge it moves to the next role.
//
// Decisions (documented here and in the README):
// - Minutes per task are keyed by the task, not by its place in any list: the
//   stream of (seed, replication, task_minutes, entity_key(encounter, notice
//   instant, occurrence, escalation step)), drawn when the task starts at the
//   role that step reached. `occurrence` counts earlier notices of the same
//   encounter at the same instant in this plan (0 almost always). So the same
//   notice for the same patient draws the same numbers in every plan, whatever
//   the roster, the queue discipline, the other plans or the plan's position
//   in the scenario (common random numbers); an escalated task draws afresh at
//   each step. The key holds the step, not the role's name: a sweep's staffing
//   axis answers with copies of a role under other names, and two plans paging
//   different roles should differ by the roles' minute distributions only, not
//   by their draws.
// - Simultaneous events run in this order: shift change, task finishes, then
//   escalation timeouts, then new notices (in input order), then new other work. So a colleague who
//   finishes at the instant a timeout falls takes the task up before it
//   escalates, and staff freed at an instant serve notices of that instant.
// - End of shift, policy `hand_over` (default): an evaluation in progress is
//   handed over to an incoming colleague of the same role, who continues it
//   (it keeps its finish time and occupies one of the incoming staff). When the
//   incoming shift has fewer people than tasks in progress, the outgoing staff
//   finish the surplus (those nearest completion) in overtime; they take no new
//   task. Both are visible in the record (handed_over, overtime_seconds).
//   Policy `drop`: an evaluation in progress at shift end is abandoned and
//   counted (fate dropped_at_shift_end). Tasks still waiting stay in the queue
//   for the incoming shift under either policy.
// - Queue: FIFO by the time the task joined the role's queue (an escalated
//   task joins at the back), or highest score first (ties FIFO). Ties at one
//   instant go in notice order. Other work (sim/other_work.hpp) enters by its
//   declared priority before anything else: a waiting task of priority
//   `above` is taken up before every waiting alert task, one of `below` after
//   all of them; one of `equal` shares the alert tasks' queue, FIFO by joining
//   time under fifo (an alert task first at the same instant), and after the
//   alert tasks waiting under priority_by_score (it has no score). Nothing
//   preempts work already begun.
#include <cstdint>
#include <limits>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "models/random_streams.hpp"
#include "models/time.hpp"
#include "sim/escalation.hpp"
#include "sim/notice.hpp"
#include "sim/other_work.hpp"
#include "sim/service_time.hpp"
#include "sim/shifts.hpp"

namespace tocsin {

// Headcount on duty, per daily shift start of the ShiftPattern.
struct Roster {
    std::vector<int> by_shift;                 // one per pattern start, e.g. {day, night}
    std::vector<std::vector<int>> by_weekday;  // empty, or 7 rows (Monday..Sunday) like by_shift, overriding it
};
int headcount(const Roster& roster, const Shift& shift);

struct Role {
    std::string name;             // e.g. "ward nurse"
    bool per_unit = false;        // one team on each unit (true) or one team for the hospital
    Roster roster;                // per unit when per_unit
    ServiceTime minutes_per_task = FixedMinutes{15.0};
    std::vector<OtherWorkClass> other_work;  // work no score raised, competing for the same staff
};

struct StaffModel {
    std::vector<Role> roles;
    EscalationGraph escalation;   // over the same roles in the same order
    std::uint32_t unit_count = 1; // units of per-unit roles; notices name a unit below this
};

// Empty when usable, else every problem, one per line, naming the role.
std::string staff_model_problems(const StaffModel& model, const ShiftPattern& pattern);
// Per role: is anybody on duty on at least one shift of the pattern (any weekday)?
std::vector<bool> roles_ever_staffed(std::span<const Role> roles);

enum class QueueDiscipline : std::uint8_t { fifo, priority_by_score };
enum class ShiftEndPolicy : std::uint8_t { hand_over, drop };
// `drop` is the loss system: a task finding nobody free at once is dropped.
enum class WhenAllBusy : std::uint8_t { wait, drop };

// What one plan asks of the staff.
struct StaffPlan {
    std::uint32_t first_role = 0;  // the role each notice's task goes to first
    QueueDiscipline discipline = QueueDiscipline::fifo;
    ShiftEndPolicy at_shift_end = ShiftEndPolicy::hand_over;
    WhenAllBusy when_all_busy = WhenAllBusy::wait;
};

// Exactly one per task.
enum class TaskFate : std::uint8_t {
    finished,                 // taken up at its first role and finished
    escalated_then_finished,  // escalated at least once, then finished
    in_progress_at_end,       // being worked on when the run ended
    never_taken_up,           // still waiting when the run ended
    dropped_at_shift_end,     // policy drop: abandoned when its staff member's shift ended
    dropped_nobody_free,      // loss system: nobody free when it arrived at a role
};
std::string_view to_string(TaskFate fate);
inline constexpr int task_fate_count = 6;

inline constexpr Instant no_instant = std::numeric_limits<Instant>::min();

struct TaskRecord {
    Instant created = 0;             // the notice's instant
    Instant started_at = no_instant; // evaluation start; no_instant when never started
    // When work stopped: finish, drop, or the end of the run (in progress);
    // for tasks never started, when it was dropped or the end of the run.
    Instant ended_at = no_instant;
    double score = 0.0;
    std::uint32_t notice = 0;        // index into the input notices
    std::uint32_t encounter = 0;
    std::uint32_t unit = 0;
    std::uint32_t first_role = 0;
    std::uint32_t role = 0;          // role at evaluation start, or where it was when it ended unstarted
    Seconds service_seconds = 0;     // minutes drawn for `role`, in seconds (0 when never started)
    Seconds overtime_seconds = 0;    // worked by an outgoing member after their shift ended
    std::uint8_t escalations = 0;    // edges followed along the plan's escalation path
    bool handed_over = false;        // continued by an incoming colleague at a shift change
    TaskFate fate = TaskFate::never_taken_up;

    bool started() const { return started_at != no_instant; }
    Seconds wait_seconds() const { return started_at - created; }  // only when started
};

// Time integrals over the run for one team, kept by the event loop itself
// (independently of the task records) for checks such as Little's law.
struct TeamLoad {
    std::uint32_t role = 0;
    std::uint32_t unit = 0;             // 0 for hospital-wide roles
    double busy_staff_seconds = 0.0;    // integral of staff busy (incl. overtime)
    double waiting_task_seconds = 0.0;  // integral of tasks waiting
};

struct StaffRun {
    Instant start = 0;  // first shift start of the calendar
    Instant until = 0;  // end of the run (exclusive)
    std::vector<TaskRecord> tasks;  // one per notice, in notice order
    std::vector<TeamLoad> teams;    // their integrals include other work
    // One per task of other work, in the order given; `notice` is its index
    // there, `encounter` and `score` are 0, `first_role` = `role`.
    std::vector<TaskRecord> other_tasks;
};

// Runs one plan's notices (sorted by `at`; each at in [calendar start, until),
// unit < model.unit_count) through the staff, drawing minutes as above from `draws`.
// Throws std::invalid_argument on unsorted or out-of-range notices or an invalid model.
StaffRun simulate_staff(std::span<const Notice> notices, const StaffModel& model, const StaffPlan& plan,
                        const ShiftCalendar& calendar, Instant until, ReplicationSeed draws);
// The same with the teams' other work (sorted by `at`, each in [calendar
// start, until), naming a role, unit and class of `model`), which the
// staff take up beside the notices' tasks.
StaffRun simulate_staff(std::span<const Notice> notices, std::span<const OtherTask> other_work,
                        const StaffModel& model, const StaffPlan& plan, const ShiftCalendar& calendar, Instant until,
                        ReplicationSeed draws);

// The task_minutes entity of a notice's task after `escalation_step` escalations (see above).
std::uint64_t task_minutes_entity(std::uint32_t encounter, Instant at, std::uint32_t occurrence,
                                  std::uint32_t escalation_step);

}  // namespace tocsin
