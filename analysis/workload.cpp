#include "analysis/workload.hpp"

#include <algorithm>
#include <array>
#include <cassert>
#include <cmath>

#include "analysis/quantiles.hpp"

namespace tocsin {
namespace {

std::optional<double> defined(double v) { return std::isnan(v) ? std::nullopt : std::optional<double>(v); }

std::size_t teams_of(const Role& role, const StaffModel& model) { return role.per_unit ? model.unit_count : 1; }

// What the tasks of one role added up to: counts, waits, and the busy seconds
// of each team in each shift of the run.
struct RoleTasks {
    std::int64_t arrived = 0, started = 0, never = 0, dropped = 0, handed = 0;
    double overtime_seconds = 0;
    std::vector<double> waits;  // minutes, sorted
    std::vector<double> busy;   // seconds, [team * shifts + shift]
};

// Adds `tasks` created in the period to `r`: those that reached `role_index`
// (followed at least `step` edges) as arrived, those that ended there otherwise.
void add_tasks(RoleTasks& r, std::span<const TaskRecord> tasks, std::ptrdiff_t step, const Role& role,
               std::uint32_t role_index, const ShiftCalendar& calendar, std::size_t n_shifts,
               const ReportPeriod& period) {
    const auto& shifts = calendar.shifts();
    for (const TaskRecord& task : tasks) {
        if (!period.contains(task.created)) continue;
        if (step <= task.escalations && (step > 0 || task.first_role == role_index)) ++r.arrived;
        if (task.role != role_index) continue;
        if (task.fate == TaskFate::never_taken_up) ++r.never;
        if (task.fate == TaskFate::dropped_nobody_free || task.fate == TaskFate::dropped_at_shift_end) ++r.dropped;
        if (!task.started()) continue;
        ++r.started;
        r.handed += task.handed_over ? 1 : 0;
        r.overtime_seconds += static_cast<double>(task.overtime_seconds);
        r.waits.push_back(static_cast<double>(task.wait_seconds()) / 60.0);
        const std::size_t team = role.per_unit ? task.unit : 0;
        for (std::size_t s = calendar.index_of(task.started_at); s < n_shifts; ++s) {
            const Instant from = std::max(task.started_at, shifts[s].start);
            const Instant to = std::min(task.ended_at, shifts[s].end);
            if (to <= from) break;
            r.busy[team * n_shifts + s] += static_cast<double>(to - from);
        }
    }
    std::sort(r.waits.begin(), r.waits.end());
}

RoleTasks role_tasks(const PlanStaffRun& pr, const EscalationPath& path, std::uint32_t role_index,
                     const ShiftCalendar& calendar, std::size_t n_shifts, const ReportPeriod& period) {
    const Role& role = pr.model->roles[role_index];
    RoleTasks r;
    r.busy.assign(teams_of(role, *pr.model) * n_shifts, 0.0);
    // A task reached this role when it followed at least `step` edges of the path.
    const auto step = std::find(path.roles.begin(), path.roles.end(), role_index) - path.roles.begin();
    add_tasks(r, pr.run->tasks, step, role, role_index, calendar, n_shifts, period);
    return r;
}

// The other work a role's teams did (it never escalates: every task stays at its role).
RoleTasks other_role_tasks(const PlanStaffRun& pr, std::uint32_t role_index, const ShiftCalendar& calendar,
                           std::size_t n_shifts, const ReportPeriod& period) {
    const Role& role = pr.model->roles[role_index];
    RoleTasks r;
    r.busy.assign(teams_of(role, *pr.model) * n_shifts, 0.0);
    add_tasks(r, pr.run->other_tasks, 0, role, role_index, calendar, n_shifts, period);
    return r;
}

// Fills the roster side of `w` (team and staff shifts, minutes per team-shift,
// utilisation) over the complete shifts of the period.
void add_roster_figures(RoleWorkload& w, const Role& role, std::size_t teams, const RoleTasks& tasks,
                        const RoleTasks* other, const ShiftCalendar& calendar, std::size_t n_shifts,
                        const StaffRun& run, const ReportPeriod& period) {
    const auto& shifts = calendar.shifts();
    std::vector<double> minutes_per_team_shift;
    double rostered_seconds = 0, worked_seconds = 0, other_seconds = 0;
    for (std::size_t team = 0; team < teams; ++team)
        for (std::size_t s = 0; s < n_shifts; ++s) {
            if (shifts[s].start < period.from || shifts[s].end > period.until) continue;
            const int heads = headcount(role.roster, shifts[s]);
            ++w.team_shifts;
            const Instant from = std::max(shifts[s].start, run.start);
            const Instant to = std::min(shifts[s].end, run.until);
            w.staff_shifts += heads;
            rostered_seconds += static_cast<double>(heads) * static_cast<double>(std::max<Instant>(0, to - from));
            worked_seconds += tasks.busy[team * n_shifts + s];
            if (other) other_seconds += other->busy[team * n_shifts + s];
            minutes_per_team_shift.push_back(tasks.busy[team * n_shifts + s] / 60.0);
        }
    std::sort(minutes_per_team_shift.begin(), minutes_per_team_shift.end());
    w.staff_minutes_per_shift_mean = defined(mean(minutes_per_team_shift));
    w.staff_minutes_per_shift_p90 = defined(quantile_sorted(minutes_per_team_shift, 0.9));
    if (rostered_seconds > 0) w.utilisation = worked_seconds / rostered_seconds;
    if (rostered_seconds > 0 && other) {
        w.other_utilisation = other_seconds / rostered_seconds;
        w.total_utilisation = (worked_seconds + other_seconds) / rostered_seconds;
    }
    if (w.staff_shifts > 0)
        w.tasks_per_staff_member_per_shift = static_cast<double>(w.tasks_started) / static_cast<double>(w.staff_shifts);
}

}  // namespace

std::vector<RoleWorkload> staff_workload(std::span<const PlanStaffRun> runs, const ShiftCalendar& calendar,
                                         const ReportPeriod& period) {
    std::vector<RoleWorkload> out;
    const auto& shifts = calendar.shifts();
    for (const PlanStaffRun& pr : runs) {
        const StaffModel& model = *pr.model;
        // Shifts in the run: those starting before its end.
        std::size_t n_shifts = 0;
        while (n_shifts < shifts.size() && shifts[n_shifts].start < pr.run->until) ++n_shifts;
        const EscalationPath path = escalation_path(model.escalation, pr.settings.first_role);
        for (std::uint32_t role_index : path.roles) {
            const Role& role = model.roles[role_index];
            const RoleTasks tasks = role_tasks(pr, path, role_index, calendar, n_shifts, period);
            RoleWorkload w;
            w.plan = pr.plan;
            w.role = role.name;
            w.per_unit = role.per_unit;
            w.tasks_arrived = tasks.arrived;
            w.tasks_started = tasks.started;
            std::optional<RoleTasks> other;
            if (!role.other_work.empty()) other = other_role_tasks(pr, role_index, calendar, n_shifts, period);
            add_roster_figures(w, role, teams_of(role, model), tasks, other ? &*other : nullptr, calendar, n_shifts,
                               *pr.run, period);
            if (other) {
                w.has_other_work = true;
                w.other_tasks_arrived = other->arrived;
                w.other_tasks_started = other->started;
                w.other_never_taken_up = other->never;
                w.other_wait_minutes_median = defined(quantile_sorted(other->waits, 0.5));
                w.other_wait_minutes_p90 = defined(quantile_sorted(other->waits, 0.9));
            }
            w.wait_minutes_median = defined(quantile_sorted(tasks.waits, 0.5));
            w.wait_minutes_p90 = defined(quantile_sorted(tasks.waits, 0.9));
            if (!tasks.waits.empty()) w.wait_minutes_max = tasks.waits.back();
            w.never_taken_up = tasks.never;
            w.dropped = tasks.dropped;
            w.handed_over = tasks.handed;
            w.overtime_minutes = tasks.overtime_seconds / 60.0;
            out.push_back(std::move(w));
        }
    }
    return out;
}

std::vector<std::vector<double>> unit_team_minutes(const PlanStaffRun& pr, const ShiftCalendar& calendar,
                                                   const ReportPeriod& period) {
    const StaffModel& model = *pr.model;
    const auto& shifts = calendar.shifts();
    std::size_t n_shifts = 0;
    while (n_shifts < shifts.size() && shifts[n_shifts].start < pr.run->until) ++n_shifts;
    std::vector<std::vector<double>> minutes;
    const EscalationPath path = escalation_path(model.escalation, pr.settings.first_role);
    for (std::uint32_t role_index : path.roles) {
        if (!model.roles[role_index].per_unit) continue;
        const RoleTasks tasks = role_tasks(pr, path, role_index, calendar, n_shifts, period);
        if (minutes.empty()) minutes.assign(model.unit_count, {});
        for (std::size_t unit = 0; unit < model.unit_count; ++unit) {
            std::size_t k = 0;  // position among the complete shifts, as add_roster_figures counts them
            for (std::size_t s = 0; s < n_shifts; ++s) {
                if (shifts[s].start < period.from || shifts[s].end > period.until) continue;
                if (minutes[unit].size() <= k) minutes[unit].push_back(0.0);
                minutes[unit][k++] += tasks.busy[unit * n_shifts + s] / 60.0;
            }
        }
    }
    return minutes;
}

std::vector<EscalationCount> escalations(std::span<const PlanStaffRun> runs, const ReportPeriod& period) {
    std::vector<EscalationCount> out;
    for (const PlanStaffRun& pr : runs) {
        const StaffModel& model = *pr.model;
        const EscalationPath path = escalation_path(model.escalation, pr.settings.first_role);
        std::vector<std::int64_t> followed(path.timeout_seconds.size(), 0);
        for (const TaskRecord& task : pr.run->tasks)
            for (std::size_t k = 0; period.contains(task.created) && k < task.escalations && k < followed.size(); ++k) ++followed[k];
        for (std::size_t k = 0; k < followed.size(); ++k)
            out.push_back({pr.plan, model.roles[path.roles[k]].name, model.roles[path.roles[k + 1]].name,
                           static_cast<double>(path.timeout_seconds[k]) / 60.0, followed[k]});
    }
    return out;
}

std::vector<TaskFateCount> task_fates(std::span<const PlanStaffRun> runs, const ReportPeriod& period) {
    std::vector<TaskFateCount> out;
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
            out.push_back({pr.plan, static_cast<TaskFate>(f), count[f],
                           total > 0 ? std::optional<double>(static_cast<double>(count[f]) / total) : std::nullopt});
    }
    return out;
}

