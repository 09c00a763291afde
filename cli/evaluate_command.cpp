#include "cli/evaluate_command.hpp"

#include <iostream>
#include <optional>
#include <sstream>

#include "report/cautions.hpp"
#include "analysis/evaluation.hpp"
#include "study/evaluation_scenario.hpp"
#include "report/evaluation_tables.hpp"
#include "report/score_comparison_tables.hpp"
#include "report/output.hpp"
#include "cli/option_specs.hpp"
#include "models/errors.hpp"
#include "models/population_source.hpp"
#include "study/scenario.hpp"

namespace tocsin {

namespace {

// "as-is", "divide:100" or "logistic:INTERCEPT:SLOPE".
// The whole text must be a number ("100abc" is not 100).
double whole_number(const std::string& text) {
    std::size_t used = 0;
    const double v = std::stod(text, &used);
    if (used != text.size()) throw std::invalid_argument("trailing text");
    return v;
}

ProbabilityMapping parse_mapping(const std::string& text) {
    ProbabilityMapping m;
    std::vector<std::string> parts;
    std::stringstream in(text);
    for (std::string part; std::getline(in, part, ':');) parts.push_back(part);
    try {
        if (parts.size() == 1 && parts[0] == "as-is") {
            m.kind = ProbabilityMapping::Kind::as_is;
        } else if (parts.size() == 2 && parts[0] == "divide") {
            m.kind = ProbabilityMapping::Kind::divide;
            m.divisor = whole_number(parts[1]);
        } else if (parts.size() == 3 && parts[0] == "logistic") {
            m.kind = ProbabilityMapping::Kind::logistic;
            m.intercept = whole_number(parts[1]);
            m.slope = whole_number(parts[2]);
        } else {
            throw std::invalid_argument("form");
        }
    } catch (const std::logic_error&) {  // invalid_argument or out_of_range from stod
        throw InputError("command line", 0, 0, "--probability",
                         "expected as-is, divide:DIVISOR or logistic:INTERCEPT:SLOPE, got '" + text + "'");
    }
    return m;
}

}  // namespace

CLI::App* add_evaluate_command(CLI::App& app, EvaluateCommand& c) {
    auto* cmd = app.add_subcommand("evaluate", "Is the score any good here? Discrimination, thresholds, lead time, "
                                               "calibration, drift and net benefit on the scenario's population");
    cmd->add_option("scenario", c.scenario, "Scenario YAML file")->required();
    cmd->add_option("-o,--out", c.out_dir, "Write tidy CSV and JSON tables to this directory");
    cmd->add_option("--threshold", c.thresholds, "Score threshold to report (repeatable; a grid is always added)");
    cmd->add_option("--grid-points", c.grid_points, "Thresholds on the grid from lowest to highest encounter score (default 21)");
    cmd->add_option("--horizon", c.horizons_hours, "Prediction horizon in hours (repeatable; default 4 8 12 24)");
    cmd->add_option("--window-hours", c.window_hours, "Lead time: ignore crossings earlier than this before time zero (default: the scenario's window)");
    cmd->add_option("--min-lead-hours", c.min_lead_hours, "Lead time: a first crossing later than this is 'late' (default: the scenario's min_lead)");
    cmd->add_option("--probability", c.probability,
                    "The score as a probability: as-is, divide:DIVISOR or logistic:INTERCEPT:SLOPE (enables calibration and the decision curve)");
    cmd->add_option("--probability-horizon-hours", c.probability_horizon_hours,
                    "What the probability predicts: the outcome within this many hours (default 0: before discharge)");
    cmd->add_option("--decision-threshold", c.decision_thresholds, "Threshold probability for the decision curve (repeatable; default 0.01 to 0.50)");
    cmd->add_option("--evaluate-per-case", c.evaluations_per_case, "Add pt = 1/N to the decision curve: N evaluations one accepts per case found (repeatable)");
    cmd->add_option("--period-days", c.period_days, "Drift periods of this many days (default: calendar months in the scenario's time zone)");
    cmd->add_option("--bootstrap", c.bootstrap_replicates, "Encounter-bootstrap replicates for prediction-level intervals (default 200; 0 = none)");
    cmd->add_option("--replication", c.replication, "Which replication's population to evaluate (default 0: the log as replayed)");
    cmd->add_option("-j,--threads", c.threads, "Worker threads for the bootstrap (default: all cores); results do not depend on it");
    return cmd;
}

int run_evaluate_command(const EvaluateCommand& c) {
    // Every option is read before the scenario, so a bad one costs nothing.
    const OptionSpecs& spec = option_specs();
    std::vector<double> thresholds, horizons;
    for (const std::string& t : c.thresholds) thresholds.push_back(option_real(spec.threshold, "--threshold", t));
    for (const std::string& h : c.horizons_hours) horizons.push_back(option_real(spec.horizon, "--horizon", h));
    const auto grid_points = static_cast<int>(option_integer(spec.grid_points, "--grid-points", c.grid_points));
    std::optional<double> window_hours, min_lead_hours;
    if (!c.window_hours.empty())
        window_hours = option_real(key_spec("outcome", "window_hours"), "--window-hours", c.window_hours);
    if (!c.min_lead_hours.empty()) {
        // The key is in minutes, the option in hours: the same range, rescaled.
        KeySpec in_hours = key_spec("outcome", "min_lead_minutes");
        in_hours.range = {*in_hours.range.min / 60, *in_hours.range.max / 60};
        in_hours.unit = "hours";
        min_lead_hours = option_real(in_hours, "--min-lead-hours", c.min_lead_hours);
    }
    const double probability_horizon =
        option_real(spec.probability_horizon, "--probability-horizon-hours", c.probability_horizon_hours);
    const auto period_days = static_cast<int>(option_integer(spec.period_days, "--period-days", c.period_days));
    const auto bootstrap = static_cast<int>(option_integer(spec.bootstrap, "--bootstrap", c.bootstrap_replicates));
    // A replication index is below the largest replication count a scenario may ask for.
    KeySpec replication_index = key_spec("top level", "replications");
    replication_index.range = {0, *replication_index.range.max - 1};
    const auto replication = static_cast<std::uint64_t>(option_integer(replication_index, "--replication", c.replication));
    const unsigned threads = thread_count(c.threads);
    std::vector<double> decision_thresholds, evaluations_per_case;
    for (const std::string& t : c.decision_thresholds)
        decision_thresholds.push_back(option_real(spec.decision_threshold, "--decision-threshold", t));
    for (const std::string& n : c.evaluations_per_case)
        evaluations_per_case.push_back(option_real(spec.evaluations_per_case, "--evaluate-per-case", n));
    std::optional<ProbabilityMapping> mapping;
    if (!c.probability.empty()) mapping = parse_mapping(c.probability);

    if (!c.out_dir.empty()) check_output_directory(c.out_dir);
    const Scenario sc = load_scenario(c.scenario);
    const PreparedPopulation prepared = prepare_population(sc.population);
    const Population pop = population_for(sc.population, prepared, replication);

    EvaluationOptions o = evaluation_options_for(sc);
    o.thresholds = thresholds;
    o.threshold_grid_points = grid_points;
    o.horizons_hours = horizons;
    if (window_hours) o.window_hours = *window_hours;
    if (min_lead_hours) o.min_lead_hours = *min_lead_hours;
    if (mapping) o.probability = mapping;
    if (o.probability) o.probability->horizon_hours = probability_horizon;
    o.decision_threshold_probabilities = decision_thresholds;
    o.evaluations_per_case = evaluations_per_case;
    o.drift_period_days = period_days;
    o.bootstrap_replicates = bootstrap;
    o.replication = replication;
    o.threads = threads;

    const Evaluation ev = evaluate(pop, o);
    const std::vector<Evaluation> others = other_score_evaluations(pop, o, other_score_probabilities(sc));
    const ScoreComparison comparison =
        compare_scores(pop, sc.simulation.plans, ScoreComparisonOptions{.seed = sc.simulation.seed});
    std::cout << evaluation_summary(ev) << "\n" << to_text(encounter_auc_table(ev.encounter_auc), 3) << "\n"
              << to_text(prediction_auc_table(ev.prediction_auc), 3);
    std::cout << other_score_summaries(others, comparison);
    if (!comparison.auc.empty()) std::cout << "\n" << score_comparison_text(comparison);
    std::cout << "\n" << cautions_text() << "\n";
    if (!c.out_dir.empty()) {
        std::vector<OutputFile> files;
        for (const Table& t : evaluation_tables(ev)) add_table_files(files, t);
        for (std::size_t k = 0; k < others.size(); ++k)
            for (const Table& t : other_score_evaluation_tables(others[k], k + 1, comparison.auc.at(k).other))
                add_table_files(files, t);
        if (!comparison.auc.empty()) {
            add_table_files(files, score_comparison_auc_table(comparison));
            add_table_files(files, score_comparison_thresholds_table(comparison));
        }
        files.push_back({"CAUTIONS.txt", cautions_text() + "\n"});
        write_output_files(c.out_dir, files);
        std::cout << "Wrote " << files.size() << " files to " << c.out_dir << "\n";
    }
    return 0;
}

}  // namespace tocsin
