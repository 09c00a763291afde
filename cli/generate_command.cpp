#include "cli/generate_command.hpp"

#include <cstdint>
#include <iostream>
#include <vector>

#include "models/errors.hpp"
#include "models/population_source.hpp"
#include "models/replay_writer.hpp"
#include "report/output.hpp"
#include "study/scenario.hpp"
#include "study/scenario_keys.hpp"

namespace tocsin {

namespace {

// The range a replay reader needs before it sees the scores: the scale the
// scenario declares, so the fragment reads like one a person would write.
std::pair<double, double> usual_score_range(const PopulationSetup& setup) {
    if (setup.source == PopulationSource::replay) return {setup.replay.score_low, setup.replay.score_high};
    if (setup.generator.scores.scale == ScoreScale::probability) return {0.0, 1.0};
    return {0.0, 100.0};
}

}  // namespace

CLI::App* add_generate_command(CLI::App& app, GenerateCommand& c) {
    auto* cmd = app.add_subcommand(
        "generate",
        "Write one replication's population (generated, resampled or stress-tested, as the scenario declares) "
        "as replay CSVs: encounters.csv and scores.csv, which hold encounter ids (invented by the generator, "
        "or the log's own for a replayed log), and replay.yaml to replay them");
    cmd->add_option("scenario", c.scenario, "Scenario YAML file")->required();
    cmd->add_option("-o,--out", c.out_dir, "Directory to write the files to (required; all files or none)");
    cmd->add_option("--replication", c.replication,
                    "Which replication's population (default 0; a plain replay has only 0, the log itself)");
    return cmd;
}

int run_generate_command(const GenerateCommand& c) {
    // A replication index is below the largest replication count a scenario may ask for.
    KeySpec replication_index = key_spec("top level", "replications");
    replication_index.range = {0, *replication_index.range.max - 1};
    const auto replication = static_cast<std::uint64_t>(option_integer(replication_index, "--replication", c.replication));
    if (c.out_dir.empty())
        throw InputError("command line", 0, 0, "--out", "required: the directory to write encounters.csv and scores.csv to");
    check_output_directory(c.out_dir);
    const Scenario sc = load_scenario(c.scenario);
    // Replication N exists when the scenario could run N + 1 replications.
    if (std::string problem = replications_problem(sc, replication + 1); !problem.empty())
        throw InputError("command line", 0, 0, "--replication",
                         "no replication " + std::to_string(replication) + " in " + c.scenario + ": " + problem);

    const PreparedPopulation prepared = prepare_population(sc.population);
    std::cout << describe_prepared(sc.population, prepared);
    const Population pop = population_for(sc.population, prepared, replication);
    const ReplayText text = replay_csv(pop, sc.simulation.zone);
    const auto [low, high] = usual_score_range(sc.population);
    const ReplaySource settings = replay_settings_for(pop, low, high, "encounters.csv", "scores.csv");
    ReplayFragmentInfo info;
    info.origin = c.scenario + ", replication " + std::to_string(replication);
    info.time_zone = sc.time_zone_name;
    info.report_from = sc.analysis.period_start.value_or(pop.period_start);
    info.report_until = sc.analysis.period_end.value_or(pop.period_end);
    const std::vector<OutputFile> files = {{"encounters.csv", text.encounters},
                                           {"scores.csv", text.scores},
                                           {"replay.yaml", replay_scenario_fragment(settings, info, sc.simulation.zone)}};
    write_output_files(c.out_dir, files);

    std::int64_t cases = 0;
    for (const Encounter& e : pop.encounters) cases += e.outcome_at.has_value();
    std::cout << "Wrote replication " << replication << ": " << pop.encounters.size() << " encounters on "
              << pop.units.size() << " units (" << cases << " with the outcome) and " << pop.scores.size()
              << " usable scores to " << c.out_dir << " (encounters.csv, scores.csv; replay.yaml replays them).\n"
              << "The files hold encounter ids"
              << (sc.population.source == PopulationSource::replay ? " from the log (patient-level identifiers)"
                                                                   : " (invented by the generator)")
              << ".\n";
    // Counts are not rows, so a replay of the files cannot report them: say them here.
    const Exclusions& x = pop.excluded;
    if (x.total_scores() || !x.encounters_by_reason.empty() || !x.notes.empty())
        std::cout << "Counted by the source and not in the files (a replay of them will not report these):\n";
    for (const auto& [reason, n] : x.scores_by_reason) std::cout << "  " << n << " scores " << reason << "\n";
    for (const auto& [reason, n] : x.encounters_by_reason) std::cout << "  " << n << " encounters " << reason << "\n";
    for (const auto& [reason, n] : x.notes) std::cout << "  " << n << " " << reason << "\n";
    return 0;
}

}  // namespace tocsin
