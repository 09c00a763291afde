#include "report/run_files.hpp"

#include <cstdio>

#include "analysis/cautions.hpp"

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
    add_table_files(files, out.plan_net_benefit);
    if (out.evaluation)
        for (const Table* table : evaluation_tables(*out.evaluation)) add_table_files(files, *table);
    if (out.first_replication.notice_log) add_table_files(files, *out.first_replication.notice_log);
    const RunTables& t = out.first_replication;
    for (const auto* staff : {&t.staff_workload, &t.staff_escalations, &t.task_fates, &t.task_log})
        if (*staff) add_table_files(files, **staff);
    files.push_back({"CAUTIONS.txt", cautions_text() + "\n"});
    return files;
}

}  // namespace tocsin
