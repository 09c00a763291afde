#include "study/run.hpp"

#include <cstdio>
#include <mutex>
#include <stdexcept>

#include "analysis/cautions.hpp"
#include "study/evaluation_scenario.hpp"

namespace tocsin {

RunOutput run_scenario(const Scenario& sc, const PopulationFactory& make_population, const RunSettings& settings) {
    const Metric* burden = find_metric(settings.burden_metric);
    const Metric* benefit = find_metric(settings.benefit_metric);
    if (!burden || !benefit)
        throw std::runtime_error("unknown metric '" + (burden ? settings.benefit_metric : settings.burden_metric) +
                                 "' (expected one of " + metric_names() + ")");
    const Metric* limited = find_metric(settings.budget_metric);
    if (settings.budget_limit && !limited)
        throw std::runtime_error("unknown metric '" + settings.budget_metric + "' (expected one of " + metric_names() + ")");
    RunOutput out;
    std::vector<std::vector<PlanFigures>> figures(sc.replications);
    std::vector<Table> logs(sc.replications), task_logs(sc.replications);
    std::mutex first_lock;
    ExperimentOptions options;
    options.replications = sc.replications;
    options.threads = settings.threads;
    options.progress = settings.progress;
    options.replayed_openings = settings.replayed_openings;
    run_experiment(sc, make_population, options,
                   [&](std::uint64_t r, const Population& pop, const ShiftCalendar& cal, const ReplicationRecord& rec) {
                       const ReportingShifts rep = reporting_shifts(sc.analysis, pop, cal);
                       for (const PlanRecord& plan : rec.plans)
                           figures[r].push_back(plan_figures(sc.analysis, pop, cal, rep, plan));
                       if (r == 0 || settings.notice_log || settings.task_log) {
                           RunTables t = run_tables(sc.simulation, sc.analysis, pop, cal, rec, settings.notice_log, settings.task_log,
                                                   settings.replayed_openings);
                           if (settings.notice_log) logs[r] = std::move(*t.notice_log);
                           if (t.task_log) {
                               // Tasks of every replication go in one log, like notices.
                               Table& log = *t.task_log;
                               log.columns.insert(log.columns.begin() + 1, "replication");
                               const Cell replication{static_cast<std::int64_t>(r)};
                               for (auto& row : log.rows) row.insert(row.begin() + 1, replication);
                               task_logs[r] = std::move(log);
                           }
                           if (r == 0) {
                               // The score's own measures are computed here, beside the other
                               // replications, rather than after them all.
                               std::optional<Evaluation> evaluation;
                               if (settings.evaluate) evaluation = evaluate(pop, evaluation_options_for(sc));
                               std::string header = run_header_text(sc.name, sc.simulation.zone, pop, t, rep);
                               std::lock_guard<std::mutex> guard(first_lock);
                               out.first_replication = std::move(t);
                               out.first_header = std::move(header);
                               out.first_encounters = pop.encounters.size();
                               out.evaluation = std::move(evaluation);
                           }
                       }
                   });
    if (settings.notice_log) {
        Table all = std::move(logs[0]);
        for (std::uint64_t r = 1; r < sc.replications; ++r)
            for (auto& row : logs[r].rows) all.rows.push_back(std::move(row));
        out.first_replication.notice_log = std::move(all);
    }
    if (out.first_replication.task_log) {
        Table all = std::move(task_logs[0]);
        for (std::uint64_t r = 1; r < sc.replications; ++r)
            for (auto& row : task_logs[r].rows) all.rows.push_back(std::move(row));
        out.first_replication.task_log = std::move(all);
    }
    std::vector<std::string> names;
    for (const Plan& p : sc.simulation.plans) names.push_back(p.name);
    out.plan_net_benefit = plan_net_benefit_table(names, figures[0], out.first_encounters,
                                                  {2, 5, 10, 20, 50});
    out.figures = collect_figures(names, figures);
    out.comparison = comparison_tables(out.figures);
    out.frontier = frontier_table(out.figures, metric_index(*burden), metric_index(*benefit));

    out.text = out.first_header + "\n";
    if (sc.replications > 1) out.text += comparison_text(out.figures);
    else out.text += plan_summary_text(out.first_replication);
    if (out.evaluation) out.text += "\nThe score on the same population (replication 0):\n" + evaluation_summary(*out.evaluation);
    if (sc.simulation.plans.size() > 2) out.text += "\n" + frontier_text(out.figures, metric_index(*burden), metric_index(*benefit));
    if (settings.budget_limit) {
        out.budget = best_within_budget(out.figures, metric_index(*limited), *settings.budget_limit, metric_index(*benefit));
        out.text += "\n" + budget_text(out.figures, *out.budget, metric_index(*limited), *settings.budget_limit,
                                       metric_index(*benefit));
    }
    out.text += "\n" + cautions_text() + "\n";
    return out;
}

Table plan_net_benefit_table(const std::vector<std::string>& plans, const std::vector<PlanFigures>& figures,
                             std::size_t encounters, const std::vector<double>& evaluations_per_case) {
    Table t;
    t.name = "plan_net_benefit";
    t.title = "Net benefit of each plan (an evaluation as the intervention; replication 0)";
    t.columns = {"plan", "evaluations_per_case", "threshold_probability", "true_positives", "false_positives",
                 "encounters", "net_benefit", "net_benefit_treat_all"};
    const double n = static_cast<double>(encounters);
    for (std::size_t p = 0; p < plans.size(); ++p)
        for (double per_case : evaluations_per_case) {
            const double pt = 1.0 / per_case, odds = pt / (1.0 - pt);
            const PlanFigures& f = figures[p];
            const double tp = static_cast<double>(f.caught), fp = static_cast<double>(f.evaluated_non_cases);
            const double prevalence = static_cast<double>(f.cases) / n;
            t.add_row({plans[p], per_case, pt, f.caught, f.evaluated_non_cases, static_cast<std::int64_t>(encounters),
                       n > 0 ? Cell(tp / n - fp / n * odds) : Cell(),
                       n > 0 ? Cell(prevalence - (1.0 - prevalence) * odds) : Cell()});
        }
    return t;
}

}  // namespace tocsin
