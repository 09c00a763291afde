// The command-line front end: parses arguments and wires the library
// together. Everything it does is reachable from the library and the tests.
#include <CLI/CLI.hpp>

#include <cctype>
#include <chrono>
#include <filesystem>
#include <fstream>
#include <functional>
#include <optional>
#include <iostream>
#include <memory>
#include <cstdio>
#include <cstdlib>
#include <optional>
#include <sstream>
#include <thread>

#include <unistd.h>

#include "report/cautions.hpp"
#include "analysis/comparison.hpp"
#include "report/output.hpp"
#include "report/report.hpp"
#include "report/report_evaluation.hpp"
#include "report/report_run.hpp"
#include "report/run_files.hpp"
#include "report/run_text.hpp"
#include "report/study_answers.hpp"
#include "report/whatif_run.hpp"
#include "study/shift_effect.hpp"
#include "cli/evaluate_command.hpp"
#include "cli/generate_command.hpp"
#include "cli/option_specs.hpp"
#include "report/terminal_progress.hpp"
#include "report/progress_text.hpp"
#include "models/population_source.hpp"
#include "study/review_size.hpp"
#include "models/errors.hpp"
#include "models/fit.hpp"
#include "report/fit_check_text.hpp"
#include "study/fit_check.hpp"
#include "models/replay.hpp"
#include "study/scenario.hpp"
#include "study/scenario_keys.hpp"
#include "sim/simulate.hpp"
#include "study/sweep.hpp"
#include "study/work_items.hpp"
#ifdef TOCSIN_MPI
#include "cli/mpi_ranks.hpp"
#else
namespace tocsin {
class MpiRanks {};  // a build without MPI runs in one process
}  // namespace tocsin
#endif

using namespace tocsin;

