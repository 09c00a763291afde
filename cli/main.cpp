// The command-line front end: parses arguments and wires the library
// together. Everything it does is reachable from the library and the tests.
#include <CLI/CLI.hpp>

#include <chrono>
#include <iostream>
#include <optional>
#include <sstream>
#include <thread>

#include "analysis/cautions.hpp"
#include "analysis/output.hpp"
#include "analysis/results.hpp"
#include "analysis/review_size.hpp"
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
    unsigned threads = 0;
};

unsigned thread_count(unsigned requested) {
    if (requested) return requested;
    return std::max(1u, std::thread::hardware_concurrency());
}

// The replayed chart-opening log, when the scenario replays one.
std::optional<ChartOpeningLog> replayed_openings(const Scenario& sc, const Population& pop) {
    if (!sc.chart_openings || sc.chart_openings->replay_path.empty()) return std::nullopt;
    return load_chart_openings(sc.chart_openings->replay_path, sc.chart_openings->roles, pop, sc.zone);
}

struct SizeOptions {
    std::string scenario;
    std::string plan;
    std::string sizes = "1-30";
    double target = 0.8;
    std::string out_dir;
};

int command_review_size(const SizeOptions& opt) {
    const Scenario sc = load_scenario(opt.scenario);
    std::size_t p = 0;
    while (p < sc.plans.size() && sc.plans[p].name != opt.plan) ++p;
    if (p == sc.plans.size()) throw std::invalid_argument("no plan named '" + opt.plan + "' in " + opt.scenario);
    if (sc.plans[p].channel != Channel::ranked_review)
        throw std::invalid_argument("plan '" + opt.plan + "' is a " + std::string(to_string(sc.plans[p].channel)) +
                                    " plan; list sizing needs a ranked_review plan");
    int from = 0, to = 0;
    char dash = 0, extra = 0;
    std::istringstream range(opt.sizes);
    if (!(range >> from)) throw std::invalid_argument("--sizes: expected N or FROM-TO, e.g. 1-30");
    to = from;
    if (range >> dash && (dash != '-' || !(range >> to) || (range >> extra)))
        throw std::invalid_argument("--sizes: expected N or FROM-TO, e.g. 1-30");
    const Population pop = load_replay(sc.replay, sc.zone);
    const ShiftCalendar cal = calendar_for(sc, pop);
    const ReviewSizing sizing = size_review_list(sc, pop, cal, p, from, to, opt.target);
    const Table table = review_size_table(sizing);
    std::cout << to_text(table, 3) << "\n" << review_size_answer(sizing) << "\n\n" << cautions_text() << "\n";
    if (!opt.out_dir.empty()) {
        std::vector<OutputFile> files;
        add_table_files(files, table);
        files.push_back({"CAUTIONS.txt", cautions_text() + "\n"});
        write_output_files(opt.out_dir, files);
        std::cout << "Wrote " << files.size() << " files to " << opt.out_dir << "\n";
    }
    return 0;
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
    if (const auto log = replayed_openings(sc, pop)) {
        std::cout << "Chart openings: " << log->openings.size() << " usable.\n";
        for (const auto& [reason, n] : log->excluded_by_reason) std::cout << "  excluded: " << n << " chart openings " << reason << "\n";
    }
    std::cout << "The scenario is valid.\n";
    return 0;
}

int command_run(const RunOptions& opt) {
    const Scenario sc = load_scenario(opt.scenario);
    const Population pop = load_replay(sc.replay, sc.zone);
    const ShiftCalendar cal = calendar_for(sc, pop);
    const auto openings = replayed_openings(sc, pop);
    const ChartOpeningLog* log = openings ? &*openings : nullptr;
    const ReplicationRecord record = simulate_replication(sc, pop, cal, 0, thread_count(opt.threads), log);
    const RunTables tables = run_tables(sc, pop, cal, record, opt.notice_log, log);
    std::cout << run_summary_text(sc, pop, tables, reporting_shifts(sc, pop, cal));
    if (!opt.out_dir.empty()) {
        std::vector<OutputFile> files;
        add_table_files(files, tables.plan_summary);
        add_table_files(files, tables.unit_shift_notices);
        add_table_files(files, tables.exclusions);
        add_table_files(files, tables.channel_burden);
        if (!tables.rounds.rows.empty()) add_table_files(files, tables.rounds);
        if (!tables.chart_interruptions.rows.empty()) add_table_files(files, tables.chart_interruptions);
        if (tables.notice_log) add_table_files(files, *tables.notice_log);
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
    run->add_option("-j,--threads", run_opt.threads, "Worker threads (default: all cores); results do not depend on it");

    SizeOptions size_opt;
    auto* size = app.add_subcommand("review-size", "How long should a ranked review list be? Catches and staff time for each list length");
    size->add_option("scenario", size_opt.scenario, "Scenario YAML file")->required();
    size->add_option("--plan", size_opt.plan, "A ranked_review plan of the scenario")->required();
    size->add_option("--sizes", size_opt.sizes, "List lengths to try, N or FROM-TO (default 1-30)");
    size->add_option("--target-catch-rate", size_opt.target, "Catch rate to reach (default 0.8)")->check(CLI::Range(0.0, 1.0));
    size->add_option("-o,--out", size_opt.out_dir, "Write the table as CSV and JSON to this directory");

    auto* keys = app.add_subcommand("keys", "Print the reference of every scenario key (Markdown)");

    try {
        app.parse(argc, argv);
    } catch (const CLI::ParseError& e) {
        return app.exit(e);
    }
    try {
        if (*check) return command_check(check_path);
        if (*run) return command_run(run_opt);
        if (*size) return command_review_size(size_opt);
        if (*keys) {
            std::cout << keys_reference_markdown();
            return 0;
        }
    } catch (const InputError& e) {
        std::cerr << "tocsin: error: " << e.what() << "\n";
        return 2;
    } catch (const std::invalid_argument& e) {
        std::cerr << "tocsin: error: " << e.what() << "\n";
        return 2;
    } catch (const std::exception& e) {
        std::cerr << "tocsin: error: " << e.what() << "\n";
        return 1;
    }
    return 0;
}
