#pragma once
// What each plan costs the staff, from the task records of sim/staff.hpp.
//
// Meaning of the numbers (see also README, "Staff, queues and escalation"):
// - A team is a role's staff on one unit (per-unit roles) or in the hospital.
//   A team-shift is one team in one shift of the calendar that starts before
//   the run ends; the last may be cut short by the end of the run.
// - Staff minutes are counted in the shift in which they were worked: a task
//   handed over at 19:00 counts before 19:00 in the day shift and after it in
//   the night shift. Overtime by outgoing staff also falls after the boundary;
//   it is reported separately (overtime_minutes) and can push utilisation of
//   the next shift slightly above its roster.
// - Utilisation = staff minutes worked / staff minutes rostered (headcount x
//   shift minutes, summed over team-shifts).
// - Waits are from the notice to the evaluation start, for tasks started at
//   that role; tasks never taken up are counted apart, not as waits.
// - A ReportPeriod limits every figure to tasks created inside it and the
//   per-shift figures to complete shifts inside it (the simulation itself
//   runs over the whole calendar, so queues carried in are real).
#include <cstdint>
#include <limits>
#include <optional>
#include <span>
#include <string>
#include <vector>

#include "models/time.hpp"
#include "sim/shifts.hpp"
#include "sim/staff.hpp"

namespace tocsin {

struct PlanStaffRun {
    std::string plan;             // plan name
    const StaffModel* model = nullptr;
    StaffPlan settings;
    const StaffRun* run = nullptr;
};

struct ReportPeriod {
    Instant from = std::numeric_limits<Instant>::min();
    Instant until = std::numeric_limits<Instant>::max();  // exclusive
    bool contains(Instant t) const { return t >= from && t < until; }
};

// What one role on a plan's escalation path did (one per plan and role).
// Figures with nothing to measure (no team-shift, no task started) are empty.
struct RoleWorkload {
    std::string plan, role;
    bool per_unit = false;  // one team per unit, else one for the hospital
    std::int64_t team_shifts = 0, staff_shifts = 0, tasks_arrived = 0, tasks_started = 0;
    std::optional<double> staff_minutes_per_shift_mean, staff_minutes_per_shift_p90;
    std::optional<double> utilisation, tasks_per_staff_member_per_shift;
    std::optional<double> wait_minutes_median, wait_minutes_p90, wait_minutes_max;
    std::int64_t never_taken_up = 0, dropped = 0, handed_over = 0;
    double overtime_minutes = 0;
    // Other work (roles[].other_work), apart from the alert work above; the
    // figures above count alert tasks only. Utilisations share the roster's
    // minutes: utilisation + other_utilisation = total_utilisation.
    bool has_other_work = false;
    std::int64_t other_tasks_arrived = 0, other_tasks_started = 0, other_never_taken_up = 0;
    std::optional<double> other_utilisation, total_utilisation;
    std::optional<double> other_wait_minutes_median, other_wait_minutes_p90;
};
std::vector<RoleWorkload> staff_workload(std::span<const PlanStaffRun> runs, const ShiftCalendar& calendar,
                                         const ReportPeriod& period = {});

// Minutes worked by a plan's unit teams (the roles on its escalation path with
// one team per unit), summed over those roles, for each unit and each complete
// shift of the period: result[unit][k], one value per such shift, zeros
// included. Empty when no role on the path works per unit. Minutes count in
// the shift they were worked in, as staff_minutes_per_shift_* do.
std::vector<std::vector<double>> unit_team_minutes(const PlanStaffRun& run, const ShiftCalendar& calendar,
                                                   const ReportPeriod& period = {});

// Tasks that followed one escalation edge of a plan's path.
struct EscalationCount {
    std::string plan, from_role, to_role;
    double timeout_minutes = 0;
    std::int64_t tasks_escalated = 0;
};
std::vector<EscalationCount> escalations(std::span<const PlanStaffRun> runs, const ReportPeriod& period = {});

// Every task is exactly one fate: the count per plan and fate (every fate listed).
struct TaskFateCount {
    std::string plan;
    TaskFate fate{};
    std::int64_t tasks = 0;
    std::optional<double> share;  // of the plan's tasks; empty when it had none
};
std::vector<TaskFateCount> task_fates(std::span<const PlanStaffRun> runs, const ReportPeriod& period = {});

// One task, with the names it is reported under. Patient-level (encounter ids),
// so exported only on request.
struct LoggedTask {
    std::string plan;
    std::uint64_t replication = 0;
    std::int64_t task = 0;  // position in the plan's task records
    std::optional<std::string> encounter, unit;
    double score = 0;
    Instant created = no_instant, started = no_instant, ended = no_instant;
    std::string first_role, role;
    std::optional<double> wait_minutes, work_minutes;  // when started
    std::int64_t escalations = 0;
    bool handed_over = false;
    double overtime_minutes = 0;
    TaskFate fate{};
};
// `encounter_ids` and `unit_names` are indexed as in the notices.
std::vector<LoggedTask> task_log(std::span<const PlanStaffRun> runs, std::span<const std::string> encounter_ids,
                                 std::span<const std::string> unit_names, std::uint64_t replication);

}  // namespace tocsin
