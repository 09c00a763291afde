#include "report/run_text.hpp"

#include <algorithm>
#include <cmath>
#include <sstream>

#include "report/cautions.hpp"
#include "report/cells.hpp"
#include "report/averted_tables.hpp"
#include "report/comparison_tables.hpp"
#include "report/evaluation_tables.hpp"
#include "report/score_comparison_tables.hpp"
#include "report/group_tables.hpp"
#include "report/run_tables.hpp"
#include "report/unit_tables.hpp"

namespace tocsin {

namespace {

// What each plan costs the people who receive its notices, then what it
// gains: two tables rather than one too wide for a terminal.
Table plans_burden_view(const ReplicationResults& r) {
    Table view;
    view.title = "Plans compared: burden (notices per unit per shift and per night)";
    // Every column but the plan is named as the metric is in options and CSV.
    view.columns = {"plan", "notices", "per_unit_shift_mean", "per_unit_shift_p90", "per_unit_night_mean",
                    "per_unit_night_p90", "per_unit_night_max", "patients_per_unit_night_mean"};
    for (const PlanResult& p : r.plans) {
        const PlanFigures& f = p.figures;
        view.add_row({p.plan, f.notices, f.per_unit_shift_mean, f.per_unit_shift_p90, cell_or_empty(f.per_unit_night_mean),
                      cell_or_empty(f.per_unit_night_p90), cell_or_empty(f.per_unit_night_max),
                      cell_or_empty(f.patients_per_unit_night_mean)});
    }
    return view;
}

Table plans_benefit_view(const ReplicationResults& r) {
    Table view;
    view.title = "Plans compared: benefit (lead in hours before time zero)";
    view.columns = {"plan", "caught", "missed", "sensitivity", "lead_median_h", "notices_per_catch", "notice_ppv"};
    for (const PlanResult& p : r.plans) {
        const PlanFigures& f = p.figures;
        view.add_row({p.plan, f.caught, f.missed, cell_or_empty(f.sensitivity), cell_or_empty(f.lead_median_hours),
                      cell_or_empty(f.notices_per_catch), cell_or_empty(f.notice_ppv)});
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
    add_other_work_columns(roles, workload);
    return roles;
}

// Printed only when a role has other work: staff time split into alert work
// and other work, for runs whose terminal text shows no staff table.
std::string other_work_text(const ReplicationResults& r) {
    if (!r.staff || std::none_of(r.staff->workload.begin(), r.staff->workload.end(),
                                 [](const RoleWorkload& w) { return w.has_other_work; }))
        return "";
    Table view;
    view.title = "Staff time, alert work and other work apart (replication 0; all columns in staff_workload)";
    view.columns = {"plan", "role", "utilisation", "other_utilisation", "total_utilisation", "wait_p90_min",
                    "other_wait_p90_min"};
    for (const RoleWorkload& w : r.staff->workload)
        if (w.has_other_work)
            view.add_row({w.plan, w.role, cell_or_empty(w.utilisation), cell_or_empty(w.other_utilisation),
                          cell_or_empty(w.total_utilisation), cell_or_empty(w.wait_minutes_p90),
                          cell_or_empty(w.other_wait_minutes_p90)});
    return to_text(view);
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
    o << "Population: " << pop.encounters << " encounters on " << pop.units << (pop.units == 1 ? " unit" : " units");
    for (std::size_t u = 0; u < pop.unit_names.size(); ++u) o << (u ? ", " : " (") << pop.unit_names[u];
    o << (pop.unit_names.empty() ? "" : ")") << ", " << pop.cases << " with the outcome, " << pop.scores << " usable scores.\n";
    o << "Per-shift figures cover " << pop.reporting_shifts << " complete shifts from " << format_local(pop.from, zone)
      << " to " << format_local(pop.until, zone) << ".\n";
    if (exclusions.empty()) o << "Nothing was excluded.\n";
    else o << "\n" << to_text(exclusions_table(exclusions));
    return o.str();
}

std::string plan_summary_text(const ReplicationResults& r) {
    // A narrower view for the terminal; the CSV/JSON hold every column.
    std::string o = to_text(plans_burden_view(r)) + "\n" + to_text(plans_benefit_view(r)) + "\n";
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
    for (const ThresholdBelowMostScores& t : w.low_thresholds) {
        const std::string range = format_real(t.observed.lowest) + " to " + format_real(t.observed.highest);
        lines.push_back("Warning: plan " + t.plan + "'s threshold, " + format_real(t.threshold) +
                        ", is at or below the " + format_real(std::round((1 - most_scores_share) * 100)) +
                        "th percentile of the usable scores of replication 0 (" +
                        format_real(t.low_percentile) + "; scores " + range + "): " +
                        format_real(std::round(t.share_reaching * 1000) / 10) + "%" +
                        " of scores reach it, so the plan fires on nearly every score. Is the threshold on the "
                        "scores' scale?");
    }
    for (const ThresholdLikeAProbability& t : w.probability_thresholds)
        lines.push_back("Warning: plan " + t.plan + "'s threshold, " + format_real(t.threshold) +
                        ", looks like a probability, but the usable scores of replication 0 run from " +
                        format_real(t.observed.lowest) + " to " + format_real(t.observed.highest) +
                        ", beyond 1: " + format_real(std::round(t.share_reaching * 1000) / 10) +
                        "% of scores reach it. Is the threshold on the scores' scale?");
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
    if (sc.replications > 1) {
        text += comparison_text(out.figures);
        text += "\n" + channel_units_text(out.figures, out.first_replication.channels.burden);
        if (const std::string other = other_work_text(out.first_replication); !other.empty()) text += "\n" + other;
    }
    else text += plan_summary_text(out.first_replication);
    if (const std::string averted = outcomes_averted_text(out.figures); !averted.empty()) text += "\n" + averted;
    if (const std::string fatigue = acceptance_by_load_text(out.first_replication.acceptance_by_load); !fatigue.empty())
        text += "\nResponse that falls with load (replication 0, reporting period):\n" + fatigue;
    if (const std::string wards = per_ward_text(out.unit_figures); !wards.empty()) text += "\n" + wards;
    if (const std::string groups = who_is_reached_text(out.first_replication.groups, out.group_scores,
                                                       sc.analysis.smallest_group,
                                                       replication_zero_basis(sc.population));
        !groups.empty())
        text += "\n" + groups;
    if (out.evaluation) text += "\nThe score on the same population (replication 0):\n" + evaluation_summary(*out.evaluation);
    text += other_score_summaries(out.other_evaluations, out.score_comparison);
    if (!out.score_comparison.auc.empty()) text += "\n" + score_comparison_text(out.score_comparison);
    if (!out.matched_plans.empty()) text += "\n" + matched_plans_text(out.matched_plans);
    if (sc.simulation.plans.size() > 2) text += "\n" + frontier_text(out.figures, burden, benefit);
    if (!out.budget.empty())
        text += "\n" + budget_text(out.figures, out.budget, metric_index(*find_metric(settings.budget_metric)),
                                   *settings.budget_limit, benefit);
    text += "\n" + cautions_text() + "\n";
    return text;
}

}  // namespace tocsin