std::vector<LoggedTask> task_log(std::span<const PlanStaffRun> runs, std::span<const std::string> encounter_ids,
                                 std::span<const std::string> unit_names, std::uint64_t replication) {
    std::vector<LoggedTask> out;
    for (const PlanStaffRun& pr : runs) {
        const StaffModel& model = *pr.model;
        for (std::size_t i = 0; i < pr.run->tasks.size(); ++i) {
            const TaskRecord& task = pr.run->tasks[i];
            LoggedTask t;
            t.plan = pr.plan;
            t.replication = replication;
            t.task = static_cast<std::int64_t>(i);
            if (task.encounter < encounter_ids.size()) t.encounter = encounter_ids[task.encounter];
            if (task.unit < unit_names.size()) t.unit = unit_names[task.unit];
            t.score = task.score;
            t.created = task.created;
            t.started = task.started_at;
            t.ended = task.ended_at;
            t.first_role = model.roles[task.first_role].name;
            t.role = model.roles[task.role].name;
            if (task.started()) {
                t.wait_minutes = static_cast<double>(task.wait_seconds()) / 60.0;
                t.work_minutes = static_cast<double>(task.ended_at - task.started_at) / 60.0;
            }
            t.escalations = static_cast<std::int64_t>(task.escalations);
            t.handed_over = task.handed_over;
            t.overtime_minutes = static_cast<double>(task.overtime_seconds) / 60.0;
            t.fate = task.fate;
            out.push_back(std::move(t));
        }
    }
    return out;
}

}  // namespace tocsin
