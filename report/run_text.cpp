#include "report/run_text.hpp"

#include <sstream>

#include "report/cautions.hpp"
#include "report/cells.hpp"
#include "report/comparison_tables.hpp"
#include "report/evaluation_tables.hpp"
#include "report/run_tables.hpp"

namespace tocsin {

namespace {

Table plans_view(const ReplicationResults& r) {
    Table view;
    view.title = "Plans compared (notices per unit per shift; lead in hours before time zero)";
    view.columns = {"plan", "notices", "shift_mean", "shift_p90", "night_mean", "night_p90", "night_max",
                    "caught", "missed", "sensitivity", "lead_median_h", "notices_per_catch",
                    "night_patients", "notice_ppv"};
    for (const PlanResult& p : r.plans) {
        const PlanFigures& f = p.figures;
        view.add_row({p.plan, f.notices, f.per_unit_shift_mean, f.per_unit_shift_p90, cell_or_empty(f.per_unit_night_mean),
                      cell_or_empty(f.per_unit_night_p90), cell_or_empty(f.per_unit_night_max), f.caught, f.missed, cell_or_empty(f.sensitivity),
                      cell_or_empty(f.lead_median_hours), cell_or_empty(f.notices_per_catch),
                      cell_or_empty(f.patients_per_unit_night_mean), cell_or_empty(f.notice_ppv)});
    }
    return view;
}

// The cost of each plan in people and time, and how catches change when they
// count from the evaluation start rather than the notice.
Table staff_view(const ReplicationResults& r) {
    Table staff;
    staff.title = "Staff (catches count from the evaluation start; by notice = if evaluation were instant)";
    staff.columns = {"plan", "evaluations", "wait_median_min", "wait_p90_min", "never_taken_up",
                     "caught", "caught_by_notice", "lead_median_h", "lead_from_notice_median_h"};
    for (const PlanResult& p : r.plans) {
        const PlanFigures& f = p.figures;
        staff.add_row({p.plan, f.evaluations, cell_or_empty(f.wait_median_minutes), cell_or_empty(f.wait_p90_minutes), cell_or_empty(f.never_taken_up),
                       f.caught, f.caught_by_notice, cell_or_empty(f.lead_median_hours), cell_or_empty(f.lead_from_notice_median_hours)});
    }
    return staff;
}

Table roles_view(const std::vector<RoleWorkload>& workload) {
    Table roles;
    roles.title = "Staff by plan and role (minutes per team per shift; waits from notice to start)";
    roles.columns = {"plan", "role", "team", "minutes_mean", "minutes_p90", "utilisation", "tasks_per_person",
                     "wait_p90_min", "wait_max_min", "never_taken_up", "overtime_min"};
    for (const RoleWorkload& w : workload)
        roles.add_row({w.plan, w.role, std::string(w.per_unit ? "each unit" : "hospital"),
                       cell_or_empty(w.staff_minutes_per_shift_mean), cell_or_empty(w.staff_minutes_per_shift_p90), cell_or_empty(w.utilisation),
                       cell_or_empty(w.tasks_per_staff_member_per_shift), cell_or_empty(w.wait_minutes_p90), cell_or_empty(w.wait_minutes_max),
                       w.never_taken_up, w.overtime_minutes});
    return roles;
}

Table burden_view(const std::vector<ChannelBurdenSummary>& burden) {
    Table view;
    view.title = "\nBurden in each channel's own unit (mean, 90th percentile, worst; delivery minutes)";
    view.columns = {"plan", "channel", "burden", "mean", "p90", "max", "minutes_mean", "evaluations"};
    for (const ChannelBurdenSummary& b : burden)
        view.add_row({b.plan, std::string(to_string(b.channel)), b.burden, cell_or_empty(b.burden_mean), cell_or_empty(b.burden_p90),
                      cell_or_empty(b.burden_max), cell_or_empty(b.minutes_mean), b.evaluations});
    return view;
}

}  // namespace

std::string run_header_text(const std::string& title, const TimeZone& zone, const PopulationSummary& pop,
                            const std::vector<Exclusion>& exclusions) {
    std::ostringstream o;
    o << title << "\n";
    o << "Population: " << pop.encounters << " encounters on " << pop.units << " units, " << pop.cases
      << " with the outcome, " << pop.scores << " usable scores.\n";
    o << "Per-shift figures cover " << pop.reporting_shifts << " complete shifts from " << format_local(pop.from, zone)
      << " to " << format_local(pop.until, zone) << ".\n";
    if (exclusions.empty()) o << "Nothing was excluded.\n";
    else o << "\n" << to_text(exclusions_table(exclusions));
    return o.str();
}

std::string plan_summary_text(const ReplicationResults& r) {
    // A narrower view for the terminal; the CSV/JSON hold every column.
    std::string o = to_text(plans_view(r)) + "\n";
    if (r.staff) {
        o += to_text(staff_view(r)) + "\n";
        o += to_text(roles_view(r.staff->workload)) + "\n";
        if (!r.staff->escalations.empty()) o += to_text(escalation_table(r.staff->escalations)) + "\n";
    }
    if (!r.channels.burden.empty()) o += to_text(burden_view(r.channels.burden));
    return o;
}

std::vector<std::string> plan_warning_lines(const PlanWarnings& w) {
    std::vector<std::string> lines;
    for (const ThresholdOutsideScores& t : w.thresholds) {
        const std::string range = format_real(t.observed.lowest) + " to " + format_real(t.observed.highest);
        lines.push_back("Warning: plan " + t.plan + "'s threshold, " + format_real(t.threshold) + ", is " +
                        (t.above ? "above" : "below") + " every usable score of replication 0 (" + range + "): " +
                        (t.above ? "no score reaches it, so it never fires" : "every score reaches it") +
                        ". Is the threshold on the scores' scale?");
    }
    for (const IdenticalPlans& same : w.identical) {
        std::string names;
        for (std::size_t i = 0; i < same.plans.size(); ++i)
            names += (i == 0 ? "" : i + 1 == same.plans.size() ? " and " : ", ") + same.plans[i];
        lines.push_back("Warning: plans " + names + " gave identical figures in replication 0 (notices, catches, "
                        "notices in every unit and shift): what sets them apart never came into play on this "
                        "population (a threshold on another scale than the scores does this).");
    }
    return lines;
}

std::string run_text(const Scenario& sc, const RunOutput& out, const RunSettings& settings) {
    const std::size_t burden = metric_index(*find_metric(settings.burden_metric));
    const std::size_t benefit = metric_index(*find_metric(settings.benefit_metric));
    std::string text = run_header_text(sc.name, sc.simulation.zone, out.first_replication.population,
                                       out.first_replication.exclusions) + "\n";
    for (const std::string& line : plan_warning_lines(out.warnings)) text += line + "\n";
    if (!sc.population.fit_check.empty())
        text += "Warning: this population was fitted to a log whose figures it does not reproduce (tocsin fit --check): " +
                sc.population.fit_check + ". Read its benefit and burden with that in mind.\n";
    if (!out.warnings.empty() || !sc.population.fit_check.empty()) text += "\n";
    if (sc.replications > 1) text += comparison_text(out.figures);
    else text += plan_summary_text(out.first_replication);
    if (out.evaluation) text += "\nThe score on the same population (replication 0):\n" + evaluation_summary(*out.evaluation);
    if (sc.simulation.plans.size() > 2) text += "\n" + frontier_text(out.figures, burden, benefit);
    if (out.budget)
        text += "\n" + budget_text(out.figures, *out.budget, metric_index(*find_metric(settings.budget_metric)),
                                   *settings.budget_limit, benefit);
    text += "\n" + cautions_text() + "\n";
    return text;
}

}  // namespace tocsin
