#include "analysis/results.hpp"

#include <algorithm>
#include <sstream>

#include "analysis/cautions.hpp"
#include "analysis/channel_tables.hpp"
#include "sim/channels.hpp"
#include "analysis/quantiles.hpp"
#include "analysis/workload.hpp"

namespace tocsin {

ReportingShifts reporting_shifts(const AnalysisSettings& settings, const Population& pop, const ShiftCalendar& cal) {
    ReportingShifts r;
    r.from = settings.period_start.value_or(pop.period_start);
    r.until = settings.period_end.value_or(pop.period_end);
    for (std::size_t k = 0; k < cal.size(); ++k) {
        const Shift& s = cal.shifts()[k];
        if (s.start >= r.from && s.end <= r.until) r.shifts.push_back(k);
    }
    return r;
}

std::vector<std::optional<Instant>> first_catch(const AnalysisSettings& settings, const Population& pop,
                                                const std::vector<std::pair<std::uint32_t, Instant>>& actions) {
    std::vector<std::optional<Instant>> first(pop.encounters.size());
    for (const auto& [e, at] : actions) {
        const Encounter& enc = pop.encounters[e];
        if (!enc.outcome_at) continue;
        const Instant t0 = *enc.outcome_at;
        if (at < t0 - settings.window || at > t0 - settings.min_lead) continue;
        if (!first[e] || at < *first[e]) first[e] = at;
    }
    return first;
}

PlanFigures plan_figures(const AnalysisSettings& settings, const Population& pop, const ShiftCalendar& cal,
                         const ReportingShifts& rep, const PlanRecord& record) {
    PlanFigures f;
    const std::size_t n_units = pop.units.size(), n_shifts = rep.shifts.size();
    f.unit_shift_counts.assign(n_units * n_shifts, 0);
    // Position of each calendar shift among the reporting shifts, or npos.
    std::vector<std::size_t> slot(cal.size(), SIZE_MAX);
    for (std::size_t k = 0; k < n_shifts; ++k) slot[rep.shifts[k]] = k;
    std::vector<std::pair<std::uint32_t, Instant>> actions;
    actions.reserve(record.notices.size());
    for (const Notice& n : record.notices) {
        ++f.notices;
        if (n.reason == NoticeReason::first) ++f.notices_first;
        else if (n.reason == NoticeReason::repeat) ++f.notices_repeat;
        else ++f.notices_rise;
        if (cal.contains(n.at)) {
            const std::size_t k = slot[cal.index_of(n.at)];
            if (k != SIZE_MAX) ++f.unit_shift_counts[n.unit * n_shifts + k];
        }
        if (n.asks_evaluation) actions.emplace_back(n.encounter, n.at);  // only an evaluation can catch a case
    }
    std::vector<double> all, night;
    for (std::size_t u = 0; u < n_units; ++u)
        for (std::size_t k = 0; k < n_shifts; ++k) {
            const double c = static_cast<double>(f.unit_shift_counts[u * n_shifts + k]);
            all.push_back(c);
            if (cal.is_night(rep.shifts[k])) night.push_back(c);
        }
    std::sort(all.begin(), all.end());
    std::sort(night.begin(), night.end());
    if (!all.empty()) {
        f.per_unit_shift_mean = mean(all);
        f.per_unit_shift_p90 = quantile_sorted(all, 0.9);
        f.per_unit_shift_max = all.back();
    }
    if (!night.empty()) {
        f.per_unit_night_mean = mean(night);
        f.per_unit_night_p90 = quantile_sorted(night, 0.9);
        f.per_unit_night_max = night.back();
    }
    const auto noticed_at = first_catch(settings, pop, actions);
    f.evaluations = static_cast<std::int64_t>(actions.size());
    if (record.staff) {
        // A case is caught by the start of an evaluation, not by the notice.
        actions.clear();
        std::vector<double> waits;
        std::int64_t never = 0;
        for (const TaskRecord& t : record.staff->tasks) {
            never += t.fate == TaskFate::never_taken_up;
            if (!t.started()) continue;
            actions.emplace_back(t.encounter, t.started_at);
            waits.push_back(static_cast<double>(t.wait_seconds()) / 60.0);
        }
        f.evaluations = static_cast<std::int64_t>(waits.size());
        f.never_taken_up = never;
        if (!waits.empty()) {
            std::sort(waits.begin(), waits.end());
            f.wait_median_minutes = quantile_sorted(waits, 0.5);
            f.wait_p90_minutes = quantile_sorted(waits, 0.9);
        }
    }
    const auto caught_at = record.staff ? first_catch(settings, pop, actions) : noticed_at;
    {
        std::vector<bool> evaluated(pop.encounters.size(), false);
        for (const auto& [e, at] : actions) evaluated[e] = true;
        for (std::size_t e = 0; e < evaluated.size(); ++e)
            f.evaluated_non_cases += evaluated[e] && !pop.encounters[e].outcome_at;
    }
    std::vector<double> leads, notice_leads;
    for (std::size_t e = 0; e < pop.encounters.size(); ++e) {
        if (!pop.encounters[e].outcome_at) continue;
        ++f.cases;
        if (caught_at[e]) {
            ++f.caught;
            leads.push_back(static_cast<double>(*pop.encounters[e].outcome_at - *caught_at[e]) / 3600.0);
        }
        if (noticed_at[e]) {
            ++f.caught_by_notice;
            notice_leads.push_back(static_cast<double>(*pop.encounters[e].outcome_at - *noticed_at[e]) / 3600.0);
        }
    }
    if (!notice_leads.empty()) {
        std::sort(notice_leads.begin(), notice_leads.end());
        f.lead_from_notice_median_hours = quantile_sorted(notice_leads, 0.5);
    }
    f.missed = f.cases - f.caught;
    if (f.cases) f.sensitivity = static_cast<double>(f.caught) / static_cast<double>(f.cases);
    if (!leads.empty()) {
        std::sort(leads.begin(), leads.end());
        f.lead_median_hours = quantile_sorted(leads, 0.5);
        f.lead_q1_hours = quantile_sorted(leads, 0.25);
        f.lead_q3_hours = quantile_sorted(leads, 0.75);
    }
    if (f.caught) f.notices_per_catch = static_cast<double>(f.notices) / static_cast<double>(f.caught);
    return f;
}

namespace {
Cell opt(const std::optional<double>& v) { return v ? Cell(*v) : Cell(); }
Cell opt(const std::optional<std::int64_t>& v) { return v ? Cell(*v) : Cell(); }
}  // namespace

RunTables run_tables(const SimulationSetup& setup, const AnalysisSettings& settings, const Population& pop, const ShiftCalendar& cal,
                     const ReplicationRecord& record, bool with_notice_log, bool with_task_log,
                     const ChartOpeningLog* replayed_openings) {
    RunTables t;
    const ReportingShifts rep = reporting_shifts(settings, pop, cal);
    t.plan_summary.name = "plan_summary";
    t.plan_summary.title = "Plans compared (replication " + std::to_string(record.replication) + ")";
    t.plan_summary.columns = {"plan", "channel", "notices", "first", "repeat", "rise",
                              "per_unit_shift_mean", "per_unit_shift_p90", "per_unit_shift_max",
                              "per_unit_night_mean", "per_unit_night_p90", "per_unit_night_max",
                              "cases", "caught", "missed", "sensitivity",
                              "lead_median_h", "lead_q1_h", "lead_q3_h", "notices_per_catch",
                              "evaluations", "caught_by_notice", "lead_from_notice_median_h",
                              "wait_median_min", "wait_p90_min", "never_taken_up"};
    t.unit_shift_notices.name = "unit_shift_notices";
    t.unit_shift_notices.title = "Notices per unit per shift";
    t.unit_shift_notices.columns = {"plan", "unit", "shift_start", "shift", "night", "notices"};
    for (std::size_t p = 0; p < setup.plans.size(); ++p) {
        const PlanFigures f = plan_figures(settings, pop, cal, rep, record.plans[p]);
        t.plan_summary.add_row({setup.plans[p].name, std::string(to_string(setup.plans[p].channel)), f.notices,
                                f.notices_first, f.notices_repeat, f.notices_rise, f.per_unit_shift_mean,
                                f.per_unit_shift_p90, f.per_unit_shift_max, opt(f.per_unit_night_mean),
                                opt(f.per_unit_night_p90), opt(f.per_unit_night_max), f.cases, f.caught, f.missed,
                                opt(f.sensitivity), opt(f.lead_median_hours), opt(f.lead_q1_hours),
                                opt(f.lead_q3_hours), opt(f.notices_per_catch), f.evaluations, f.caught_by_notice,
                                opt(f.lead_from_notice_median_hours), opt(f.wait_median_minutes),
                                opt(f.wait_p90_minutes), opt(f.never_taken_up)});
        const std::size_t n_shifts = rep.shifts.size();
        for (std::size_t u = 0; u < pop.units.size(); ++u)
            for (std::size_t k = 0; k < n_shifts; ++k) {
                const std::size_t s = rep.shifts[k];
                t.unit_shift_notices.add_row({setup.plans[p].name, pop.units[u],
                                              format_local(cal.shifts()[s].start, setup.zone), cal.name_of(s),
                                              std::int64_t{cal.is_night(s) ? 1 : 0},
                                              f.unit_shift_counts[u * n_shifts + k]});
            }
    }
    t.exclusions.name = "exclusions";
    t.exclusions.title = "Excluded or adjusted input, by reason";
    t.exclusions.columns = {"what", "reason", "count"};
    for (const auto& [reason, n] : pop.excluded.encounters_by_reason) t.exclusions.add_row({"encounters", reason, n});
    for (const auto& [reason, n] : pop.excluded.scores_by_reason) t.exclusions.add_row({"scores", reason, n});
    for (const auto& [reason, n] : pop.excluded.notes) t.exclusions.add_row({"notes", reason, n});
    for (const auto& [reason, rows] : pop.excluded.rows_skipped)
        t.exclusions.add_row({"skipped rows", reason + " (" + describe_lines(rows) + ")", rows.count});
    if (replayed_openings) add_chart_opening_exclusions(t.exclusions, *replayed_openings);
    {
        ChannelTables c = channel_tables(setup, settings, pop, cal, record);
        t.channel_burden = std::move(c.channel_burden);
        t.rounds = std::move(c.rounds);
        t.chart_interruptions = std::move(c.chart_interruptions);
    }
    if (setup.has_staff()) {
        const StaffModel model = staff_model(setup, static_cast<std::uint32_t>(pop.units.size()));
        std::vector<PlanStaffRun> runs;
        for (std::size_t p = 0; p < setup.plans.size(); ++p)
            runs.push_back({setup.plans[p].name, &model, setup.plans[p].staffing, &*record.plans[p].staff});
        // Same period as the notice counts: tasks created in it, complete shifts inside it.
        const ReportPeriod period{rep.from, rep.until};
        t.staff_workload = staff_workload_table(runs, cal, period);
        t.staff_escalations = escalation_table(runs, period);
        t.task_fates = task_fate_table(runs, period);
        if (with_task_log) {
            std::vector<std::string> ids;
            ids.reserve(pop.encounters.size());
            for (const Encounter& e : pop.encounters) ids.push_back(e.id);
            t.task_log = task_log_table(runs, ids, pop.units, setup.zone);
        }
    }
    if (with_notice_log) {
        Table log;
        log.name = "notice_log";
        log.title = "Every notice (holds encounter ids)";
        log.columns = {"plan", "replication", "encounter", "unit", "at", "score", "reason", "channel",
                       "evaluation", "opener", "delivery_minutes"};
        for (std::size_t p = 0; p < setup.plans.size(); ++p)
            for (const Notice& n : record.plans[p].notices)
                log.add_row({setup.plans[p].name, static_cast<std::int64_t>(record.replication),
                             pop.encounters[n.encounter].id, pop.units[n.unit], format_utc(n.at), n.score,
                             std::string(to_string(n.reason)), std::string(to_string(n.channel)),
                             std::int64_t{n.asks_evaluation ? 1 : 0},
                             n.channel == Channel::chart_interruption && setup.chart_openings
                                 ? Cell(setup.chart_openings->roles[n.opener_role].name)
                                 : Cell(),
                             delivery_minutes(setup.plans[p])});
        t.notice_log = std::move(log);
    }
    return t;
}

std::string run_header_text(const std::string& title, const TimeZone& zone, const Population& pop, const RunTables& t, const ReportingShifts& rep) {
    std::ostringstream o;
    std::int64_t cases = 0;
    for (const Encounter& e : pop.encounters) cases += e.outcome_at.has_value();
    o << title << "\n";
    o << "Population: " << pop.encounters.size() << " encounters on " << pop.units.size() << " units, " << cases
      << " with the outcome, " << pop.scores.size() << " usable scores.\n";
    o << "Per-shift figures cover " << rep.shifts.size() << " complete shifts from " << format_local(rep.from, zone)
      << " to " << format_local(rep.until, zone) << ".\n";
    if (t.exclusions.rows.empty()) o << "Nothing was excluded.\n";
    else o << "\n" << to_text(t.exclusions);
    return o.str();
}

std::string plan_summary_text(const RunTables& t) {
    std::ostringstream o;
    // A narrower view for the terminal; the CSV/JSON hold every column.
    Table view;
    view.title = "Plans compared (notices per unit per shift; lead in hours before time zero)";
    view.columns = {"plan", "notices", "shift_mean", "shift_p90", "night_mean", "night_p90", "night_max",
                    "caught", "missed", "sensitivity", "lead_median_h", "notices_per_catch"};
    const auto& cols = t.plan_summary.columns;
    auto at = [&](const std::vector<Cell>& row, const char* name) {
        return row[static_cast<std::size_t>(std::find(cols.begin(), cols.end(), name) - cols.begin())];
    };
    for (const auto& row : t.plan_summary.rows)
        view.add_row({at(row, "plan"), at(row, "notices"), at(row, "per_unit_shift_mean"),
                      at(row, "per_unit_shift_p90"), at(row, "per_unit_night_mean"), at(row, "per_unit_night_p90"),
                      at(row, "per_unit_night_max"), at(row, "caught"), at(row, "missed"), at(row, "sensitivity"),
                      at(row, "lead_median_h"), at(row, "notices_per_catch")});
    o << to_text(view) << "\n";
    if (t.staff_workload) {
        // Staff: the cost of each plan in people and time, and how catches change when
        // they count from the evaluation start rather than the notice.
        Table staff;
        staff.title = "Staff (catches count from the evaluation start; by notice = if evaluation were instant)";
        staff.columns = {"plan", "evaluations", "wait_median_min", "wait_p90_min", "never_taken_up",
                         "caught", "caught_by_notice", "lead_median_h", "lead_from_notice_median_h"};
        for (const auto& row : t.plan_summary.rows)
            staff.add_row({at(row, "plan"), at(row, "evaluations"), at(row, "wait_median_min"), at(row, "wait_p90_min"),
                           at(row, "never_taken_up"), at(row, "caught"), at(row, "caught_by_notice"),
                           at(row, "lead_median_h"), at(row, "lead_from_notice_median_h")});
        o << to_text(staff) << "\n";
        const auto& wc = t.staff_workload->columns;
        auto wat = [&](const std::vector<Cell>& row, const char* name) {
            return row[static_cast<std::size_t>(std::find(wc.begin(), wc.end(), name) - wc.begin())];
        };
        Table roles;
        roles.title = "Staff by plan and role (minutes per team per shift; waits from notice to start)";
        roles.columns = {"plan", "role", "team", "minutes_mean", "minutes_p90", "utilisation", "tasks_per_person",
                         "wait_p90_min", "wait_max_min", "never_taken_up", "overtime_min"};
        for (const auto& row : t.staff_workload->rows)
            roles.add_row({wat(row, "plan"), wat(row, "role"), wat(row, "team"), wat(row, "staff_minutes_per_shift_mean"),
                           wat(row, "staff_minutes_per_shift_p90"), wat(row, "utilisation"),
                           wat(row, "tasks_per_staff_member_per_shift"), wat(row, "wait_minutes_p90"),
                           wat(row, "wait_minutes_max"), wat(row, "never_taken_up"), wat(row, "overtime_minutes")});
        o << to_text(roles) << "\n";
        if (!t.staff_escalations->rows.empty()) o << to_text(*t.staff_escalations) << "\n";
    }
    if (!t.channel_burden.rows.empty()) {
        Table burden;
        burden.title = "\nBurden in each channel's own unit (mean, 90th percentile, worst; delivery minutes)";
        burden.columns = {"plan", "channel", "burden", "mean", "p90", "max", "minutes_mean", "evaluations"};
        const auto& bc = t.channel_burden.columns;
        auto col = [&](const std::vector<Cell>& row, const char* name) {
            return row[static_cast<std::size_t>(std::find(bc.begin(), bc.end(), name) - bc.begin())];
        };
        for (const auto& row : t.channel_burden.rows)
            burden.add_row({col(row, "plan"), col(row, "channel"), col(row, "burden"), col(row, "burden_mean"),
                            col(row, "burden_p90"), col(row, "burden_max"), col(row, "minutes_mean"),
                            col(row, "evaluations")});
        o << to_text(burden);
    }
    return o.str();
}

std::string run_summary_text(const std::string& title, const TimeZone& zone, const Population& pop, const RunTables& t,
                             const ReportingShifts& rep) {
    return run_header_text(title, zone, pop, t, rep) + "\n" + plan_summary_text(t) + "\n" + cautions_text() + "\n";
}

}  // namespace tocsin
