#pragma once
// "How long should the review list be?" For each list length N of a
// ranked-review plan (all else as declared), on the same population:
//   caught, catch_rate     cases reviewed within the catch window,
//                          as for every plan;
//   on_list, on_list_share cases whose patient was on a top-N list at a round
//                          within the same window, reviewed or not: the two
//                          differ only when the team's capacity leaves listed
//                          patients unreviewed;
//   reviews_per_round, minutes_per_round
//                          the team's work at one review time (all units
//                          together), mean over the rounds of the reporting period;
//   lead_median_h          median hours from the catching review to the outcome;
//   caught_per_100_reviews the yield of the reviews: cases caught per 100 reviews
//                          over the whole run (as `reviews` and `caught`);
// and the smallest N whose catch rate reaches the target.
//
// Over replications (the scenario's `replications`), every list length of a
// replication sees the same patients (common random numbers); each figure is
// the mean over replications with the 95% interval of analysis/comparison.hpp
// (Student's t), and the smallest N is the first whose mean catch rate reaches
// the target.
//
// Capacity (one model): a review is done by the review team declared on the
// review, at minutes_per_review each, up to its capacity per round
// (max_reviews_per_round, or team_size x team_minutes_per_round /
// minutes_per_review); the roles' queues and task minutes do not apply to
// reviews (sim/simulate.cpp), so `run` and `review-size` cost a review alike.
#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "analysis/comparison.hpp"
#include "models/population.hpp"
#include "models/population_source.hpp"
#include "study/scenario.hpp"
#include "sim/shifts.hpp"

namespace tocsin {

// One list length in one replication.
struct ReviewSizeRow {
    int top_n = 0;
    std::int64_t cases = 0, caught = 0, on_list = 0, reviews = 0;
    std::optional<double> catch_rate, on_list_share;
    double reviews_per_round = 0, minutes_per_round = 0;
    std::optional<double> lead_median_hours;       // none: nothing caught
    std::optional<double> caught_per_100_reviews;  // none: no review
};

// One list length over the replications: each figure's mean and 95% interval.
struct ReviewSizeSummary {
    int top_n = 0;
    MeanInterval cases, caught, catch_rate, on_list, on_list_share, reviews, reviews_per_round, minutes_per_round,
        lead_median_hours, caught_per_100_reviews;
    double reaches_target_share = 0;  // share of replications whose catch rate reaches the target
};

struct ReviewSizing {
    std::string plan;
    double target_catch_rate = 0;
    std::uint64_t replications = 1;
    std::vector<ReviewSizeRow> rows;         // replication 0, one per N, ascending
    std::vector<ReviewSizeSummary> summary;  // over all replications, one per N, ascending
    std::optional<int> smallest_n;  // smallest N whose mean catch rate >= target; none when no N in range reaches it
};

// One replication. Throws std::invalid_argument when the plan is not a ranked
// review or the range is empty. `summary` is that replication alone.
ReviewSizing size_review_list(const Scenario& scenario, const Population& population, const ShiftCalendar& calendar,
                              std::size_t plan, int smallest_size, int largest_size, double target_catch_rate,
                              std::uint64_t replication = 0);

// Replications 0 .. scenario.replications-1 on `threads` threads; the result
// does not depend on the thread count.
ReviewSizing size_review_list(const Scenario& scenario, const PopulationFactory& make_population, std::size_t plan,
                              int smallest_size, int largest_size, double target_catch_rate, unsigned threads);

// The mean and interval of each list length over replications (by_replication[r][n]).
ReviewSizing summarise_review_sizes(std::string plan, double target_catch_rate,
                                    const std::vector<std::vector<ReviewSizeRow>>& by_replication);

}  // namespace tocsin
