#include "report/report_run.hpp"

#include <algorithm>
#include <cctype>
#include <cmath>
#include <cstdio>
#include <map>
#include <sstream>
#include <utility>
#include <vector>

#include "analysis/averted.hpp"
#include "report/averted_tables.hpp"
#include "report/basis.hpp"
#include "report/cells.hpp"
#include "report/comparison_tables.hpp"
#include "report/group_tables.hpp"
#include "report/html.hpp"
#include "report/run_tables.hpp"
#include "report/score_comparison_tables.hpp"
#include "report/run_text.hpp"
#include "report/unit_tables.hpp"

namespace tocsin {

namespace {

// The figures the comparison table shows, in this order, when the run has them.
const std::vector<std::string> shown_metrics = {"per_unit_night_mean", "per_unit_night_p90", "caught",
                                                "sensitivity", "lead_median_h", "notices_per_catch",
                                                "patients_per_unit_night_mean", "notice_ppv"};

// The staff workload columns the report shows, and their headers.
const std::vector<std::pair<std::string, std::string>> staff_labels = {
    {"role", "Role"},
    {"team", "Team"},
    {"tasks_started", "evaluations started"},
    {"staff_minutes_per_shift_mean", "staff minutes per shift"},
    {"staff_minutes_per_shift_p90", "staff minutes per shift, 90th percentile"},
    {"utilisation", "share of rostered time busy"},
    {"wait_minutes_median", "median wait, minutes"},
    {"wait_minutes_p90", "wait, 90th percentile, minutes"},
    {"never_taken_up", "never taken up"},
    {"other_tasks_arrived", "other work: tasks arrived"},
    {"other_tasks_started", "other work: tasks started"},
    {"other_utilisation", "other work: share of rostered time"},
    {"total_utilisation", "share of rostered time busy, all work"},
    {"other_wait_minutes_median", "other work: median wait, minutes"},
    {"other_wait_minutes_p90", "other work: wait, 90th percentile, minutes"},
    {"other_never_taken_up", "other work: never taken up"}};

// The scenario's description (study/describe.hpp) after its name and
// question, one line per statement: a list's entries stand alone, named by
// the list's entry label ("Plan page-70: ..."), with their own statements
// joined on as sentences.
std::vector<std::string> assumptions_of(const Scenario& sc) {
    std::vector<std::string> lines;
    for (const DescriptionItem& item : scenario_description(sc).items) {
        if (item.items.empty()) {
            lines.push_back(item.text);
            continue;
        }
        for (const DescriptionItem& entry : item.items) {
            std::string line = item.entry_label + " " + entry.text;
            for (const DescriptionItem& statement : entry.items) {
                std::string sentence = statement.text;
                if (sentence.empty()) continue;
                sentence[0] = static_cast<char>(std::toupper(static_cast<unsigned char>(sentence[0])));
                line += (line.back() == '.' ? " " : ". ") + sentence;
            }
            lines.push_back(std::move(line));
        }
    }
    return lines;
}

std::string percent(double share) { return format_real(100 * share, 0) + "%"; }

std::string budget_sentence(const RunOutput& out, const Metric& budget, const Metric& benefit, double limit) {
    const ReplicatedFigures& f = out.figures;
    std::string s = "Budget: " + std::string(budget.label) + " at most " + format_for_people(limit) +
                    " (mean over replications).";
    if (budget.name.rfind("worst_unit", 0) == 0) s += " The worst ward decides.";
    for (const BudgetAnswer& a : out.budget) {
        const std::string among = a.channel ? " among the " + std::string(to_string(*a.channel)) + " plans" : "";
        if (!a.best) {
            s += " No plan" + among + " keeps within it.";
            continue;
        }
        const MeanInterval gain = mean_interval(f.of(*a.best, metric_index(benefit)));
        s += " Best within the budget" + among + ": " + f.plans[*a.best] + ", with " + format_for_people(gain.mean) +
             " " + std::string(benefit.label);
        if (std::isfinite(gain.low)) s += " (" + format_for_people(gain.low) + " to " + format_for_people(gain.high) + ")";
        s += ". It had the most " + std::string(benefit.label) + " among the plans within the budget in " +
             percent(a.share_best) + " of " + std::to_string(f.replications) + " replications.";
        std::vector<std::string> within;
        for (std::size_t p : a.within) within.push_back(f.plans[p]);
        if (within.size() > 1) {
            s += " Plans within the budget: ";
            for (std::size_t i = 0; i < within.size(); ++i) s += (i ? ", " : "") + within[i];
            s += ".";
        }
    }
    return s;
}

// A replayed log's wards are known only once it is read; a generated
// population's are named, with their beds, in its description.
void add_logged_wards(ReportInput& in, const Scenario& sc, const PopulationSummary& pop) {
    if (sc.population.source != PopulationSource::replay || pop.unit_names.empty()) return;
    std::string line = pop.unit_names.size() == 1 ? "Ward in the log: " : "Wards in the log: ";
    for (std::size_t i = 0; i < pop.unit_names.size(); ++i)
        line += (i == 0 ? "" : i + 1 == pop.unit_names.size() ? " and " : ", ") + pop.unit_names[i];
    in.assumptions.push_back(line + ".");
}

// Rows a dirty log lost under bad_rows: skip change every figure, so the
// report says so where it states what the figures rest on.
void add_skipped_rows(ReportInput& in, const std::vector<Exclusion>& exclusions) {
    for (const Exclusion& e : exclusions)
        if (e.what == Excluded::skipped_rows)
            in.assumptions.push_back("Input rows skipped (bad_rows: skip): " + std::to_string(e.count) +
                                     (e.count == 1 ? " row, " : " rows, ") + exclusion_reason(e) + ".");
}

// The figures the comparison shows: the usual ones, then the frontier's axes
// and the figure the budget limits (the worst ward's, by default).
std::vector<std::size_t> compared_metrics(const Metric* burden, const Metric* benefit, const Metric* budget) {
    std::vector<std::size_t> metrics;
    for (const std::string& name : shown_metrics)
        if (const Metric* m = find_metric(name)) metrics.push_back(metric_index(*m));
    for (const Metric* m : {burden, benefit, budget})
        if (m && std::find(metrics.begin(), metrics.end(), metric_index(*m)) == metrics.end())
            metrics.push_back(metric_index(*m));
    return metrics;
}

void add_comparison(ReportInput& in, const ReplicatedFigures& f, const std::vector<std::size_t>& metrics) {
    in.comparison = comparison_by_plan(f, metrics);
    in.comparison.title = "Plans compared over " + std::to_string(f.replications) +
                          (f.replications == 1 ? " replication" : " replications");
    if (f.replications <= 1) {
        in.interval_note = "One replication: no interval. Set replications in the scenario for intervals.";
        return;
    }
    in.interval_note = "Brackets: 95% confidence interval of the mean over the " + std::to_string(f.replications) +
                       " replications (mean \xC2\xB1 t \xC3\x97 standard deviation / \xE2\x88\x9A" "replications; "
                       "Student 1908). Replications in which a figure is undefined are left out of it.";
    if (f.first_is_log)
        in.interval_note += " The rows \"as logged\" give the log's own figure: replication 0 is the log as replayed, "
                            "and the other replications resample its days (the means include replication 0).";
    if (f.plans.size() > 1 && !metrics.empty()) {
        in.differences = differences_by_plan(f, metrics);
        in.differences_note = "Each figure is the plan's value minus " + f.plans.front() +
                              "'s in the same replication, averaged, with its own 95% interval.";
    }
}

// With several scores, each plan's frontier mark says which score it reads.
void mark_scores_on_frontier(ReportInput& in, const Scenario& sc) {
    if (sc.other_scores.empty()) return;
    in.frontier_series = {sc.score_name};
    for (const ScoreLabel& s : sc.other_scores) in.frontier_series.push_back(s.name);
    for (ReportFrontierPoint& p : in.frontier)
        for (const Plan& plan : sc.simulation.plans)
            if (plan.name == p.plan) p.series = plan.score;
}

void add_frontier(ReportInput& in, const ReplicatedFigures& f, const Metric& burden, const Metric& benefit) {
    in.burden_label = std::string(burden.label);
    in.benefit_label = std::string(benefit.label);
    in.comparison_basis = comparison_basis_text(f, metric_index(burden));
    const auto groups = comparison_groups(f, metric_index(burden));
    for (const FrontierPoint& p : frontier(f, metric_index(burden), metric_index(benefit))) {
        const MeanInterval b = mean_interval(f.of(p.plan, metric_index(burden)));
        const MeanInterval g = mean_interval(f.of(p.plan, metric_index(benefit)));
        const auto& group = groups[p.group];
        in.frontier.push_back({f.plans[p.plan], b.mean, b.low, b.high, g.mean, g.low, g.high, p.on_frontier,
                               group.channel ? std::string(to_string(*group.channel)) + " plans" : std::string()});
    }
}

// Pages per unit per night: every unit-night of the first replication.
void add_burden_per_night(ReportInput& in, const ReplicationResults& first, const std::vector<std::string>& plans) {
    std::map<std::string, std::vector<double>> nights;
    for (const UnitShiftNotices& u : first.unit_shift_notices)
        if (u.night) nights[u.plan].push_back(static_cast<double>(u.notices));
    if (!nights.empty())
        for (const std::string& plan : plans) in.burden_per_night.push_back({plan, nights[plan]});
    in.burden_note = "one unit on one night of the first replication";
}

// Lead times: the run keeps each replication's median, not every case, so
// with several replications the chart shows how that median varies. With
// staff, lead time counts from the start of the evaluation.
void add_lead_times(ReportInput& in, const ReplicatedFigures& f, bool with_staff) {
    const Metric* lead = find_metric("lead_median_h");
    if (!lead || f.replications <= 1) return;
    auto& series = with_staff ? in.lead_times_from_evaluation_hours : in.lead_times_hours;
    for (std::size_t p = 0; p < f.plans.size(); ++p) {
        const auto values = f.of(p, metric_index(*lead));
        series.push_back({f.plans[p], std::vector<double>(values.begin(), values.end())});
    }
    in.lead_time_note = "One value is the median lead time of the caught cases in one replication.";
}

// Each plan on each ward, when there is more than one: a pooled percentile can
// sit below one busy ward's own.
void add_per_ward(ReportInput& in, const ReplicatedUnitFigures& f, const Metric* budget) {
    if (f.units.size() < 2) return;
    in.per_ward = per_ward_table(f);
    in.per_ward->title = "Each plan on each ward";
    std::string wards;
    for (std::size_t i = 0; i < f.units.size(); ++i)
        wards += (i == 0 ? "" : i + 1 == f.units.size() ? " and " : ", ") + f.units[i];
    in.per_ward_intro = "The wards: " + wards + ". Each row is one plan on one ward: notices per night on that "
                        "ward, and that ward's own patients with the outcome, how many were caught and how early. "
                        "A figure pooled over wards can hide a busy ward among quiet ones.";
    if (budget && budget->name.rfind("worst_unit", 0) == 0)
        in.per_ward_intro += " The budget question is decided by the worst ward: a plan is within the budget only when "
                             "every ward is.";
    in.per_ward_note = f.replications > 1 ? "Brackets: 95% confidence interval of the mean over the " +
                                                std::to_string(f.replications) + " replications, as above."
                                          : "One replication: no interval.";
    in.column_labels["unit"] = "Ward";
    for (const UnitMetric& m : unit_metrics())
        if (!in.column_labels.count(std::string(m.name))) in.column_labels[std::string(m.name)] = std::string(m.label);
}

// Who is reached: each plan by patient group, when the scenario declares groups.
void add_groups(ReportInput& in, const Scenario& sc, const RunOutput& out, const TableBases& basis) {
    const std::vector<GroupFigures>& first = out.first_replication.groups;
    if (first.empty()) return;
    const std::int64_t smallest = sc.analysis.smallest_group;
    in.group_intro = "For each patient group the scenario declares: how many of the group's patients with the outcome "
                     "each plan caught, with a 95% Wilson interval, and how often it sent a notice for the group's "
                     "patients, per 100 patient-days so that groups of different size compare. Then the score itself "
                     "by group. Basis: " + basis.first + ".";
    in.group_lines = group_warning_lines(first, out.group_scores, smallest);
    for (const std::string& line : in.group_lines)
        if (line.rfind("Warning:", 0) == 0) in.key_findings.push_back(line);
    in.group_charts = group_sensitivity_charts(first, smallest);
    in.group_tables.push_back(plan_group_summary_table(first, out.first_replication.replication));
    in.group_tables.back().basis = basis.first;
    in.group_tables.push_back(group_score_table(out.group_scores));
    in.group_tables.back().basis = basis.first_scores;
    in.group_note = group_caution_text() + " A group with fewer than " + std::to_string(smallest) +
                    " encounters (reporting.smallest_group) has its figures suppressed, as small-number disclosure "
                    "rules usually require; a share of cases caught or an AUC needs at least " +
                    std::to_string(min_cases_for_figure) + " cases (common practice, no source). Across replications: "
                    "plan_group_comparison.csv; at each plan's threshold: score_by_group_at_thresholds.csv.";
    in.column_labels["group"] = "Group";
    in.column_labels["value"] = "Value";
    in.column_labels["notices_per_100_patient_days"] = "notices per 100 patient-days";
    in.column_labels["patient_days"] = "patient-days";
}

void add_staff(ReportInput& in, const std::vector<RoleWorkload>& workload) {
    Table t;
    t.name = "staff_workload";
    t.title = "Staff work and waits by plan and role (first replication)";
    t.columns = {"plan", "role", "team", "tasks_started", "staff_minutes_per_shift_mean", "staff_minutes_per_shift_p90",
                 "utilisation", "wait_minutes_median", "wait_minutes_p90", "never_taken_up"};
    for (const RoleWorkload& w : workload)
        t.add_row({w.plan, w.role, std::string(w.per_unit ? "each unit" : "hospital"), w.tasks_started,
                   cell_or_empty(w.staff_minutes_per_shift_mean), cell_or_empty(w.staff_minutes_per_shift_p90), cell_or_empty(w.utilisation),
                   cell_or_empty(w.wait_minutes_median), cell_or_empty(w.wait_minutes_p90), w.never_taken_up});
    add_other_work_columns(t, workload);
    const bool other = std::any_of(workload.begin(), workload.end(), [](const RoleWorkload& w) { return w.has_other_work; });
    in.staff_and_waits = std::move(t);
    in.staff_note = "Utilisation is the staff minutes worked over the minutes rostered. A wait runs from the "
                    "notice to the start of the evaluation; tasks never taken up are counted apart, not as waits.";
    if (other)
        in.staff_note += " Other work is what the roles do that no score raised (declared per role, the same in every "
                         "plan); it competes for the same staff, so it lengthens the alert tasks' waits. Its columns "
                         "count it apart; the alert columns count alert tasks only, and total utilisation is both.";
    for (const auto& [name, label] : staff_labels) in.column_labels[name] = label;
}

void add_run_record(ReportInput& in, const Scenario& sc, const ReplicatedFigures& f, const Metric* burden,
                    const Metric* benefit) {
    char hash[32];
    std::snprintf(hash, sizeof hash, "fnv1a64:%016llx", static_cast<unsigned long long>(sc.source_hash));
    in.run.tool_version = TOCSIN_VERSION;
    in.run.scenario_name = sc.name;
    in.run.scenario_hash = hash;
    in.run.seed = sc.simulation.seed;
    in.run.replications = static_cast<std::int64_t>(f.replications);
    in.run.other = {{"Scenario file", sc.file}};
    if (burden) in.run.other.emplace_back("Burden measure", std::string(burden->name));
    if (benefit) in.run.other.emplace_back("Benefit measure", std::string(benefit->name));
}

}  // namespace

ReportInput report_input_for_run(const Scenario& sc, const RunOutput& out, const RunSettings& settings) {
    ReportInput in;
    in.title = sc.name;
    in.question = sc.description;
    in.key_findings = plan_warning_lines(out.warnings);  // first, where a reader starts
    in.assumptions = assumptions_of(sc);
    add_logged_wards(in, sc, out.first_replication.population);
    add_skipped_rows(in, out.first_replication.exclusions);
    for (const Metric& m : plan_metrics()) in.column_labels[std::string(m.name)] = std::string(m.label);
    in.column_labels["plan"] = "Plan";

    const ReplicatedFigures& f = out.figures;
    const Metric* burden = find_metric(settings.burden_metric);
    const Metric* benefit = find_metric(settings.benefit_metric);
    const TableBases basis = table_bases(sc.population, out.first_replication.population, f.replications,
                                         sc.simulation.zone);
    const Metric* budget = find_metric(settings.budget_metric);
    add_comparison(in, f, compared_metrics(burden, benefit, settings.budget_limit ? budget : nullptr));
    in.comparison.basis = basis.replications;
    if (in.differences) in.differences->basis = basis.replications;
    if (burden && benefit) add_frontier(in, f, *burden, *benefit);
    mark_scores_on_frontier(in, sc);
    if (settings.budget_limit && budget && benefit && !out.budget.empty()) {
        in.budget_answer = budget_sentence(out, *budget, *benefit, *settings.budget_limit);
        if (budget == burden) in.burden_limit = settings.budget_limit;
        if (budget->name.rfind("per_unit_night", 0) == 0 || budget->name.rfind("worst_unit_night", 0) == 0)
            in.per_night_limit = settings.budget_limit;
    }
    add_per_ward(in, out.unit_figures, settings.budget_limit ? budget : nullptr);
    if (in.per_ward) in.per_ward->basis = basis.replications;
    add_groups(in, sc, out, basis);
    if (out.evaluation)
        add_score_comparison(in, out.score_comparison, *out.evaluation, out.other_evaluations, basis.first_scores,
                             out.matched_plans, basis.replications);
    add_burden_per_night(in, out.first_replication, f.plans);
    in.channel_units = channel_units_table(f, out.first_replication.channels.burden);
    if (in.channel_units) in.channel_units->basis = basis.replications;
    in.channel_units_note = "Each channel counts its burden in the unit a nurse manager would count it in; plans of "
                            "different channels are compared on staff minutes or evaluations per unit per shift, "
                            "which mean the same for every channel (staff minutes need roles). " +
                            std::string(f.replications > 1 ? "Brackets: 95% confidence interval over the replications."
                                                           : "One replication: no interval.");
    const bool with_staff = out.first_replication.staff.has_value();
    add_lead_times(in, f, with_staff);
    if (with_staff) {
        add_staff(in, out.first_replication.staff->workload);
        in.staff_and_waits->basis = basis.first;
    }
    if ((in.outcomes_averted = outcomes_averted_table(f))) {
        in.outcomes_averted->basis = basis.replications;
        in.outcomes_averted_note =
            "These figures are " + std::string(averted_caution) + ": the scenario declares how likely an evaluation "
            "is to prevent the outcome by how long before time zero it starts (see \"What the scenario assumes\"), "
            "and each plan's caught cases are counted through that assumption. They say what a plan might achieve "
            "if the assumption held; they are not evidence that it does.";
    }
    if (!out.first_replication.acceptance_by_load.empty()) {
        in.acceptance_by_load = acceptance_by_load_table(out.first_replication.acceptance_by_load);
        in.acceptance_by_load->basis = basis.first_shifts;
        for (const auto& [name, label] : std::vector<std::pair<std::string, std::string>>{
                 {"load", "load counted"},
                 {"band", "notices before"},
                 {"share", "share that led to an evaluation"},
                 {"declared_probability", "declared probability (mean)"}})
            in.column_labels[name] = label;
        in.acceptance_note =
            "Some plans declare that the chance a notice leads to an evaluation falls with the notices before it "
            "(an assumption, README \"Response that falls with load\"). Each row counts the notices that met a load "
            "in that band: how many led to an evaluation, and the probability the declared effect gave them on "
            "average. A page not followed was acknowledged without an evaluation; an interruption not followed was "
            "dismissed. Neither can catch a case.";
    }
    add_run_record(in, sc, f, burden, benefit);
    return in;
}

}  // namespace tocsin
