#pragma once
// `tocsin evaluate SCENARIO`: model-evaluation measures on the population the
// scenario simulates (same encounters, same exclusions). Kept out of main.cpp
// so the front end stays a list of subcommands.
#include <CLI/CLI.hpp>
#include <cstdint>
#include <string>
#include <vector>

namespace tocsin {

struct EvaluateCommand {
    std::string scenario;
    std::string out_dir;
    std::vector<double> thresholds;
    int grid_points = 21;
    std::vector<double> horizons_hours{4.0, 8.0, 12.0, 24.0};
    double window_hours = -1.0;    // < 0: the scenario's window
    double min_lead_hours = -1.0;  // < 0: the scenario's min_lead
    std::string probability;       // "", "as-is", "divide:D", "logistic:A:B"
    double probability_horizon_hours = 0.0;
    std::vector<double> decision_thresholds;
    std::vector<double> evaluations_per_case;
    int period_days = 0;
    int bootstrap_replicates = 200;
    std::uint64_t replication = 0;
};

CLI::App* add_evaluate_command(CLI::App& app, EvaluateCommand& command);
int run_evaluate_command(const EvaluateCommand& command);

}  // namespace tocsin
