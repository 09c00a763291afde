// The command-line front end: parses arguments and wires the library
// together. Everything it does is reachable from the library and the tests.
#include <CLI/CLI.hpp>

#include <chrono>
#include <iostream>
#include <thread>

#include "analysis/cautions.hpp"
#include "analysis/output.hpp"
#include "analysis/results.hpp"
#include "models/errors.hpp"
#include "models/replay.hpp"
#include "sim/scenario.hpp"
#include "sim/scenario_keys.hpp"
#include "sim/simulate.hpp"

using namespace tocsin;

namespace {

struct RunOptions {
    std::string scenario;
    std::string out_dir;
    bool notice_log = false;
    bool task_log = false;
    unsigned threads = 0;
};

unsigned thread_count(unsigned requested) {
    if (requested) return requested;
    return std::max(1u, std::thread::hardware_concurrency());
}

int command_check(const std::string& path) {
    const Scenario sc = load_scenario(path);
    std::cout << describe_scenario(sc);
    const Population pop = load_replay(sc.replay, sc.zone);
    std::int64_t cases = 0;
    for (const Encounter& e : pop.encounters) cases += e.outcome_at.has_value();
    std::cout << "Input: " << pop.encounters.size() << " encounters on " << pop.units.size() << " units ("
              << cases << " with the outcome), " << pop.scores.size() << " usable scores, "
              << pop.excluded.total_scores() << " scores excluded.\n";
    for (const auto& [reason, n] : pop.excluded.scores_by_reason) std::cout << "  excluded: " << n << " scores " << reason << "\n";
    for (const auto& [reason, n] : pop.excluded.notes) std::cout << "  note: " << n << " " << reason << "\n";
    std::cout << "The scenario is valid.\n";
    return 0;
}

int command_run(const RunOptions& opt) {
    const Scenario sc = load_scenario(opt.scenario);
    const Population pop = load_replay(sc.replay, sc.zone);
    const ShiftCalendar cal = calendar_for(sc, pop);
    const ReplicationRecord record = simulate_replication(sc, pop, cal, 0, thread_count(opt.threads));
    const RunTables tables = run_tables(sc, pop, cal, record, opt.notice_log, opt.task_log);
    std::cout << run_summary_text(sc, pop, tables, reporting_shifts(sc, pop, cal));
    if (!opt.out_dir.empty()) {
        std::vector<OutputFile> files;
        add_table_files(files, tables.plan_summary);
        add_table_files(files, tables.unit_shift_notices);
        add_table_files(files, tables.exclusions);
        if (tables.notice_log) add_table_files(files, *tables.notice_log);
        for (const auto* staff : {&tables.staff_workload, &tables.staff_escalations, &tables.task_fates, &tables.task_log})
            if (*staff) add_table_files(files, **staff);
        files.push_back({"CAUTIONS.txt", cautions_text() + "\n"});
        write_output_files(opt.out_dir, files);
        std::cout << "Wrote " << files.size() << " files to " << opt.out_dir << "\n";
    }
    return 0;
}

}  // namespace

int main(int argc, char** argv) {
    CLI::App app{"tocsin: simulate clinical alert workflows and the staff work they cause.\n" + cautions_text()};
    app.set_version_flag("--version", std::string("tocsin ") + TOCSIN_VERSION);
    app.require_subcommand(1);

    std::string check_path;
    auto* check = app.add_subcommand("check", "Validate a scenario and its input files; print what will be simulated");
    check->add_option("scenario", check_path, "Scenario YAML file")->required();

    RunOptions run_opt;
    auto* run = app.add_subcommand("run", "Run every plan of a scenario and print the comparison");
    run->add_option("scenario", run_opt.scenario, "Scenario YAML file")->required();
    run->add_option("-o,--out", run_opt.out_dir, "Write tidy CSV and JSON tables to this directory");
    run->add_flag("--notice-log", run_opt.notice_log, "Also write every notice with its encounter id (patient-level)");
    run->add_flag("--task-log", run_opt.task_log, "Also write every staff task with its encounter id (patient-level)");
    run->add_option("-j,--threads", run_opt.threads, "Worker threads (default: all cores); results do not depend on it");

    auto* keys = app.add_subcommand("keys", "Print the reference of every scenario key (Markdown)");

    try {
        app.parse(argc, argv);
    } catch (const CLI::ParseError& e) {
        return app.exit(e);
    }
    try {
        if (*check) return command_check(check_path);
        if (*run) return command_run(run_opt);
        if (*keys) {
            std::cout << keys_reference_markdown();
            return 0;
        }
    } catch (const InputError& e) {
        std::cerr << "tocsin: error: " << e.what() << "\n";
        return 2;
    } catch (const std::exception& e) {
        std::cerr << "tocsin: error: " << e.what() << "\n";
        return 1;
    }
    return 0;
}
