#include "report/run_files.hpp"

#include <cstdio>

#include "report/cautions.hpp"
#include "report/comparison_tables.hpp"
#include "report/evaluation_tables.hpp"
#include "report/run_tables.hpp"

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

std::vector<OutputFile> run_output_files(const Scenario& sc, const RunOutput& out, const RunSettings& settings) {
    std::vector<OutputFile> files;
    const RunTables t = run_tables(out.first_replication, sc.simulation.zone);
    add_table_files(files, t.plan_summary);
    add_table_files(files, t.unit_shift_notices);
    add_table_files(files, t.exclusions);
    add_table_files(files, t.channel_burden);
    if (!t.rounds.rows.empty()) add_table_files(files, t.rounds);
    if (!t.chart_interruptions.rows.empty()) add_table_files(files, t.chart_interruptions);
    const ComparisonTables comparison = comparison_tables(out.figures);
    add_table_files(files, comparison.comparison);
    add_table_files(files, comparison.differences);
    add_table_files(files, comparison.replication_figures);
    add_table_files(files, frontier_table(out.figures, metric_index(*find_metric(settings.burden_metric)),
                                          metric_index(*find_metric(settings.benefit_metric))));
    add_table_files(files, channel_units_table(out.figures, out.first_replication.channels.burden));
    add_table_files(files, plan_net_benefit_table(out.plan_net_benefit));
    if (out.evaluation)
        for (const Table& table : evaluation_tables(*out.evaluation)) add_table_files(files, table);
    if (t.notice_log) add_table_files(files, *t.notice_log);
    for (const auto* staff : {&t.staff_workload, &t.staff_escalations, &t.task_fates, &t.task_log})
        if (*staff) add_table_files(files, **staff);
    files.push_back({"CAUTIONS.txt", cautions_text() + "\n"});
    return files;
}

}  // namespace tocsin
