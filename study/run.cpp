#include "study/run.hpp"

#include <cstdio>
#include <mutex>
#include <stdexcept>

#include "study/evaluation_scenario.hpp"

namespace tocsin {

namespace {

const Metric& metric_named(const std::string& name) {
    const Metric* m = find_metric(name);
    if (!m) throw std::runtime_error("unknown metric '" + name + "' (expected one of " + metric_names() + ")");
    return *m;
}

// Appends the logs of replications 1, 2, ... to replication 0's, in replication order.
template <typename Entry>
void join_logs(std::optional<std::vector<Entry>>& first, std::vector<std::vector<Entry>>& others) {
    if (!first) return;
    for (std::size_t r = 1; r < others.size(); ++r)
        for (Entry& e : others[r]) first->push_back(std::move(e));
}

}  // namespace

PlansFigures replication_figures(const Scenario& sc, const Population& pop, const ShiftCalendar& cal,
                                 const ReplicationRecord& rec) {
    PlansFigures out;
    const ReportingShifts rep = reporting_shifts(sc.analysis, pop, cal);
    for (std::size_t p = 0; p < rec.plans.size(); ++p) {
        out.figures.push_back(plan_figures(sc.analysis, pop, cal, rep, rec.plans[p]));
        add_plan_burdens(out.figures.back(), sc.simulation, pop, cal, rep, sc.simulation.plans[p], rec.plans[p]);
    }
    out.unit_figures = unit_figures(sc.simulation, sc.analysis, pop, cal, rep, rec, out.figures);
    out.group_figures = group_figures(sc.simulation, sc.analysis, pop, rec);
    return out;
}

ReplicationsKept::ReplicationsKept(std::uint64_t replications)
    : figures(replications),
      unit_figures(replications),
      group_figures(replications),
      notice_logs(replications),
      task_logs(replications) {}

void keep_replication(const Scenario& sc, const RunSettings& settings, std::uint64_t r, const Population& pop,
                      const ShiftCalendar& cal, const ReplicationRecord& rec, ReplicationsKept& kept, RunOutput& out) {
    const auto span = phase(settings.phases, "evaluate");
    PlansFigures figures = replication_figures(sc, pop, cal, rec);
    kept.figures[r] = std::move(figures.figures);
    kept.unit_figures[r] = std::move(figures.unit_figures);
    kept.group_figures[r] = std::move(figures.group_figures);
    if (r == 0)  // read after every replication ends
        for (std::size_t k = 0; k < pop.score_count(); ++k) kept.first_scores.push_back(observed_scores(pop, k));
    if (r != 0 && !settings.notice_log && !settings.task_log) return;
    // The figures just computed, not computed again.
    ReplicationResults results =
        replication_results(sc.simulation, sc.analysis, pop, cal, rec,
                            KnownFigures{kept.figures[r], kept.unit_figures[r], kept.group_figures[r]},
                            settings.notice_log, settings.task_log, settings.replayed_openings);
    if (r != 0) {
        if (results.notice_log) kept.notice_logs[r] = std::move(*results.notice_log);
        if (results.staff && results.staff->task_log) kept.task_logs[r] = std::move(*results.staff->task_log);
        return;
    }
    // The score's own measures are computed here, beside the other
    // replications, rather than after them all.
    std::optional<Evaluation> evaluation;
    EvaluationOptions measures = evaluation_options_for(sc);
    measures.threads = settings.threads;
    std::vector<Evaluation> other_evaluations;
    if (settings.evaluate) {
        evaluation = evaluate(pop, measures);
        other_evaluations = other_score_evaluations(pop, measures, other_score_probabilities(sc));
    }
    ScoreComparison comparison =
        compare_scores(pop, sc.simulation.plans, ScoreComparisonOptions{.seed = sc.simulation.seed});
    std::vector<GroupScoreFigures> group_scores = group_score_figures(
        pop, plan_thresholds(sc.simulation), measures.probability, sc.analysis.smallest_group, measures.confidence);
    std::lock_guard<std::mutex> guard(kept.first_lock);
    out.first_replication = std::move(results);
    out.evaluation = std::move(evaluation);
    out.other_evaluations = std::move(other_evaluations);
    out.score_comparison = std::move(comparison);
    out.group_scores = std::move(group_scores);
}

void check_run_metrics(const RunSettings& settings) {
    metric_named(settings.burden_metric);  // report/ draws the frontier on it
    metric_named(settings.benefit_metric);
    if (settings.budget_limit) metric_named(settings.budget_metric);
}

void finish_run(const Scenario& sc, const RunSettings& settings, ReplicationsKept& kept, RunOutput& out) {
    join_logs(out.first_replication.notice_log, kept.notice_logs);
    if (out.first_replication.staff) join_logs(out.first_replication.staff->task_log, kept.task_logs);
    std::vector<std::string> names;
    for (const Plan& p : sc.simulation.plans) names.push_back(p.name);
    out.plan_net_benefit = plan_net_benefit(names, kept.figures[0], out.first_replication.population.encounters,
                                            {2, 5, 10, 20, 50});
    out.warnings = plan_warnings(sc.simulation.plans, kept.first_scores, kept.figures[0]);
    std::vector<Channel> channels;
    for (const Plan& p : sc.simulation.plans) channels.push_back(p.channel);
    out.figures = collect_figures(names, kept.figures, channels);
    out.figures.first_is_log = replication_zero_is_the_log(sc.population);
    out.unit_figures = collect_unit_figures(names, kept.unit_figures);
    out.group_figures = collect_group_figures(names, kept.group_figures);
    if (!sc.other_scores.empty()) {
        std::vector<std::string> score_names{sc.score_name};
        for (const ScoreLabel& s : sc.other_scores) score_names.push_back(s.name);
        out.matched_plans = matched_plans(out.figures, sc.simulation.plans, score_names,
                                          metric_index(metric_named(settings.burden_metric)),
                                          metric_index(metric_named(settings.benefit_metric)));
    }
    if (settings.budget_limit)
        out.budget = budget_by_group(out.figures, metric_index(metric_named(settings.budget_metric)),
                                     *settings.budget_limit, metric_index(metric_named(settings.benefit_metric)));
}

ExperimentOptions experiment_options(const Scenario& sc, const RunSettings& settings) {
    ExperimentOptions options;
    options.replications = sc.replications;
    options.threads = settings.threads;
    options.progress = settings.progress;
    options.replayed_openings = settings.replayed_openings;
    options.phases = settings.phases;
    return options;
}

RunOutput run_scenario(const Scenario& sc, const PopulationFactory& make_population, const RunSettings& settings) {
    check_run_metrics(settings);  // before anything runs
    RunOutput out;
    ReplicationsKept kept(sc.replications);
    run_experiment(sc, make_population, experiment_options(sc, settings),
                   [&](std::uint64_t r, const Population& pop, const ShiftCalendar& cal, const ReplicationRecord& rec) {
                       keep_replication(sc, settings, r, pop, cal, rec, kept, out);
                   });
    const auto span = phase(settings.phases, "evaluate");
    finish_run(sc, settings, kept, out);
    return out;
}

std::optional<std::string> reporting_period_warning(const Scenario& sc, const PreparedPopulation& prepared) {
    if (!prepared.log || !prepared.bootstrap_days || !sc.population.bootstrap) return std::nullopt;
    const Population& log = *prepared.log;
    const auto [from, until] = eligible_period(*prepared.bootstrap_days, log, *sc.population.bootstrap);
    const Instant start = sc.analysis.period_start.value_or(log.period_start);
    const Instant end = sc.analysis.period_end.value_or(log.period_end);
    if (start >= from && end <= until) return std::nullopt;
    const TimeZone& zone = sc.simulation.zone;
    return "Warning: the reporting period (" + format_local(start, zone) + " to " + format_local(end, zone) +
           ") reaches outside the days the bootstrap draws from (" + format_local(from, zone) + " to " +
           format_local(until, zone) + "): the log's own figures (as logged) include days whose census was still "
           "filling or emptying and the resampled replications do not, so they differ for that reason alone. "
           "Set reporting.from and reporting.until inside those days to compare like with like.";
}

}  // namespace tocsin
