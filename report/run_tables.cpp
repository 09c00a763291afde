#include "report/run_tables.hpp"

#include <algorithm>
#include <cmath>

#include "report/cells.hpp"
#include "report/unit_tables.hpp"
#include "models/text.hpp"
#include "sim/notice.hpp"

namespace tocsin {

Table plan_summary_table(const ReplicationResults& results) {
    Table t;
    t.name = "plan_summary";
    t.title = "Plans compared (replication " + std::to_string(results.replication) + ")";
    t.columns = {"plan", "channel", "notices", "first", "repeat", "rise",
                 "per_unit_shift_mean", "per_unit_shift_p90", "per_unit_shift_max",
                 "per_unit_night_mean", "per_unit_night_p90", "per_unit_night_max",
                 "worst_unit_night_mean", "worst_unit_night_p90", "cases", "caught", "missed", "sensitivity",
                 "lead_median_h", "lead_q1_h", "lead_q3_h", "notices_per_catch",
                 "evaluations", "caught_by_notice", "lead_from_notice_median_h",
                 "wait_median_min", "wait_p90_min", "never_taken_up",
                 "patients_per_unit_night_mean", "patients_per_unit_night_p90", "patients_per_unit_night_max",
                 "notice_ppv", "patient_ppv"};
    for (const PlanResult& p : results.plans) {
        const PlanFigures& f = p.figures;
        t.add_row({p.plan, std::string(to_string(p.channel)), f.notices, f.notices_first, f.notices_repeat,
                   f.notices_rise, f.per_unit_shift_mean, f.per_unit_shift_p90, f.per_unit_shift_max,
                   cell_or_empty(f.per_unit_night_mean), cell_or_empty(f.per_unit_night_p90), cell_or_empty(f.per_unit_night_max),
                   cell_or_empty(f.worst_unit_night_mean), cell_or_empty(f.worst_unit_night_p90), f.cases, f.caught,
                   f.missed, cell_or_empty(f.sensitivity), cell_or_empty(f.lead_median_hours), cell_or_empty(f.lead_q1_hours), cell_or_empty(f.lead_q3_hours),
                   cell_or_empty(f.notices_per_catch), f.evaluations, f.caught_by_notice, cell_or_empty(f.lead_from_notice_median_hours),
                   cell_or_empty(f.wait_median_minutes), cell_or_empty(f.wait_p90_minutes), cell_or_empty(f.never_taken_up),
                   cell_or_empty(f.patients_per_unit_night_mean), cell_or_empty(f.patients_per_unit_night_p90),
                   cell_or_empty(f.patients_per_unit_night_max), cell_or_empty(f.notice_ppv), cell_or_empty(f.patient_ppv)});
    }
    return t;
}

Table unit_shift_notices_table(const ReplicationResults& results, const TimeZone& zone) {
    Table t;
    t.name = "unit_shift_notices";
    t.title = "Notices per unit per shift";
    t.columns = {"plan", "unit", "shift_start", "shift", "night", "notices"};
    for (const UnitShiftNotices& u : results.unit_shift_notices)
        t.add_row({u.plan, u.unit, format_local(u.shift_start, zone), u.shift, flag_cell(u.night), u.notices});
    return t;
}

std::string excluded_name(Excluded what) {
    switch (what) {
        case Excluded::encounters: return "encounters";
        case Excluded::scores: return "scores";
        case Excluded::notes: return "notes";
        case Excluded::skipped_rows: return "skipped rows";
        case Excluded::chart_openings: return "chart openings";
        case Excluded::chart_opening_timestamps: return "timestamps";
    }
    return "";
}

std::string exclusion_reason(const Exclusion& e) {
    if (e.what == Excluded::skipped_rows) return e.reason + " (" + describe_lines(e.rows) + ")";
    if (e.what == Excluded::chart_opening_timestamps) return "chart openings: " + e.reason;
    return e.reason;
}

Table exclusions_table(const std::vector<Exclusion>& exclusions) {
    Table t;
    t.name = "exclusions";
    t.title = "Excluded or adjusted input, by reason";
    t.columns = {"what", "reason", "count"};
    for (const Exclusion& e : exclusions) t.add_row({excluded_name(e.what), exclusion_reason(e), e.count});
    return t;
}

Table notice_log_table(const std::vector<LoggedNotice>& log) {
    Table t;
    t.name = "notice_log";
    t.title = "Every notice (holds encounter ids)";
    t.columns = {"plan", "replication", "encounter", "unit", "at", "score", "reason", "channel",
                 "evaluation", "opener", "delivery_minutes"};
    for (const LoggedNotice& n : log)
        t.add_row({n.plan, static_cast<std::int64_t>(n.replication), n.encounter, n.unit, format_utc(n.at), n.score,
                   std::string(to_string(n.reason)), std::string(to_string(n.channel)), flag_cell(n.asks_evaluation),
                   cell_or_empty(n.opener), n.delivery_minutes});
    return t;
}

Table staff_workload_table(const std::vector<RoleWorkload>& workload) {
    Table t;
    t.name = "staff_workload";
    t.title = "Staff workload by plan and role";
    t.columns = {"plan", "role", "team", "team_shifts", "staff_shifts", "tasks_arrived", "tasks_started",
                 "staff_minutes_per_shift_mean", "staff_minutes_per_shift_p90", "utilisation",
                 "tasks_per_staff_member_per_shift", "wait_minutes_median", "wait_minutes_p90", "wait_minutes_max",
                 "never_taken_up", "dropped", "handed_over", "overtime_minutes"};
    for (const RoleWorkload& w : workload)
        t.add_row({w.plan, w.role, std::string(w.per_unit ? "each unit" : "hospital"), w.team_shifts, w.staff_shifts,
                   w.tasks_arrived, w.tasks_started, cell_or_empty(w.staff_minutes_per_shift_mean),
                   cell_or_empty(w.staff_minutes_per_shift_p90), cell_or_empty(w.utilisation), cell_or_empty(w.tasks_per_staff_member_per_shift),
                   cell_or_empty(w.wait_minutes_median), cell_or_empty(w.wait_minutes_p90), cell_or_empty(w.wait_minutes_max), w.never_taken_up,
                   w.dropped, w.handed_over, w.overtime_minutes});
    add_other_work_columns(t, workload);
    return t;
}

void add_other_work_columns(Table& t, const std::vector<RoleWorkload>& workload) {
    if (std::none_of(workload.begin(), workload.end(), [](const RoleWorkload& w) { return w.has_other_work; })) return;
    for (const char* column : {"other_tasks_arrived", "other_tasks_started", "other_utilisation", "total_utilisation",
                               "other_wait_minutes_median", "other_wait_minutes_p90", "other_never_taken_up"})
        t.columns.push_back(column);
    for (std::size_t k = 0; k < t.rows.size(); ++k) {
        const RoleWorkload& w = workload[k];
        const std::vector<Cell> cells = {w.other_tasks_arrived, w.other_tasks_started, cell_or_empty(w.other_utilisation),
                                         cell_or_empty(w.total_utilisation), cell_or_empty(w.other_wait_minutes_median),
                                         cell_or_empty(w.other_wait_minutes_p90), w.other_never_taken_up};
        t.rows[k].insert(t.rows[k].end(), cells.begin(), cells.end());
    }
}

Table escalation_table(const std::vector<EscalationCount>& escalations) {
    Table t;
    t.name = "staff_escalations";
    t.title = "Tasks escalated, by plan and edge";
    t.columns = {"plan", "from_role", "to_role", "timeout_minutes", "tasks_escalated"};
    for (const EscalationCount& e : escalations)
        t.add_row({e.plan, e.from_role, e.to_role, e.timeout_minutes, e.tasks_escalated});
    return t;
}

Table task_fate_table(const std::vector<TaskFateCount>& fates) {
    Table t;
    t.name = "task_fates";
    t.title = "What became of each task, by plan";
    t.columns = {"plan", "fate", "tasks", "share"};
    for (const TaskFateCount& f : fates) t.add_row({f.plan, std::string(to_string(f.fate)), f.tasks, cell_or_empty(f.share)});
    return t;
}

Table task_log_table(const std::vector<LoggedTask>& log, const TimeZone& zone) {
    Table t;
    t.name = "task_log";
    t.title = "Every task (patient-level: encounter ids)";
    t.columns = {"plan",        "replication",  "task",         "encounter",   "unit",
                 "score",       "created",      "first_role",   "role",        "started",
                 "ended",       "wait_minutes", "work_minutes", "escalations", "handed_over",
                 "overtime_minutes", "fate"};
    auto when = [&](Instant at) { return at == no_instant ? Cell{} : Cell{format_local(at, zone)}; };
    for (const LoggedTask& k : log)
        t.add_row({k.plan, static_cast<std::int64_t>(k.replication), k.task, cell_or_empty(k.encounter), cell_or_empty(k.unit), k.score,
                   when(k.created), k.first_role, k.role, when(k.started), when(k.ended), cell_or_empty(k.wait_minutes),
                   cell_or_empty(k.work_minutes), k.escalations, std::string(k.handed_over ? "yes" : "no"), k.overtime_minutes,
                   std::string(to_string(k.fate))});
    return t;
}

Table channel_burden_table(const std::vector<ChannelBurdenSummary>& burden) {
    Table t;
    t.name = "channel_burden";
    t.title = "Burden by channel, in each channel's own unit (reporting period)";
    t.columns = {"plan", "channel", "occasions", "notices", "evaluations", "delivery_minutes",
                 "burden", "burden_mean", "burden_p90", "burden_max", "minutes_mean", "minutes_p90"};
    for (const ChannelBurdenSummary& b : burden)
        t.add_row({b.plan, std::string(to_string(b.channel)), b.occasions, b.notices, b.evaluations, b.delivery_minutes,
                   b.burden, cell_or_empty(b.burden_mean), cell_or_empty(b.burden_p90), cell_or_empty(b.burden_max), cell_or_empty(b.minutes_mean),
                   cell_or_empty(b.minutes_p90)});
    return t;
}

Table rounds_table(const std::vector<ReportedRound>& rounds, const TimeZone& zone) {
    Table t;
    t.name = "rounds";
    t.title = "Handoff lists and review rounds";
    t.columns = {"plan", "channel", "scope", "at", "listed", "acted", "minutes"};
    for (const ReportedRound& r : rounds)
        t.add_row({r.plan, std::string(to_string(r.channel)), r.scope, format_local(r.at, zone), r.listed, r.acted,
                   r.minutes});
    return t;
}

Table chart_interruptions_table(const std::vector<ChartInterruptionCount>& counts, const TimeZone& zone) {
    Table t;
    t.name = "chart_interruptions";
    t.title = "Chart interruptions per unit, shift and opening role";
    t.columns = {"plan", "unit", "role", "shift_start", "shift", "interruptions", "clinicians", "per_clinician",
                 "minutes"};
    for (const ChartInterruptionCount& c : counts)
        t.add_row({c.plan, c.unit, c.role, format_local(c.shift_start, zone), c.shift, c.interruptions, c.clinicians,
                   c.per_clinician, c.minutes});
    return t;
}

Table acceptance_by_load_table(const std::vector<LoadBandRow>& rows) {
    Table t;
    t.name = "acceptance_by_load";
    t.title = "Notices that led to an evaluation, by the load they met (declared fatigue)";
    t.columns = {"plan", "load", "band", "notices", "evaluations", "share", "declared_probability"};
    for (const LoadBandRow& r : rows)
        t.add_row({r.plan, std::string(to_string(r.load)), load_band_name(r.band), r.notices, r.evaluations,
                   cell_or_empty(r.share), cell_or_empty(r.declared)});
    return t;
}

std::string acceptance_by_load_text(const std::vector<LoadBandRow>& rows) {
    std::string out;
    auto percent = [](const std::optional<double>& v) { return v ? format_real(std::round(*v * 1000) / 10) + "%" : "n/a"; };
    for (std::size_t i = 0; i < rows.size(); ++i) {
        const LoadBandRow& r = rows[i];
        const bool new_plan = i == 0 || rows[i - 1].plan != r.plan;
        const bool new_kind = new_plan || rows[i - 1].load != r.load;
        if (new_plan) out += (out.empty() ? "" : "\n") + std::string("Fatigue, plan ") + r.plan + ": share led to an evaluation (declared)";
        if (new_kind)
            out += r.load == LoadKind::earlier_for_patient ? "; by earlier notices for the patient " : "; by the team's notices in the window ";
        else
            out += ", ";
        out += load_band_name(r.band) + ": " + percent(r.share) + " (" + percent(r.declared) + ", n=" + std::to_string(r.notices) + ")";
    }
    return out.empty() ? out : out + ".\n";
}

RunTables run_tables(const ReplicationResults& r, const TimeZone& zone) {
    RunTables t;
    t.plan_summary = plan_summary_table(r);
    t.plan_unit_summary = plan_unit_summary_table(r.units, r.replication);
    t.unit_shift_notices = unit_shift_notices_table(r, zone);
    t.exclusions = exclusions_table(r.exclusions);
    t.channel_burden = channel_burden_table(r.channels.burden);
    t.rounds = rounds_table(r.channels.rounds, zone);
    t.chart_interruptions = chart_interruptions_table(r.channels.chart_interruptions, zone);
    if (r.staff) {
        t.staff_workload = staff_workload_table(r.staff->workload);
        t.staff_escalations = escalation_table(r.staff->escalations);
        t.task_fates = task_fate_table(r.staff->fates);
        if (r.staff->task_log) t.task_log = task_log_table(*r.staff->task_log, zone);
    }
    if (r.notice_log) t.notice_log = notice_log_table(*r.notice_log);
    if (!r.acceptance_by_load.empty()) t.acceptance_by_load = acceptance_by_load_table(r.acceptance_by_load);
    return t;
}

}  // namespace tocsin
