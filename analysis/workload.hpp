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
// - A ReportPeriod limits every table to tasks created inside it and the
//   per-shift figures to complete shifts inside it (the simulation itself
//   runs over the whole calendar, so queues carried in are real).
#include <limits>
#include <span>
#include <string>
#include <vector>

#include "analysis/table.hpp"
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

// One row per plan and role on the plan's escalation path.
Table staff_workload_table(std::span<const PlanStaffRun> runs, const ShiftCalendar& calendar,
                           const ReportPeriod& period = {});
// One row per plan and escalation edge on its path: tasks that followed it.
Table escalation_table(std::span<const PlanStaffRun> runs, const ReportPeriod& period = {});
// One row per plan and fate: every task is exactly one.
Table task_fate_table(std::span<const PlanStaffRun> runs, const ReportPeriod& period = {});
// One row per task; patient-level (encounter ids), so exported only on request.
// `encounter_ids` and `unit_names` are indexed as in the notices.
Table task_log_table(std::span<const PlanStaffRun> runs, std::span<const std::string> encounter_ids,
                     std::span<const std::string> unit_names, const TimeZone& zone);

}  // namespace tocsin
