#include "analysis/workload.hpp"

#include <algorithm>
#include <array>
#include <cassert>
#include <cmath>

#include "analysis/quantiles.hpp"

namespace tocsin {
namespace {

Cell real_or_empty(double v) { return std::isnan(v) ? Cell{} : Cell{v}; }

std::size_t teams_of(const Role& role, const StaffModel& model) { return role.per_unit ? model.unit_count : 1; }

}  // namespace

Table staff_workload_table(std::span<const PlanStaffRun> runs, const ShiftCalendar& calendar,
                           const ReportPeriod& period) {
    Table t;
    t.name = "staff_workload";
    t.title = "Staff workload by plan and role";
    t.columns = {"plan",
                 "role",
                 "team",
                 "team_shifts",
                 "staff_shifts",
                 "tasks_arrived",
                 "tasks_started",
                 "staff_minutes_per_shift_mean",
                 "staff_minutes_per_shift_p90",
                 "utilisation",
                 "tasks_per_staff_member_per_shift",
                 "wait_minutes_median",
                 "wait_minutes_p90",
                 "wait_minutes_max",
                 "never_taken_up",
                 "dropped",
                 "handed_over",
                 "overtime_minutes"};
    const auto& shifts = calendar.shifts();
    for (const PlanStaffRun& pr : runs) {
        const StaffModel& model = *pr.model;
        const StaffRun& run = *pr.run;
        // Shifts in the run: those starting before its end.
        std::size_t n_shifts = 0;
        while (n_shifts < shifts.size() && shifts[n_shifts].start < run.until) ++n_shifts;
        const EscalationPath path = escalation_path(model.escalation, pr.settings.first_role);
        for (std::uint32_t role_index : path.roles) {
            const Role& role = model.roles[role_index];
            const std::size_t teams = teams_of(role, model);
            std::vector<double> busy(teams * n_shifts, 0.0);
            std::vector<double> waits;
            std::int64_t arrived = 0, started = 0, never = 0, dropped = 0, handed = 0;
            double overtime_seconds = 0;
            // A task reached this role when it followed at least `step` edges of the path.
            const auto step = std::find(path.roles.begin(), path.roles.end(), role_index) - path.roles.begin();
            for (const TaskRecord& task : run.tasks) {
                if (!period.contains(task.created)) continue;
                if (step <= task.escalations) ++arrived;
                if (task.role != role_index) continue;
                if (task.fate == TaskFate::never_taken_up) ++never;
                if (task.fate == TaskFate::dropped_nobody_free || task.fate == TaskFate::dropped_at_shift_end)
                    ++dropped;
                if (!task.started()) continue;
                ++started;
                handed += task.handed_over ? 1 : 0;
                overtime_seconds += static_cast<double>(task.overtime_seconds);
                waits.push_back(static_cast<double>(task.wait_seconds()) / 60.0);
                const std::size_t team = role.per_unit ? task.unit : 0;
                for (std::size_t s = calendar.index_of(task.started_at); s < n_shifts; ++s) {
                    const Instant from = std::max(task.started_at, shifts[s].start);
                    const Instant to = std::min(task.ended_at, shifts[s].end);
                    if (to <= from) break;
                    busy[team * n_shifts + s] += static_cast<double>(to - from);
                }
            }
            std::vector<double> minutes_per_team_shift;
            double rostered_seconds = 0, worked_seconds = 0;
            std::int64_t staff_shifts = 0, team_shifts = 0;
            for (std::size_t team = 0; team < teams; ++team)
                for (std::size_t s = 0; s < n_shifts; ++s) {
                    if (shifts[s].start < period.from || shifts[s].end > period.until) continue;
                    const int heads = headcount(role.roster, shifts[s]);
                    ++team_shifts;
                    const Instant from = std::max(shifts[s].start, run.start);
                    const Instant to = std::min(shifts[s].end, run.until);
                    staff_shifts += heads;
                    rostered_seconds += static_cast<double>(heads) * static_cast<double>(std::max<Instant>(0, to - from));
                    worked_seconds += busy[team * n_shifts + s];
                    minutes_per_team_shift.push_back(busy[team * n_shifts + s] / 60.0);
                }
            std::sort(waits.begin(), waits.end());
            std::sort(minutes_per_team_shift.begin(), minutes_per_team_shift.end());
            t.add_row({pr.plan, role.name, std::string(role.per_unit ? "each unit" : "hospital"),
                       team_shifts, staff_shifts, arrived, started,
                       real_or_empty(mean(minutes_per_team_shift)),
                       real_or_empty(quantile_sorted(minutes_per_team_shift, 0.9)),
                       rostered_seconds > 0 ? Cell{worked_seconds / rostered_seconds} : Cell{},
                       staff_shifts > 0 ? Cell{static_cast<double>(started) / static_cast<double>(staff_shifts)}
                                        : Cell{},
                       real_or_empty(quantile_sorted(waits, 0.5)), real_or_empty(quantile_sorted(waits, 0.9)),
                       waits.empty() ? Cell{} : Cell{waits.back()}, never, dropped, handed,
                       overtime_seconds / 60.0});
        }
    }
    return t;
}

Table escalation_table(std::span<const PlanStaffRun> runs, const ReportPeriod& period) {
    Table t;
    t.name = "staff_escalations";
    t.title = "Tasks escalated, by plan and edge";
    t.columns = {"plan", "from_role", "to_role", "timeout_minutes", "tasks_escalated"};
    for (const PlanStaffRun& pr : runs) {
        const StaffModel& model = *pr.model;
        const EscalationPath path = escalation_path(model.escalation, pr.settings.first_role);
        std::vector<std::int64_t> followed(path.timeout_seconds.size(), 0);
        for (const TaskRecord& task : pr.run->tasks)
            for (std::size_t k = 0; period.contains(task.created) && k < task.escalations && k < followed.size(); ++k) ++followed[k];
        for (std::size_t k = 0; k < followed.size(); ++k)
            t.add_row({pr.plan, model.roles[path.roles[k]].name, model.roles[path.roles[k + 1]].name,
                       static_cast<double>(path.timeout_seconds[k]) / 60.0, followed[k]});
    }
    return t;
}

Table task_fate_table(std::span<const PlanStaffRun> runs, const ReportPeriod& period) {
    Table t;
    t.name = "task_fates";
    t.title = "What became of each task, by plan";
    t.columns = {"plan", "fate", "tasks", "share"};
    for (const PlanStaffRun& pr : runs) {
        std::array<std::int64_t, task_fate_count> count{};
        std::int64_t total_tasks = 0;
        for (const TaskRecord& task : pr.run->tasks)
            if (period.contains(task.created)) {
                ++count[static_cast<std::size_t>(task.fate)];
                ++total_tasks;
            }
        const double total = static_cast<double>(total_tasks);
        for (int f = 0; f < task_fate_count; ++f)
            t.add_row({pr.plan, std::string(to_string(static_cast<TaskFate>(f))), count[f],
                       total > 0 ? Cell{static_cast<double>(count[f]) / total} : Cell{}});
    }
    return t;
}

Table task_log_table(std::span<const PlanStaffRun> runs, std::span<const std::string> encounter_ids,
                     std::span<const std::string> unit_names, const TimeZone& zone) {
    Table t;
    t.name = "task_log";
    t.title = "Every task (patient-level: encounter ids)";
    t.columns = {"plan",        "task",         "encounter",       "unit",         "score",
                 "created",     "first_role",   "role",            "started",      "ended",
                 "wait_minutes", "work_minutes", "escalations",    "handed_over",  "overtime_minutes",
                 "fate"};
    auto when = [&](Instant at) { return at == no_instant ? Cell{} : Cell{format_local(at, zone)}; };
    for (const PlanStaffRun& pr : runs) {
        const StaffModel& model = *pr.model;
        for (std::size_t i = 0; i < pr.run->tasks.size(); ++i) {
            const TaskRecord& task = pr.run->tasks[i];
            t.add_row({pr.plan, static_cast<std::int64_t>(i),
                       task.encounter < encounter_ids.size() ? Cell{encounter_ids[task.encounter]} : Cell{},
                       task.unit < unit_names.size() ? Cell{unit_names[task.unit]} : Cell{},
                       task.score, when(task.created), model.roles[task.first_role].name,
                       model.roles[task.role].name, when(task.started_at), when(task.ended_at),
                       task.started() ? Cell{static_cast<double>(task.wait_seconds()) / 60.0} : Cell{},
                       task.started() ? Cell{static_cast<double>(task.ended_at - task.started_at) / 60.0} : Cell{},
                       static_cast<std::int64_t>(task.escalations),
                       std::string(task.handed_over ? "yes" : "no"),
                       static_cast<double>(task.overtime_seconds) / 60.0, std::string(to_string(task.fate))});
        }
    }
    return t;
}

}  // namespace tocsin
