#pragma once
// Ranges of the command-line options that stand for no scenario key. An
// option that overrides a key (--replications, evaluate's --window-hours)
// uses that key's KeySpec instead, so its range is declared once, in
// study/scenario_schema.cpp. Both kinds are read with option_real /
// option_integer (study/scenario_keys.hpp), the check scenario keys get.
#include <string_view>

#include "study/scenario_keys.hpp"

namespace tocsin {

struct OptionSpecs {
    // run, sweep
    KeySpec max_burden{"--max-burden", KeyKind::real, "", "", false, 0, 1e300, ""};
    KeySpec threads{"--threads", KeyKind::integer, "", "0", false, 0, 4096, ""};
    // review-size (its --sizes are values of plans[].review.top_n)
    KeySpec target_catch_rate{"--target-catch-rate", KeyKind::real, "", "0.8", false, 0, 1, ""};
    // evaluate. The grid and the bootstrap set the work done, so their upper
    // bounds keep a typo from running for hours.
    KeySpec threshold{"--threshold", KeyKind::real, "score", "", false, -1e300, 1e300, ""};
    KeySpec grid_points{"--grid-points", KeyKind::integer, "", "21", false, 0, 10000, ""};
    KeySpec horizon{"--horizon", KeyKind::real, "hours", "", false, 0.0166, 24 * 365, ""};
    KeySpec probability_horizon{"--probability-horizon-hours", KeyKind::real, "hours", "0", false, 0, 24 * 365, ""};
    // A threshold probability pt and "N evaluations per case found" are the
    // same choice (pt = 1/N); both stop at accepting 999 needless evaluations
    // per case, or almost none.
    KeySpec decision_threshold{"--decision-threshold", KeyKind::real, "probability", "", false, 0.001, 0.999, ""};
    KeySpec evaluations_per_case{"--evaluate-per-case", KeyKind::real, "evaluations", "", false, 1.001, 1000, ""};
    KeySpec period_days{"--period-days", KeyKind::integer, "days", "0", false, 0, 3660, ""};
    KeySpec bootstrap{"--bootstrap", KeyKind::integer, "replicates", "200", false, 0, 100000, ""};
};

inline const OptionSpecs& option_specs() {
    static const OptionSpecs specs;
    return specs;
}

}  // namespace tocsin
