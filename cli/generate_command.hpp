#pragma once
// `tocsin generate SCENARIO --out DIR`: one replication's population, as the
// scenario declares it, written as the replay CSVs (encounters.csv,
// scores.csv) and a scenario fragment that replays them. Kept out of main.cpp
// so the front end stays a list of subcommands.
#include <CLI/CLI.hpp>
#include <string>

namespace tocsin {

// Kept as written and read with their ranges before anything is loaded.
struct GenerateCommand {
    std::string scenario;
    std::string out_dir;  // required; checked by the command so the error reads like the others
    std::string replication = "0";
};

CLI::App* add_generate_command(CLI::App& app, GenerateCommand& command);
int run_generate_command(const GenerateCommand& command);

}  // namespace tocsin
