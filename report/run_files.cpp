#include "report/run_files.hpp"

#include <cstdio>

#include "report/basis.hpp"
#include "report/cautions.hpp"
#include "report/averted_tables.hpp"
#include "report/comparison_tables.hpp"
#include "report/evaluation_tables.hpp"
#include "report/score_comparison_tables.hpp"
#include "report/group_tables.hpp"
#include "report/run_tables.hpp"
#include "report/unit_tables.hpp"

namespace tocsin {

std::string run_record_json(const Scenario& sc, const RunSettings& settings, double seconds) {
    char hash[24];
    std::snprintf(hash, sizeof hash, "%016llx", static_cast<unsigned long long>(sc.source_hash));
    std::string plans;
    for (const Plan& p : sc.simulation.plans) plans += (plans.empty() ? "" : ", ") + json_escape(p.name);
    return std::string("{\n") + "  \"tool\": \"tocsin\",\n  \"version\": \"" + TOCSIN_VERSION + "\",\n" +
           "  \"scenario_file\": " + json_escape(sc.file) + ",\n  \"scenario_name\": " + json_escape(sc.name) +
           ",\n  \"scenario_fnv1a64\": \"" + hash + "\",\n  \"seed\": " + std::to_string(sc.simulation.seed) +
           ",\n  \"replications\": " + std::to_string(sc.replications) + ",\n  \"threads\": " +
           std::to_string(settings.threads) + ",\n  \"seconds\": " + format_real(seconds, 3) +
           ",\n  \"plans\": [" + plans + "]\n}\n";
}

std::vector<OutputFile> run_output_files(const Scenario& sc, const RunOutput& out, const RunSettings& settings,
                                         std::vector<Table> more) {
    const TableBases basis = table_bases(sc.population, out.first_replication.population, out.figures.replications,
                                         sc.simulation.zone);
    std::vector<Table> tables;
    auto add = [&](Table table, const std::string& on) {
        table.basis = on;
        tables.push_back(std::move(table));
    };
    RunTables t = run_tables(out.first_replication, sc.simulation.zone);
    add(std::move(t.plan_summary), basis.first);
    add(std::move(t.plan_unit_summary), basis.first);
    add(std::move(t.unit_shift_notices), basis.first_shifts);
    add(std::move(t.exclusions), basis.input);
    add(std::move(t.channel_burden), basis.first);
    if (!t.rounds.rows.empty()) add(std::move(t.rounds), basis.first);
    if (!t.chart_interruptions.rows.empty()) add(std::move(t.chart_interruptions), basis.first_shifts);
    if (t.acceptance_by_load) add(std::move(*t.acceptance_by_load), basis.first_shifts);
    ComparisonTables comparison = comparison_tables(out.figures);
    add(std::move(comparison.comparison), basis.replications);
    add(std::move(comparison.differences), basis.replications);
    add(std::move(comparison.replication_figures), basis.replications);
    add(plan_unit_comparison_table(out.unit_figures), basis.replications);
    if (auto averted = outcomes_averted_table(out.figures)) add(std::move(*averted), basis.replications);
    if (!out.first_replication.groups.empty()) {
        add(plan_group_summary_table(out.first_replication.groups, out.first_replication.replication), basis.first);
        add(plan_group_comparison_table(out.group_figures), basis.replications);
        if (out.group_figures.replications > 1) add(plan_group_differences_table(out.group_figures), basis.replications);
        add(group_score_table(out.group_scores), basis.first_scores);
        add(group_threshold_table(out.group_scores), basis.first_scores);
    }
    add(frontier_table(out.figures, metric_index(*find_metric(settings.burden_metric)),
                       metric_index(*find_metric(settings.benefit_metric))),
        basis.replications);
    add(channel_units_table(out.figures, out.first_replication.channels.burden), basis.replications);
    add(plan_net_benefit_table(out.plan_net_benefit), basis.first);
    if (out.evaluation)
        for (Table& table : evaluation_tables(*out.evaluation)) add(std::move(table), basis.first_scores);
    for (std::size_t k = 0; k < out.other_evaluations.size(); ++k)
        for (Table& table : other_score_evaluation_tables(out.other_evaluations[k], k + 1,
                                                          out.score_comparison.auc.at(k).other))
            add(std::move(table), basis.first_scores);
    if (!out.score_comparison.auc.empty()) {
        add(score_comparison_auc_table(out.score_comparison), basis.first_scores);
        add(score_comparison_thresholds_table(out.score_comparison), basis.first_scores);
        add(matched_plans_table(out.matched_plans), basis.replications);
    }
    if (t.notice_log) add(std::move(*t.notice_log), basis.every);
    for (auto* staff : {&t.staff_workload, &t.staff_escalations, &t.task_fates})
        if (*staff) add(std::move(**staff), basis.first);
    if (t.task_log) add(std::move(*t.task_log), basis.every);
    for (Table& table : more) tables.push_back(std::move(table));

    std::vector<OutputFile> files;
    for (const Table& table : tables) add_table_files(files, table);
    files.push_back({"tables.csv", to_csv(table_index(tables))});
    files.push_back({"CAUTIONS.txt", cautions_text() + "\n"});
    return files;
}

}  // namespace tocsin
