#pragma once
// A whole run: every plan over every replication, reduced to tables. The
// command-line tool prints and writes what this returns.
#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "analysis/comparison.hpp"
#include "analysis/evaluation.hpp"
#include "analysis/results.hpp"
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
    // The budget question: the best plan whose mean `budget_metric` is within the limit.
    std::optional<double> budget_limit;
    std::string budget_metric = "per_unit_night_p90";
    bool evaluate = true;  // model-evaluation measures on replication 0's population
};

struct RunOutput {
    // Replication 0's population in summary: its header text and size (the
    // population itself is not kept: a replayed year holds tens of millions of scores).
    std::string first_header;
    std::size_t first_encounters = 0;
    RunTables first_replication;      // tables of replication 0 (and the notice log of all, when asked)
    ReplicatedFigures figures;
    ComparisonTables comparison;
    Table frontier;
    std::optional<BudgetAnswer> budget;
    std::optional<Evaluation> evaluation;  // on replication 0's population
    Table plan_net_benefit;                // each plan's net benefit, an evaluation as the intervention
    std::string text;                 // the terminal summary
};

RunOutput run_scenario(const Scenario& scenario, const PopulationFactory& make_population, const RunSettings& settings);

// Net benefit of each plan (Vickers & Elkin 2006), treating a bedside
// evaluation as the intervention: a caught case is a true positive, a patient
// without the outcome who was evaluated a false positive. Thresholds are given
// as N, the evaluations one would accept per case found (pt = 1 / N), so model
// and workflow are judged in the same unit as the decision curve.
Table plan_net_benefit_table(const std::vector<std::string>& plans, const std::vector<PlanFigures>& figures,
                             std::size_t encounters, const std::vector<double>& evaluations_per_case);

}  // namespace tocsin
