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
// and the smallest N whose catch rate reaches the target.
#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "models/population.hpp"
#include "study/scenario.hpp"
#include "sim/shifts.hpp"

namespace tocsin {

struct ReviewSizeRow {
    int top_n = 0;
    std::int64_t cases = 0, caught = 0, on_list = 0, reviews = 0;
    std::optional<double> catch_rate, on_list_share;
    double reviews_per_round = 0, minutes_per_round = 0;
};

struct ReviewSizing {
    std::string plan;
    double target_catch_rate = 0;
    std::vector<ReviewSizeRow> rows;  // one per N, ascending
    std::optional<int> smallest_n;    // smallest N with catch_rate >= target; none when no N in range reaches it
};

// Throws std::invalid_argument when the plan is not a ranked review or the range is empty.
ReviewSizing size_review_list(const Scenario& scenario, const Population& population, const ShiftCalendar& calendar,
                              std::size_t plan, int smallest_size, int largest_size, double target_catch_rate,
                              std::uint64_t replication = 0);

}  // namespace tocsin
