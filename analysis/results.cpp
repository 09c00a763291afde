#include "analysis/results.hpp"

#include <algorithm>

#include "sim/channels.hpp"
#include "analysis/quantiles.hpp"
#include "analysis/workload.hpp"

namespace tocsin {

PopulationSummary population_summary(const Population& pop, const ReportingShifts& rep) {
    PopulationSummary s;
    s.encounters = pop.encounters.size();
    s.units = pop.units.size();
    s.unit_names = pop.units;
    s.scores = pop.scores.size();
    for (const Encounter& e : pop.encounters) s.cases += e.outcome_at.has_value();
    s.reporting_shifts = rep.shifts.size();
    s.from = rep.from;
    s.until = rep.until;
    return s;
}

std::vector<Exclusion> exclusions(const Population& pop, const ChartOpeningLog* replayed_openings) {
    std::vector<Exclusion> out;
    for (const auto& [reason, n] : pop.excluded.encounters_by_reason) out.push_back({Excluded::encounters, reason, n, {}});
    // With several scores each score's exclusions are its own, named by the score.
    const std::string first = pop.other_scores.empty() ? "" : pop.score_name + ": ";
    for (const auto& [reason, n] : pop.excluded.scores_by_reason) out.push_back({Excluded::scores, first + reason, n, {}});
    for (const OtherScore& o : pop.other_scores)
        for (const auto& [reason, n] : o.excluded_by_reason) out.push_back({Excluded::scores, o.name + ": " + reason, n, {}});
    for (const auto& [reason, n] : pop.excluded.notes) out.push_back({Excluded::notes, reason, n, {}});
    for (const auto& [reason, rows] : pop.excluded.rows_skipped)
        out.push_back({Excluded::skipped_rows, reason, rows.count, rows});
    if (!replayed_openings) return out;
    const ChartOpeningLog& log = *replayed_openings;
    for (const auto& [reason, n] : log.excluded_by_reason) out.push_back({Excluded::chart_openings, reason, n, {}});
    for (const auto& [reason, n] : log.notes) out.push_back({Excluded::chart_opening_timestamps, reason, n, {}});
    for (const auto& [reason, rows] : log.rows_skipped)
        out.push_back({Excluded::skipped_rows, reason, rows.count, rows});
    return out;
}

namespace {

void add_unit_shift_notices(std::vector<UnitShiftNotices>& out, const std::string& plan, const PlanFigures& f,
                            const Population& pop, const ShiftCalendar& cal, const ReportingShifts& rep) {
    const std::size_t n_shifts = rep.shifts.size();
    for (std::size_t u = 0; u < pop.units.size(); ++u)
        for (std::size_t k = 0; k < n_shifts; ++k) {
            const std::size_t s = rep.shifts[k];
            out.push_back({plan, pop.units[u], cal.shifts()[s].start, cal.name_of(s), cal.is_night(s),
                           f.unit_shift_counts[u * n_shifts + k]});
        }
}

std::vector<LoggedNotice> notice_log(const SimulationSetup& setup, const Population& pop, const ReplicationRecord& record) {
    std::vector<LoggedNotice> log;
    for (std::size_t p = 0; p < setup.plans.size(); ++p)
        for (const Notice& n : record.plans[p].notices) {
            LoggedNotice l{setup.plans[p].name, record.replication, pop.encounters[n.encounter].id, pop.units[n.unit],
                           n.at, n.score, n.reason, n.channel, n.asks_evaluation, std::nullopt,
                           delivery_minutes(setup.plans[p])};
            if ((n.channel == Channel::chart_interruption || n.channel == Channel::score_lookup) && setup.chart_openings)
                l.opener = setup.chart_openings->roles[n.opener_role].name;
            log.push_back(std::move(l));
        }
    return log;
}

StaffResults staff_results(const SimulationSetup& setup, const Population& pop, const ShiftCalendar& cal,
                           const ReportingShifts& rep, const ReplicationRecord& record, bool with_task_log) {
    // One model per plan: a plan may declare its own escalation and roster.
    std::vector<StaffModel> models;
    models.reserve(setup.plans.size());
    for (const Plan& plan : setup.plans)
        models.push_back(staff_model(setup, plan, static_cast<std::uint32_t>(pop.units.size())));
    std::vector<PlanStaffRun> runs;
    for (std::size_t p = 0; p < setup.plans.size(); ++p)  // a ranked review has no role tasks (sim/simulate.cpp)
        if (record.plans[p].staff)
            runs.push_back({setup.plans[p].name, &models[p], setup.plans[p].staffing, &*record.plans[p].staff});
    // Same period as the notice counts: tasks created in it, complete shifts inside it.
    const ReportPeriod period{rep.from, rep.until};
    StaffResults s;
    s.workload = staff_workload(runs, cal, period);
    s.escalations = escalations(runs, period);
    s.fates = task_fates(runs, period);
    if (with_task_log) {
        std::vector<std::string> ids;
        ids.reserve(pop.encounters.size());
        for (const Encounter& e : pop.encounters) ids.push_back(e.id);
        s.task_log = task_log(runs, ids, pop.units, record.replication);
    }
    return s;
}

}  // namespace

ReplicationResults replication_results(const SimulationSetup& setup, const AnalysisSettings& settings, const Population& pop,
                                       const ShiftCalendar& cal, const ReplicationRecord& record, bool with_notice_log,
                                       bool with_task_log, const ChartOpeningLog* replayed_openings) {
    const ReportingShifts rep = reporting_shifts(settings, pop, cal);
    KnownFigures known;
    for (std::size_t p = 0; p < setup.plans.size(); ++p) {
        known.plans.push_back(plan_figures(settings, pop, cal, rep, record.plans[p]));
        add_plan_burdens(known.plans.back(), setup, pop, cal, rep, setup.plans[p], record.plans[p]);
    }
    known.units = unit_figures(setup, settings, pop, cal, rep, record, known.plans);
    known.groups = group_figures(setup, settings, pop, record);
    return replication_results(setup, settings, pop, cal, record, std::move(known), with_notice_log, with_task_log,
                               replayed_openings);
}

ReplicationResults replication_results(const SimulationSetup& setup, const AnalysisSettings& settings, const Population& pop,
                                       const ShiftCalendar& cal, const ReplicationRecord& record, KnownFigures known,
                                       bool with_notice_log, bool with_task_log, const ChartOpeningLog* replayed_openings) {
    ReplicationResults r;
    r.replication = record.replication;
    const ReportingShifts rep = reporting_shifts(settings, pop, cal);
    r.population = population_summary(pop, rep);
    for (std::size_t p = 0; p < setup.plans.size(); ++p) {
        PlanResult plan{setup.plans[p].name, setup.plans[p].channel, std::move(known.plans[p])};
        add_unit_shift_notices(r.unit_shift_notices, plan.plan, plan.figures, pop, cal, rep);
        r.plans.push_back(std::move(plan));
    }
    r.units = std::move(known.units);
    r.groups = std::move(known.groups);
    r.exclusions = exclusions(pop, replayed_openings);
    r.channels = channel_results(setup, rep, pop, cal, record);
    r.acceptance_by_load = acceptance_by_load(setup, record, rep.from, rep.until);
    if (setup.has_staff()) r.staff = staff_results(setup, pop, cal, rep, record, with_task_log);
    if (with_notice_log) r.notice_log = notice_log(setup, pop, record);
    return r;
}

}  // namespace tocsin
