#pragma once
// `tocsin evaluate SCENARIO`: model-evaluation measures on the population the
// scenario simulates (same encounters, same exclusions). Kept out of main.cpp
// so the front end stays a list of subcommands.
#include <CLI/CLI.hpp>
#include <cstdint>
#include <string>
#include <vector>

namespace tocsin {

// Numeric options are kept as written and read with their ranges
// (cli/option_specs.hpp) before anything is loaded.
struct EvaluateCommand {
    std::string scenario;
    std::string out_dir;
    std::vector<std::string> thresholds;
    std::string grid_points = "21";
    std::vector<std::string> horizons_hours{"4", "8", "12", "24"};
    std::string window_hours;    // empty: the scenario's window
    std::string min_lead_hours;  // empty: the scenario's min_lead
    std::string probability;     // "", "as-is", "divide:D", "logistic:A:B"
    std::string probability_horizon_hours = "0";
    std::vector<std::string> decision_thresholds;
    std::vector<std::string> evaluations_per_case;
    std::string period_days = "0";
    std::string bootstrap_replicates = "200";
    std::string replication = "0";
    std::string threads = "0";  // 0 = all cores
};

CLI::App* add_evaluate_command(CLI::App& app, EvaluateCommand& command);
int run_evaluate_command(const EvaluateCommand& command);

}  // namespace tocsin