namespace {

struct RunOptions {
    std::string scenario;
    std::string out_dir;
    bool notice_log = false;
    bool task_log = false;
    std::string threads = "0";  // 0 = all cores
    // As written; read against their ranges (the `replications` key's, and
    // cli/option_specs.hpp) before anything runs. Empty = not given.
    std::string replications;
    std::string max_burden;
    std::string budget_metric = "worst_unit_night_p90";
    std::string burden_metric = "per_unit_night_mean";
    std::string benefit_metric = "caught";
    std::string report_path;
    // sweep only
    std::string sweep_plan;
    std::vector<std::string> vary;
    bool keep_plans = false;
    bool phases = false;  // print each phase's time and memory on stderr at the end
};

struct FitCommand {
    std::string scenario;
    std::string out_path;
    std::string scale;  // empty: the scale the scores show
    std::string stay = "lognormal";
    bool by_hour_of_day = false;
    bool check = false;
    std::uint64_t check_replications = 40;
};

void add_run_options(CLI::App* cmd, RunOptions& o) {
    cmd->add_option("scenario", o.scenario, "Scenario YAML file")->required();
    cmd->add_option("-o,--out", o.out_dir, "Write tidy CSV and JSON tables, report.html and the what-if page whatif.html to this directory");
    cmd->add_option("--report", o.report_path, "Also write the self-contained HTML report to this file");
    cmd->add_flag("--notice-log", o.notice_log, "Also write every notice with its encounter id (patient-level)");
    cmd->add_flag("--task-log", o.task_log, "Also write every staff task with its encounter id (patient-level)");
    cmd->add_option("-j,--threads", o.threads, "Worker threads (default: all cores); results do not depend on it");
    cmd->add_option("-r,--replications", o.replications, "Replications (default: the scenario's `replications`)");
    cmd->add_option("--max-burden", o.max_burden, "Budget question: best plan whose mean --budget-metric is at most this");
    cmd->add_option("--budget-metric", o.budget_metric,
                    "Burden the budget limits (default worst_unit_night_p90: the worst ward decides); one answer per "
                    "channel when it counts notices");
    cmd->add_option("--burden", o.burden_metric,
                    "Burden axis of the frontier (default per_unit_night_mean); one frontier per channel when it counts "
                    "notices, one for all plans on staff_minutes_per_unit_shift or evaluations_per_unit_shift");
    cmd->add_option("--benefit", o.benefit_metric, "Benefit axis of the frontier and budget (default caught)");
    cmd->add_flag("--phases", o.phases,
                  "At the end, print on stderr each phase's wall and CPU seconds and peak memory (read, prepare, "
                  "simulate, staff, evaluate, write)");
}

// The replayed chart-opening log, when the scenario replays one.
std::optional<ChartOpeningLog> replayed_openings(const Scenario& sc, const Population& pop) {
    if (!sc.simulation.chart_openings || sc.simulation.chart_openings->replay_path.empty()) return std::nullopt;
    return load_chart_openings(sc.simulation.chart_openings->replay_path, sc.simulation.chart_openings->roles, pop, sc.simulation.zone, sc.population.replay.bad_rows);
}

struct SizeOptions {
    std::string scenario;
    std::string plan;
    std::string sizes = "1-30";
    std::string target = "0.8";
    std::string out_dir;
    std::string replications;   // empty: the scenario's `replications`
    std::string threads = "0";  // 0 = all cores
};

int command_review_size(const SizeOptions& opt) {
    // Each size is a value of plans[].review.top_n, with that key's range;
    // each is one simulation, so there are no more of them than plans in a sweep.
    const std::size_t dash_at = opt.sizes.find('-', 1);
    const KeySpec& top_n = key_spec("plans[].review", "top_n");
    const auto from = static_cast<int>(option_integer(top_n, "--sizes", opt.sizes.substr(0, dash_at)));
    const auto to = dash_at == std::string::npos
                        ? from
                        : static_cast<int>(option_integer(top_n, "--sizes", opt.sizes.substr(dash_at + 1)));
    if (to < from) throw InputError("command line", 0, 0, "--sizes", "expected N or FROM-TO with FROM <= TO, e.g. 1-30");
    if (static_cast<std::size_t>(to - from) + 1 > sweep_plan_limit)
        throw InputError("command line", 0, 0, "--sizes",
                         std::to_string(to - from + 1) + " list sizes, more than the limit of " +
                             std::to_string(sweep_plan_limit) + " (one simulation each)");
    const double target = option_real(option_specs().target_catch_rate, "--target-catch-rate", opt.target);
    const unsigned threads = thread_count(opt.threads);
    Scenario sc = load_scenario(opt.scenario);
    if (!opt.replications.empty()) override_replications(sc, "--replications", opt.replications);
    std::size_t p = 0;
    while (p < sc.simulation.plans.size() && sc.simulation.plans[p].name != opt.plan) ++p;
    if (p == sc.simulation.plans.size()) throw std::invalid_argument("no plan named '" + opt.plan + "' in " + opt.scenario);
    if (!opt.out_dir.empty()) check_output_directory(opt.out_dir);
    if (sc.simulation.plans[p].channel != Channel::ranked_review)
        throw std::invalid_argument("plan '" + opt.plan + "' is a " + std::string(to_string(sc.simulation.plans[p].channel)) +
                                    " plan; list sizing needs a ranked_review plan");
    const PreparedPopulation prepared = prepare_population(sc.population);
    std::cout << describe_prepared(sc.population, prepared);
    const ReviewSizing sizing = size_review_list(sc, population_factory(sc.population, prepared), p, from, to, target, threads);
    const Table table = review_size_table(sizing);
    std::cout << review_size_text(sizing) << "\n" << review_size_answer(sizing) << "\n\n" << cautions_text() << "\n";
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
    const PreparedPopulation prepared = prepare_population(sc.population);
    std::cout << describe_prepared(sc.population, prepared);
    if (const auto warning = reporting_period_warning(sc, prepared)) std::cout << *warning << "\n";
    const std::shared_ptr<const Population> first = population_factory(sc.population, prepared)(0);
    const Population& pop = *first;
    std::int64_t cases = 0;
    for (const Encounter& e : pop.encounters) cases += e.outcome_at.has_value();
    std::cout << "Input: " << pop.encounters.size() << " encounters on " << pop.units.size() << " units ("
              << cases << " with the outcome), " << pop.scores.size() << " usable scores, "
              << pop.excluded.total_scores() << " scores excluded.\n";
    for (const auto& [reason, n] : pop.excluded.scores_by_reason) std::cout << "  excluded: " << n << " scores " << reason << "\n";
    for (const auto& [reason, n] : pop.excluded.encounters_by_reason) std::cout << "  excluded: " << n << " encounters " << reason << "\n";
    for (const auto& [reason, n] : pop.excluded.notes) std::cout << "  note: " << n << " " << reason << "\n";
    for (const auto& [reason, rows] : pop.excluded.rows_skipped)
        std::cout << "  skipped: " << rows.count << (rows.count == 1 ? " row, " : " rows, ") << reason << " (" << describe_lines(rows) << ")\n";
    if (const auto log = replayed_openings(sc, pop)) {
        std::cout << "Chart openings: " << log->openings.size() << " usable.\n";
        for (const auto& [reason, n] : log->excluded_by_reason) std::cout << "  excluded: " << n << " chart openings " << reason << "\n";
        for (const auto& [reason, rows] : log->rows_skipped)
            std::cout << "  skipped: " << rows.count << (rows.count == 1 ? " row, " : " rows, ") << reason << " (" << describe_lines(rows) << ")\n";
    }
    std::cout << "The scenario is valid.\n";
    return 0;
}

// The scenario as loaded, or the sweep's grid of plans built from it (and
// where each plan sits on the grid); with the replications the command line asks for.
SweptScenario scenario_to_run(const RunOptions& opt, bool sweep) {
    SweptScenario swept;
    Scenario& sc = swept.scenario;
    if (sweep) {
        SweepRequest request;
        request.base_plan = opt.sweep_plan;
        for (const auto& v : opt.vary) request.axes.push_back(parse_sweep_axis(v));
        request.keep_other_plans = opt.keep_plans;
        swept = sweep_with_grid(opt.scenario, request);
        std::cout << "Sweep: " << sc.simulation.plans.size() << " plans\n";
    } else {
        sc = load_scenario(opt.scenario);
    }
    if (!opt.replications.empty()) override_replications(sc, "--replications", opt.replications);
    return swept;
}

// The run's settings from its options, each read against its range and the
// output directory checked (by the rank that writes), before anything long runs.
RunSettings run_settings(const RunOptions& opt, bool writes) {
    RunSettings settings;
    if (!opt.max_burden.empty())
        settings.budget_limit = option_real(option_specs().max_burden, "--max-burden", opt.max_burden);
    settings.threads = thread_count(opt.threads);
    for (const auto& [option, name] : {std::pair{"--burden", &opt.burden_metric}, std::pair{"--benefit", &opt.benefit_metric},
                                       std::pair{"--budget-metric", &opt.budget_metric}})
        if (!find_metric(*name))
            throw InputError("command line", 0, 0, option,
                             "unknown metric '" + *name + "' (expected one of " + metric_names() + ")");
    if (writes && !opt.out_dir.empty()) check_output_directory(opt.out_dir);
    settings.notice_log = opt.notice_log;
    settings.task_log = opt.task_log;
    settings.burden_metric = opt.burden_metric;
    settings.benefit_metric = opt.benefit_metric;
    settings.budget_metric = opt.budget_metric;
    return settings;
}

// What a run needs before it starts; every rank of an MPI run makes the same.
struct PreparedRun {
    std::chrono::steady_clock::time_point started = std::chrono::steady_clock::now();
    PhaseLog phases;
    std::optional<TerminalProgress> terminal;
    SweptScenario swept;
    PopulationFactory factory;
    std::optional<ChartOpeningLog> openings;
    std::optional<std::string> period_warning;
    std::vector<std::string> other_scores_reached;  // generated further scores: what they reached
    RunSettings settings;
};

// Fills `run` in place (its settings point at its phases and openings), in two
// steps: the options and the scenario, then the population.
void prepare_scenario(const RunOptions& opt, bool sweep, bool writes, PreparedRun& run) {
    run.settings = run_settings(opt, writes);  // every option checked before the long part
    run.settings.phases = &run.phases;
    run.terminal.emplace(run.phases, writes && stderr_is_terminal());
    run.settings.progress = run.terminal->replications();
    run.swept = scenario_to_run(opt, sweep);
}

// `prepare` reads the log (or, across ranks, receives it) and prepares the population.
void prepare_population_of(PreparedRun& run, const std::function<PreparedPopulation(const PopulationSetup&)>& prepare) {
    const Scenario& sc = run.swept.scenario;
    std::optional<PhaseLog::Span> reading(std::in_place, &run.phases, "read");
    const PreparedPopulation prepared = prepare(sc.population);
    reading.reset();
    const auto preparing = phase(&run.phases, "prepare");
    std::cout << describe_prepared(sc.population, prepared);
    run.period_warning = reporting_period_warning(sc, prepared);
    run.other_scores_reached = other_scores_reached(prepared);
    if (run.period_warning) std::cout << *run.period_warning << "\n";
    run.factory = population_factory(sc.population, prepared);
    if (sc.simulation.chart_openings && !sc.simulation.chart_openings->replay_path.empty()) {
        if (!prepared.log || sc.population.bootstrap)
            throw InputError(sc.file, 0, 0, "chart_openings.replay",
                             "replayed chart openings belong to the replayed log; with a bootstrapped or generated "
                             "population, generate chart openings (openings_per_hour) instead");
        run.openings = replayed_openings(sc, *prepared.log);
    }
    run.settings.replayed_openings = run.openings ? &*run.openings : nullptr;
}

#ifdef TOCSIN_MPI
// Across MPI ranks: every rank prepares the run; rank 0 distributes and
// returns the output, the others compute what they are given and return nothing.
std::optional<RunOutput> run_on_ranks(const RunOptions& opt, bool sweep, MpiRanks& ranks, PreparedRun& run) {
    // Each step ends with every rank agreeing, so that the collective read
    // of the log is reached by every rank or by none.
    std::exception_ptr failed;
    try {
        prepare_scenario(opt, sweep, ranks.writes(), run);
    } catch (...) {
        failed = std::current_exception();
    }
    if (!ranks.agree_on_setup(failed)) return std::nullopt;
    try {
        prepare_population_of(run, [&](const PopulationSetup& setup) {
            return setup.source == PopulationSource::replay ? ranks.prepare_shared_population(setup)
                                                            : prepare_population(setup);
        });
    } catch (...) {
        failed = std::current_exception();
    }
    if (!ranks.agree_on_setup(failed)) return std::nullopt;
    const Scenario& sc = run.swept.scenario;
    if (!ranks.writes()) {
        PopulationCache populations(run.factory);
        ranks.serve([&](const WorkItem& item) {
            return run_work_item(sc, populations, run.settings, item, run.settings.threads);
        });
        return std::nullopt;
    }
    return run_scenario_distributed(sc, run.factory, run.settings, ranks);
}
#endif

int command_run(const RunOptions& opt, bool sweep, MpiRanks* ranks) {
    PreparedRun run;
    std::optional<RunOutput> ran;
#ifdef TOCSIN_MPI
    if (ranks) {
        ran = run_on_ranks(opt, sweep, *ranks, run);
        if (!ran) return 0;  // a worker rank; rank 0 reports any failure
    }
#else
    (void)ranks;
#endif
    if (!ran) {
        prepare_scenario(opt, sweep, true, run);
        prepare_population_of(run, [](const PopulationSetup& setup) { return prepare_population(setup); });
        ran = run_scenario(run.swept.scenario, run.factory, run.settings);
    }
    const Scenario& sc = run.swept.scenario;
    const RunSettings& settings = run.settings;
    const RunOutput& out = *ran;
    const auto started = run.started;
    const std::optional<std::string>& period_warning = run.period_warning;
    std::optional<PhaseLog::Span> writing(std::in_place, &run.phases, "write");
    std::cout << run_text(sc, out, settings);
    std::optional<ShiftEffect> effect;
    if (sc.population.shift) {
        const auto span = phase(&run.phases, "stress test");
        effect = shift_effect(sc, run.factory, settings.threads);
        std::cout << "\n" << shift_effect_text(*effect, sc.simulation.zone);
    }
    std::string report, whatif;
    if (!opt.out_dir.empty() || !opt.report_path.empty()) {
        ReportInput input = report_input_for_run(sc, out, settings);
        if (period_warning) input.key_findings.push_back(*period_warning);
        for (const std::string& line : run.other_scores_reached) input.assumptions.push_back(line);
        if (out.evaluation) add_evaluation(input, *out.evaluation, sc.score_label);
        report = render_report(input);
        whatif = render_whatif_page(whatif_input_for_run(sc, out, settings, input, sweep ? &run.swept.grid : nullptr));
    }
    if (!opt.report_path.empty()) {
        write_output_file(opt.report_path, report);
        std::cout << "Wrote the report to " << opt.report_path << "\n";
    }
    if (!opt.out_dir.empty()) {
        std::vector<Table> more;
        if (effect) more.push_back(shift_effect_table(*effect));
        std::vector<OutputFile> files = run_output_files(sc, out, settings, std::move(more));
        files.push_back({"report.html", report});
        files.push_back({"whatif.html", whatif});
        files.push_back({"run_record.json",
                         run_record_json(sc, settings, std::chrono::duration<double>(std::chrono::steady_clock::now() - started).count())});
        write_output_files(opt.out_dir, files);
        std::cout << "Wrote " << files.size() << " files to " << opt.out_dir << " in "
                  << format_real(std::chrono::duration<double>(std::chrono::steady_clock::now() - started).count(), 1)
                  << " s\n";
    }
    writing.reset();
    run.terminal.reset();  // the line cleared before the table is printed
    if (opt.phases) {
        PhaseFigures total{"total", std::chrono::duration<double>(std::chrono::steady_clock::now() - started).count(),
                           process_cpu_seconds(), process_peak_memory_kib(), 1};
        std::cerr << phase_table_text(run.phases.figures(), total);
    }
    return 0;
}

// Text inside a YAML double-quoted scalar: backslashes and quotes escaped.
std::string yaml_quoted(const std::string& text) {
    std::string out;
    for (char ch : text) {
        if (ch == '\\' || ch == '"') out += '\\';
        out += ch;
    }
    return out;
}

// Estimate the generator's knobs from the scenario's replayed log and print
// (or write) them as an editable `population: generate:` fragment.
int command_fit(const FitCommand& cmd) {
    const Scenario sc = load_scenario(cmd.scenario);
    if (sc.population.source != PopulationSource::replay)
        throw InputError(sc.file, 0, 0, "population", "tocsin fit needs a scenario that replays a log (population: replay:)");
    FitOptions options;
    options.zone = sc.simulation.zone;
    if (!cmd.scale.empty()) options.scale = cmd.scale == "probability" ? ScoreScale::probability : ScoreScale::points;
    options.stay_distribution = cmd.stay == "gamma" ? StayDistribution::gamma : StayDistribution::lognormal;
    options.arrivals_by_hour_of_day = cmd.by_hour_of_day;
    options.complete_from = sc.analysis.period_start;  // the reporting period: the log's complete part
    options.complete_until = sc.analysis.period_end;
    const Population log = load_replay(sc.population.replay, sc.simulation.zone);
    // Refused here rather than by fit_generator so the message names the file and the option.
    const ScaleChoice scale = choose_score_scale(score_scale_evidence(log), options.scale);
    if (!scale.scale)
        throw InputError(sc.population.replay.scores_path, 0, 0, "--scale",
                         scale.reason + (options.scale ? "; leave --scale out to fit on the scale the scores show"
                                                       : "; give --scale points or --scale probability"));
    const GeneratorFit fit = fit_generator(log, options);
    const std::string fragment = scenario_fragment(fit.config, fit.notes);
    std::string fragment_with_record = fragment;
    std::string check_text;  // computed before anything is written: an error leaves no partial output
    if (cmd.check) {
        const FitCheck check =
            check_fit(sc, log, fit.config, cmd.check_replications, std::max(1u, std::thread::hardware_concurrency()));
        check_text = fit_check_text(check);
        // The scenario made from the fragment carries what the check found, so that `run` can say it.
        const std::string record = fit_check_record(check);
        const std::string at = "  generate:\n";
        if (!record.empty() && fragment.find(at) != std::string::npos)
            fragment_with_record.insert(fragment.find(at) + at.size(), "    fit_check: \"" + yaml_quoted(record) + "\"\n");
    }
    if (cmd.out_path.empty()) {
        std::cout << fragment_with_record;
        // As comments, so that the terminal output stays a fragment one can paste.
        std::istringstream lines(check_text);
        for (std::string line; std::getline(lines, line);) std::cout << "# " << line << "\n";
    } else {
        write_output_file(cmd.out_path, fragment_with_record);
        std::string said = scale.reason;
        said[0] = static_cast<char>(std::toupper(static_cast<unsigned char>(said[0])));
        std::cout << "Fitted " << fit.encounters_admitted << " admissions (" << fit.cases << " cases) and " << fit.scores
                  << " scores; wrote " << cmd.out_path << "\n" << said << ".\n" << check_text;
    }
    return 0;
}

// Under mpirun (a build with TOCSIN_MPI) every rank runs this same program;
// the ranks other than 0 print nothing. Otherwise there are no ranks.
std::unique_ptr<MpiRanks> join_ranks(int& argc, char**& argv) {
#ifdef TOCSIN_MPI
    std::unique_ptr<MpiRanks> ranks = MpiRanks::join(argc, argv);
    if (ranks && !ranks->writes()) {
        std::cout.rdbuf(nullptr);
        std::cerr.rdbuf(nullptr);  // its errors travel to rank 0, which prints them
    }
    return ranks;
#else
    (void)argc, (void)argv;
    // Under mpirun every rank would run the whole command and write the same files.
    for (const char* name : {"OMPI_COMM_WORLD_SIZE", "PMI_SIZE"})
        if (const char* size = std::getenv(name); size && std::string(size) != "1") {
            std::cerr << "tocsin: error: this build has no MPI (configure with -DTOCSIN_MPI=ON); under mpirun each of the "
                      << size << " ranks would run the whole command\n";
            std::exit(2);
        }
    return nullptr;
#endif
}

}  // namespace

