#pragma once
// Plans whose results say more about the scenario than about the plans: a
// threshold outside the scores seen (no score reaches it, or every score
// does: often a threshold on another scale, 0.2 against 0-100 points), a
// threshold inside them that nearly every score reaches (the same mistake
// when the scores include 0), and
// plans that gave exactly the same figures (their differences never came into
// play on this population). Computed on replication 0; report/ words them.
#include <cstddef>
#include <string>
#include <vector>

#include "analysis/results.hpp"
#include "models/population.hpp"
#include "sim/setup.hpp"

namespace tocsin {

struct ThresholdOutsideScores {
    std::string plan;
    double threshold = 0;
    ScoreRange observed;  // replication 0's usable scores (observed.scores > 0)
    bool above = false;   // above the highest score: the plan never fires; below the lowest: every score qualifies
};

// A threshold inside the scores seen but at or below their low percentile:
// at least `most_scores_share` of the usable scores reach it, so the plan
// fires on nearly every score. In the trial, thresholds of 0.2 to 0.4 ran
// against 0-100 scores that included 0: 51 pages per ward per night.
inline constexpr double most_scores_share = 0.95;
struct ThresholdBelowMostScores {
    std::string plan;
    double threshold = 0;
    double share_reaching = 0;      // share of replication 0's usable scores >= threshold
    double low_percentile = 0;      // their (1 - most_scores_share) percentile, the 5th
    ScoreRange observed;
};

// A threshold between 0 and 1, inside the scores seen, on scores that run
// beyond 1 (so not probabilities), reached by fewer than most_scores_share of
// them: the same mistake when the scores hold many zeros, which the
// percentile check cannot see.
struct ThresholdLikeAProbability {
    std::string plan;
    double threshold = 0;
    double share_reaching = 0;  // share of replication 0's usable scores >= threshold
    ScoreRange observed;
};

// Plans with equal notices, catches and notices in every unit-shift, in
// scenario order (two or more).
struct IdenticalPlans {
    std::vector<std::string> plans;
};

struct PlanWarnings {
    std::vector<ThresholdOutsideScores> thresholds;  // scenario order
    std::vector<ThresholdBelowMostScores> low_thresholds;  // scenario order
    std::vector<ThresholdLikeAProbability> probability_thresholds;  // scenario order
    std::vector<IdenticalPlans> identical;            // ordered by each group's first plan
    bool empty() const {
        return thresholds.empty() && low_thresholds.empty() && probability_thresholds.empty() && identical.empty();
    }
};

// `figures[p]` are plan p's figures in replication 0, `samples[k]` that
// replication's usable values of score k (a plan's threshold is checked
// against its own score). A plan without a floor (a ranked review's
// threshold of -infinity) has no threshold to check.
PlanWarnings plan_warnings(const std::vector<Plan>& plans, const std::vector<ScoreSample>& samples,
                           const std::vector<PlanFigures>& figures);

}  // namespace tocsin
