// The command-line front end: parses arguments and wires the library
// together. Everything it does is reachable from the library and the tests.
#include <CLI/CLI.hpp>

#include <chrono>
#include <iostream>
#include <thread>

#include "analysis/cautions.hpp"
#include "analysis/output.hpp"
#include "analysis/results.hpp"
#include <fstream>

#include "models/errors.hpp"
#include "models/fit.hpp"
#include "models/replay.hpp"
#include "sim/population_source.hpp"
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
    std::uint64_t replication = 0;
};

struct FitCommand {
    std::string scenario;
    std::string out_path;
    std::string scale = "points";
    std::string stay = "lognormal";
    bool by_hour_of_day = false;
};

unsigned thread_count(unsigned requested) {
    if (requested) return requested;
    return std::max(1u, std::thread::hardware_concurrency());
}

int command_check(const std::string& path) {
    const Scenario sc = load_scenario(path);
    std::cout << describe_scenario(sc);
    const PreparedPopulation prepared = prepare_population(sc);
    std::cout << describe_prepared(sc, prepared);
    const Population pop = population_for(sc, prepared, 0);
    std::int64_t cases = 0;
    for (const Encounter& e : pop.encounters) cases += e.outcome_at.has_value();
    std::cout << "Input: " << pop.encounters.size() << " encounters on " << pop.units.size() << " units ("
              << cases << " with the outcome), " << pop.scores.size() << " usable scores, "
              << pop.excluded.total_scores() << " scores excluded.\n";
    for (const auto& [reason, n] : pop.excluded.scores_by_reason) std::cout << "  excluded: " << n << " scores " << reason << "\n";
    for (const auto& [reason, n] : pop.excluded.encounters_by_reason) std::cout << "  excluded: " << n << " encounters " << reason << "\n";
    for (const auto& [reason, n] : pop.excluded.notes) std::cout << "  note: " << n << " " << reason << "\n";
    std::cout << "The scenario is valid.\n";
    return 0;
}

int command_run(const RunOptions& opt) {
    const Scenario sc = load_scenario(opt.scenario);
    const PreparedPopulation prepared = prepare_population(sc);
    std::cout << describe_prepared(sc, prepared);
    const Population pop = population_for(sc, prepared, opt.replication);
    const ShiftCalendar cal = calendar_for(sc, pop);
    const ReplicationRecord record = simulate_replication(sc, pop, cal, opt.replication, thread_count(opt.threads));
    const RunTables tables = run_tables(sc, pop, cal, record, opt.notice_log);
    std::cout << run_summary_text(sc, pop, tables, reporting_shifts(sc, pop, cal));
    if (!opt.out_dir.empty()) {
        std::vector<OutputFile> files;
        add_table_files(files, tables.plan_summary);
        add_table_files(files, tables.unit_shift_notices);
        add_table_files(files, tables.exclusions);
        if (tables.notice_log) add_table_files(files, *tables.notice_log);
        files.push_back({"CAUTIONS.txt", cautions_text() + "\n"});
        write_output_files(opt.out_dir, files);
        std::cout << "Wrote " << files.size() << " files to " << opt.out_dir << "\n";
    }
    return 0;
}

// Estimate the generator's knobs from the scenario's replayed log and print
// (or write) them as an editable `population: generate:` fragment.
int command_fit(const FitCommand& cmd) {
    const Scenario sc = load_scenario(cmd.scenario);
    if (sc.source != PopulationSource::replay)
        throw InputError(sc.file, 0, 0, "population", "tocsin fit needs a scenario that replays a log (population: replay:)");
    FitOptions options;
    options.zone = sc.zone;
    options.scale = cmd.scale == "probability" ? ScoreScale::probability : ScoreScale::points;
    options.stay_distribution = cmd.stay == "gamma" ? StayDistribution::gamma : StayDistribution::lognormal;
    options.arrivals_by_hour_of_day = cmd.by_hour_of_day;
    const GeneratorFit fit = fit_generator(load_replay(sc.replay, sc.zone), options);
    const std::string fragment = scenario_fragment(fit.config, fit.notes);
    if (cmd.out_path.empty()) {
        std::cout << fragment;
    } else {
        std::ofstream out(cmd.out_path, std::ios::binary);
        if (!(out << fragment)) throw std::runtime_error("cannot write " + cmd.out_path);
        std::cout << "Fitted " << fit.encounters_admitted << " admissions (" << fit.cases << " cases) and " << fit.scores
                  << " scores; wrote " << cmd.out_path << "\n";
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

    run->add_option("-r,--replication", run_opt.replication,
                    "Replication index: 0 = the log as replayed (or the first generated population)");

    FitCommand fit_cmd;
    auto* fit = app.add_subcommand("fit", "Fit the population generator to the scenario's log; print a YAML fragment to edit");
    fit->add_option("scenario", fit_cmd.scenario, "Scenario YAML file that replays a log")->required();
    fit->add_option("-o,--out", fit_cmd.out_path, "Write the fragment to this file instead of the terminal");
    fit->add_option("--scale", fit_cmd.scale, "Score scale of the log")->check(CLI::IsMember({"points", "probability"}));
    fit->add_option("--stay", fit_cmd.stay, "Length-of-stay family")->check(CLI::IsMember({"lognormal", "gamma"}));
    fit->add_flag("--by-hour-of-day", fit_cmd.by_hour_of_day, "One arrival rate per hour of day, every day alike (steadier for short logs)");

    auto* keys = app.add_subcommand("keys", "Print the reference of every scenario key (Markdown)");

    try {
        app.parse(argc, argv);
    } catch (const CLI::ParseError& e) {
        return app.exit(e);
    }
    try {
        if (*check) return command_check(check_path);
        if (*run) return command_run(run_opt);
        if (*fit) return command_fit(fit_cmd);
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
