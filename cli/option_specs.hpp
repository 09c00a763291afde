#pragma once
// Ranges of the command-line options that stand for no scenario key. An
// option that overrides a key (--replications, evaluate's --window-hours)
// uses that key's KeySpec instead, so its range is declared once, in
// study/scenario_schema.cpp. Both kinds are read with option_real /
// option_integer (study/scenario_keys.hpp), the check scenario keys get.
#include <algorithm>
#include <string>
#include <string_view>
#include <thread>

#include "study/scenario_keys.hpp"

namespace tocsin {

struct OptionSpecs {
    // run, sweep, evaluate
    KeySpec max_burden = real_key("--max-burden", {.range = {.min = 0}});
    KeySpec threads = integer_key("--threads", {.fallback = 0, .range = {0, 4096}});
    // review-size (its --sizes are values of plans[].review.top_n)
    KeySpec target_catch_rate = real_key("--target-catch-rate", {.fallback = 0.8, .range = {0, 1}});
    // evaluate. The grid and the bootstrap set the work done, so their upper
    // bounds keep a typo from running for hours.
    KeySpec threshold = real_key("--threshold", {.unit = "score"});
    KeySpec grid_points = integer_key("--grid-points", {.fallback = 21, .range = {0, 10000}});
    KeySpec horizon = real_key("--horizon", {.unit = "hours", .range = {0.0166, 24 * 365}});
    KeySpec probability_horizon =
        real_key("--probability-horizon-hours", {.unit = "hours", .fallback = 0, .range = {0, 24 * 365}});
    // A threshold probability pt and "N evaluations per case found" are the
    // same choice (pt = 1/N); both stop at accepting 999 needless evaluations
    // per case, or almost none.
    KeySpec decision_threshold = real_key("--decision-threshold", {.unit = "probability", .range = {0.001, 0.999}});
    KeySpec evaluations_per_case = real_key("--evaluate-per-case", {.unit = "evaluations", .range = {1.001, 1000}});
    KeySpec period_days = integer_key("--period-days", {.unit = "days", .fallback = 0, .range = {0, 3660}});
    KeySpec bootstrap = integer_key("--bootstrap", {.unit = "replicates", .fallback = 200, .range = {0, 100000}});
};

inline const OptionSpecs& option_specs() {
    static const OptionSpecs specs;
    return specs;
}

// --threads as given, or every core for 0.
inline unsigned thread_count(const std::string& requested) {
    if (const auto n = option_integer(option_specs().threads, "--threads", requested)) return static_cast<unsigned>(n);
    return std::max(1u, std::thread::hardware_concurrency());
}

}  // namespace tocsin
