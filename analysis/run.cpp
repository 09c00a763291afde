#include "analysis/run.hpp"

#include <cstdio>
#include <mutex>
#include <stdexcept>

#include "analysis/cautions.hpp"

namespace tocsin {

RunOutput run_scenario(const Scenario& sc, const PopulationFactory& make_population, const RunSettings& settings) {
    const Metric* burden = find_metric(settings.burden_metric);
    const Metric* benefit = find_metric(settings.benefit_metric);
    if (!burden || !benefit)
        throw std::runtime_error("unknown metric '" + (burden ? settings.benefit_metric : settings.burden_metric) +
                                 "' (expected one of " + metric_names() + ")");
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
                       const ReportingShifts rep = reporting_shifts(sc, pop, cal);
                       for (const PlanRecord& plan : rec.plans)
                           figures[r].push_back(plan_figures(sc, pop, cal, rep, plan));
                       if (r == 0 || settings.notice_log || settings.task_log) {
                           RunTables t = run_tables(sc, pop, cal, rec, settings.notice_log, settings.task_log,
                                                   settings.replayed_openings);
                           if (settings.notice_log) logs[r] = std::move(*t.notice_log);
                           if (t.task_log) {
                               // Tasks of every replication go in one log, like notices.
                               Table& log = *t.task_log;
                               log.columns.insert(log.columns.begin() + 1, "replication");
                               for (auto& row : log.rows) row.insert(row.begin() + 1, static_cast<std::int64_t>(r));
                               task_logs[r] = log;
                           }
                           if (r == 0) {
                               std::lock_guard<std::mutex> guard(first_lock);
                               out.first_replication = std::move(t);
                               out.first_population = pop;
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
    for (const Plan& p : sc.plans) names.push_back(p.name);
    out.figures = collect_figures(names, figures);
    out.comparison = comparison_tables(out.figures);
    out.frontier = frontier_table(out.figures, metric_index(*burden), metric_index(*benefit));

    const ShiftCalendar cal = calendar_for(sc, out.first_population);
    out.text = run_header_text(sc, out.first_population, out.first_replication,
                               reporting_shifts(sc, out.first_population, cal)) + "\n";
    if (sc.replications > 1) out.text += comparison_text(out.figures);
    else out.text += plan_summary_text(out.first_replication);
    if (sc.plans.size() > 2) out.text += "\n" + frontier_text(out.figures, metric_index(*burden), metric_index(*benefit));
    if (settings.budget_limit) {
        const Metric* limited = find_metric(settings.budget_metric);
        if (!limited) throw std::runtime_error("unknown metric '" + settings.budget_metric + "' (expected one of " + metric_names() + ")");
        out.budget = best_within_budget(out.figures, metric_index(*limited), *settings.budget_limit, metric_index(*benefit));
        out.text += "\n" + budget_text(out.figures, *out.budget, metric_index(*limited), *settings.budget_limit,
                                       metric_index(*benefit));
    }
    out.text += "\n" + cautions_text() + "\n";
    return out;
}

std::string run_record_json(const Scenario& sc, const RunSettings& settings, double seconds) {
    char hash[24];
    std::snprintf(hash, sizeof hash, "%016llx", static_cast<unsigned long long>(sc.source_hash));
    std::string plans;
    for (const Plan& p : sc.plans) plans += (plans.empty() ? "" : ", ") + json_escape(p.name);
    return std::string("{\n") + "  \"tool\": \"tocsin\",\n  \"version\": \"" + TOCSIN_VERSION + "\",\n" +
           "  \"scenario_file\": " + json_escape(sc.file) + ",\n  \"scenario_name\": " + json_escape(sc.name) +
           ",\n  \"scenario_fnv1a64\": \"" + hash + "\",\n  \"seed\": " + std::to_string(sc.seed) +
           ",\n  \"replications\": " + std::to_string(sc.replications) + ",\n  \"threads\": " +
           std::to_string(settings.threads) + ",\n  \"seconds\": " + format_real(seconds, 3) +
           ",\n  \"plans\": [" + plans + "]\n}\n";
}

std::vector<OutputFile> run_output_files(const RunOutput& out) {
    std::vector<OutputFile> files;
    add_table_files(files, out.first_replication.plan_summary);
    add_table_files(files, out.first_replication.unit_shift_notices);
    add_table_files(files, out.first_replication.exclusions);
    add_table_files(files, out.first_replication.channel_burden);
    if (!out.first_replication.rounds.rows.empty()) add_table_files(files, out.first_replication.rounds);
    if (!out.first_replication.chart_interruptions.rows.empty())
        add_table_files(files, out.first_replication.chart_interruptions);
    add_table_files(files, out.comparison.comparison);
    add_table_files(files, out.comparison.differences);
    add_table_files(files, out.comparison.replication_figures);
    add_table_files(files, out.frontier);
    if (out.first_replication.notice_log) add_table_files(files, *out.first_replication.notice_log);
    const RunTables& t = out.first_replication;
    for (const auto* staff : {&t.staff_workload, &t.staff_escalations, &t.task_fates, &t.task_log})
        if (*staff) add_table_files(files, **staff);
    files.push_back({"CAUTIONS.txt", cautions_text() + "\n"});
    return files;
}

}  // namespace tocsin
