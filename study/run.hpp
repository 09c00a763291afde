#pragma once
// A whole run: every plan over every replication, reduced to typed results.
// report/ renders them; the command-line tool prints and writes what it renders.
#include <cstdint>
#include <mutex>
#include <optional>
#include <string>
#include <vector>

#include "analysis/comparison.hpp"
#include "analysis/evaluation.hpp"
#include "analysis/plan_net_benefit.hpp"
#include "analysis/plan_warnings.hpp"
#include "analysis/results.hpp"
#include "analysis/score_comparison.hpp"
#include "study/experiment.hpp"
#include "study/scenario.hpp"

namespace tocsin {

struct RunSettings {
    unsigned threads = 1;
    bool notice_log = false;          // patient-level rows, only on request
    bool task_log = false;            // patient-level rows, only on request
    const ChartOpeningLog* replayed_openings = nullptr;  // see ExperimentOptions
    ProgressReport progress;          // may be empty
    std::string burden_metric = "per_unit_night_mean";
    std::string benefit_metric = "caught";
    // The budget question: the best plan whose mean `budget_metric` is within
    // the limit. By default per ward: the worst ward's own 90th percentile of
    // notices per night decides ("no ward over 4 on 9 nights in 10").
    std::optional<double> budget_limit;
    std::string budget_metric = "worst_unit_night_p90";
    bool evaluate = true;  // model-evaluation measures on replication 0's population
    PhaseLog* phases = nullptr;  // the run's phases timed here (prepare, simulate, staff, evaluate); may be null
};

struct RunOutput {
    // Replication 0's results (with the notice and task logs of every
    // replication, when asked). The population itself is not kept: a replayed
    // year holds tens of millions of scores.
    ReplicationResults first_replication;
    ReplicatedFigures figures;            // every plan's figures in every replication
    ReplicatedUnitFigures unit_figures;   // every plan's figures on every unit in every replication
    ReplicatedGroupFigures group_figures;  // every plan's figures for every patient group in every replication
    std::vector<GroupScoreFigures> group_scores;  // the score's measures by group, replication 0
    std::vector<PlanNetBenefit> plan_net_benefit;  // replication 0, an evaluation as the intervention
    // When a budget limit was given: one answer, or one per channel when the
    // budget metric's unit differs by channel and the plans use several (comparison_groups).
    std::vector<BudgetAnswer> budget;
    std::optional<Evaluation> evaluation;  // on replication 0's population
    // With other scores: each one's measures (in the scenario's order) and the
    // paired comparison with the first, on replication 0's population.
    std::vector<Evaluation> other_evaluations;
    ScoreComparison score_comparison;
    std::vector<MatchedPlans> matched_plans;  // plans on other scores against their match on the first
    PlanWarnings warnings;                 // thresholds outside replication 0's scores, identical plans
};

// With a bootstrapped log, a warning when the reporting period reaches outside
// the days the bootstrap draws from: the log's own per-shift figures ("as
// logged") then include days whose census was still filling or emptying, and
// the resamples do not, so the two differ for that reason alone.
std::optional<std::string> reporting_period_warning(const Scenario& scenario, const PreparedPopulation& prepared);

// Runs every plan over every replication. report/run_text.hpp and
// report/run_tables.hpp render what it returns.
RunOutput run_scenario(const Scenario& scenario, const PopulationFactory& make_population, const RunSettings& settings);

// The pieces of run_scenario, shared with a run whose replications are cut
// into work items (study/work_items.hpp), so that both keep exactly the same.
struct PlansFigures {
    std::vector<PlanFigures> figures;       // one per plan of the record
    std::vector<UnitFigures> unit_figures;  // plan-major, units in the population's order
    std::vector<GroupFigures> group_figures;  // plan-major, groups in declared order
};
// Every plan's figures in one replication; the record's plans are the scenario's.
PlansFigures replication_figures(const Scenario& scenario, const Population& population, const ShiftCalendar& calendar,
                                 const ReplicationRecord& record);

// What each replication leaves behind: its plans' figures, and the logs when asked.
struct ReplicationsKept {
    explicit ReplicationsKept(std::uint64_t replications);
    std::vector<std::vector<PlanFigures>> figures;
    std::vector<std::vector<UnitFigures>> unit_figures;
    std::vector<std::vector<GroupFigures>> group_figures;
    std::vector<std::vector<LoggedNotice>> notice_logs;
    std::vector<std::vector<LoggedTask>> task_logs;
    std::vector<ScoreSample> first_scores;  // replication 0's, one per score, for the plans' thresholds
    std::mutex first_lock;
};
// Keeps one replication (replication 0 also gives `out`'s first_replication
// and evaluation).
void keep_replication(const Scenario& scenario, const RunSettings& settings, std::uint64_t replication,
                      const Population& population, const ShiftCalendar& calendar, const ReplicationRecord& record,
                      ReplicationsKept& kept, RunOutput& out);
// Throws when a metric the settings name is unknown.
void check_run_metrics(const RunSettings& settings);
// Joins the logs and compares the plans across every kept replication.
void finish_run(const Scenario& scenario, const RunSettings& settings, ReplicationsKept& kept, RunOutput& out);
ExperimentOptions experiment_options(const Scenario& scenario, const RunSettings& settings);

}  // namespace tocsin