int main(int argc, char** argv) {
    const std::unique_ptr<MpiRanks> ranks = join_ranks(argc, argv);
    CLI::App app{"tocsin: simulate clinical alert workflows and the staff work they cause.\n" + cautions_text()};
    app.set_version_flag("--version", std::string("tocsin ") + TOCSIN_VERSION);
    app.require_subcommand(1);

    std::string check_path;
    auto* check = app.add_subcommand("check", "Validate a scenario and its input files; print what will be simulated");
    check->add_option("scenario", check_path, "Scenario YAML file")->required();

    RunOptions run_opt;
    auto* run = app.add_subcommand("run", "Run every plan of a scenario and print the comparison");
    add_run_options(run, run_opt);

    RunOptions sweep_opt;
    auto* sweep = app.add_subcommand("sweep", "Vary plan parameters over a grid and show the trade-off frontier");
    add_run_options(sweep, sweep_opt);
    sweep->add_option("--plan", sweep_opt.sweep_plan, "Plan to vary (default: the scenario's sweep.plan, else the first)");
    sweep->add_option("--vary", sweep_opt.vary,
                      "PATH=VALUES, e.g. plan.rule.threshold=50:80:5 or plan.rule.snooze_minutes=60,120,240; repeat for a grid");
    sweep->add_flag("--keep-plans", sweep_opt.keep_plans, "Also run the scenario's plans as written");

    FitCommand fit_cmd;
    auto* fit = app.add_subcommand("fit", "Fit the population generator to the scenario's log; print a YAML fragment to edit");
    fit->add_option("scenario", fit_cmd.scenario, "Scenario YAML file that replays a log")->required();
    fit->add_option("-o,--out", fit_cmd.out_path, "Write the fragment to this file instead of the terminal");
    fit->add_option("--scale", fit_cmd.scale, "Score scale of the log (default: the scale the scores show; refused when they cannot tell)")->check(CLI::IsMember({"points", "probability"}));
    fit->add_option("--stay", fit_cmd.stay, "Length-of-stay family")->check(CLI::IsMember({"lognormal", "gamma"}));
    fit->add_flag("--check", fit_cmd.check, "Generate replications from the fitted knobs and set the log's own figures beside their range");
    fit->add_option("--check-replications", fit_cmd.check_replications, "Replications for --check (default 40)")->check(CLI::Range(2, 10000));
    fit->add_flag("--by-hour-of-day", fit_cmd.by_hour_of_day, "One arrival rate per hour of day, every day alike (steadier for short logs)");

    SizeOptions size_opt;
    auto* size = app.add_subcommand("review-size", "How long should a ranked review list be? Catches and staff time for each list length");
    size->add_option("scenario", size_opt.scenario, "Scenario YAML file")->required();
    size->add_option("--plan", size_opt.plan, "A ranked_review plan of the scenario")->required();
    size->add_option("--sizes", size_opt.sizes, "List lengths to try, N or FROM-TO (default 1-30)");
    size->add_option("--target-catch-rate", size_opt.target, "Catch rate to reach (default 0.8)");
    size->add_option("-o,--out", size_opt.out_dir, "Write the table as CSV and JSON to this directory");
    size->add_option("-r,--replications", size_opt.replications, "Replications (default: the scenario's `replications`)");
    size->add_option("-j,--threads", size_opt.threads, "Worker threads (default: all cores); results do not depend on it");
    EvaluateCommand evaluate_cmd;
    auto* evaluate = add_evaluate_command(app, evaluate_cmd);
    GenerateCommand generate_cmd;
    auto* generate = add_generate_command(app, generate_cmd);

    auto* keys = app.add_subcommand("keys", "Print the reference of every scenario key (Markdown)");

    remove_partial_outputs_on_signals();
    try {
        app.parse(argc, argv);
    } catch (const CLI::ParseError& e) {
        return app.exit(e);
    }
    try {
        if (*check) return command_check(check_path);
        if (*run) return command_run(run_opt, false, ranks.get());
        if (*sweep) return command_run(sweep_opt, true, ranks.get());
        if (*fit) return command_fit(fit_cmd);
        if (*size) return command_review_size(size_opt);
        if (*evaluate) return run_evaluate_command(evaluate_cmd);
        if (*generate) return run_generate_command(generate_cmd);
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
