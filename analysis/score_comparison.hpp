#pragma once
// Two scores of the same stays, compared on those stays (paired): the
// committee's question "is the candidate better than what we use today?".
//
// - The encounter-level AUCs (each stay's highest usable value of each score)
//   with DeLong, DeLong & Clarke-Pearson's test for correlated ROC curves
//   (1988), on the stays that have a usable value of both.
// - At each plan's threshold on its own score, the other score at the
//   threshold that flags as many stays (as near as its values allow): a
//   like-for-like comparison at the same stay-level burden. For that pair,
//   reclassification (stays one flags and the other does not, among cases and
//   non-cases) and net benefit (Vickers & Elkin 2006) of each, with the
//   difference and a percentile interval from resampling whole stays.
#include <array>
#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "analysis/comparison.hpp"
#include "analysis/evaluation.hpp"
#include "analysis/roc.hpp"
#include "models/population.hpp"
#include "sim/setup.hpp"

namespace tocsin {

struct ScorePairAuc {
    std::string first, other;  // score names
    std::int64_t stays = 0, cases = 0, controls = 0;  // with a usable value of both scores
    // Stays left out because only one of the scores has a usable value, or neither.
    std::int64_t only_first = 0, only_other = 0, neither = 0;
    double confidence = 0.95;
    std::optional<PairedAucComparison> test;  // absent unless both classes are present
};

// Stays by what the two thresholds flag: [0] both, [1] the plan's score only,
// [2] the other score only, [3] neither.
using FlagCounts = std::array<std::int64_t, 4>;

struct ThresholdComparison {
    std::string plan, plan_score, other_score;
    double plan_threshold = 0;
    // The other score's threshold flagging the number of stays nearest to the
    // plan's (the higher of two equally near); +infinity when the plan flags none.
    double matched_threshold = 0;
    std::int64_t stays = 0, cases = 0;  // compared: a usable value of both scores
    FlagCounts cases_by{}, non_cases_by{};
    double evaluations_per_case = 0;  // N: the threshold probability is 1 / N
    double net_benefit_plan = 0, net_benefit_other = 0;
    double difference = 0;  // plan's score minus the other
    Interval difference_interval;
    int resamples = 0;
};

struct ScoreComparison {
    std::vector<ScorePairAuc> auc;                 // the first score against each other score
    std::vector<ThresholdComparison> thresholds;  // plans outermost, then other scores, then N
};

struct ScoreComparisonOptions {
    std::vector<double> evaluations_per_case{5, 10, 20};
    int resamples = 2000;
    double confidence = 0.95;
    std::uint64_t seed = 1;  // the scenario's; draws on stream score_comparison of replication 0
};

// Empty when the population has a single score. Plans without a finite
// threshold (a ranked review without a floor) are left out.
ScoreComparison compare_scores(const Population& population, const std::vector<Plan>& plans,
                               const ScoreComparisonOptions& options);

// Every evaluation measure of each other score (population.other_scores
// order), with `options` and, for score k, `probability[k - 1]` (a mapping
// declared for the first score says nothing of the others; none when the
// list is shorter).
std::vector<Evaluation> other_score_evaluations(const Population& population, EvaluationOptions options,
                                                const std::vector<std::optional<ProbabilityMapping>>& probability);

// Each stay's highest usable value of score `score` (NaN when it has none).
std::vector<double> stay_maxima(const Population& population, std::size_t score);

// The threshold on `values` (NaN = no value, ignored) flagging the count of
// values >= it nearest to `flagged` (the higher of two equally near);
// +infinity when `flagged` is 0.
double threshold_flagging(std::vector<double> values, std::int64_t flagged);

// The committee's headline: each plan on another score against the plan on
// the first score, of the same channel, nearest to it in mean burden; the
// paired differences (this plan minus that one, replication by replication on
// the same patients) in burden and benefit. Intervals need 2 replications.
struct MatchedPlans {
    std::string plan, versus;  // plan on another score; its match on the first score
    std::string plan_score, versus_score;
    std::string burden_metric, benefit_metric;
    MeanInterval burden_difference, benefit_difference;
};
std::vector<MatchedPlans> matched_plans(const ReplicatedFigures& figures, const std::vector<Plan>& plans,
                                        const std::vector<std::string>& score_names, std::size_t burden_metric,
                                        std::size_t benefit_metric);

}  // namespace tocsin
