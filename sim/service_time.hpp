#pragma once
// Minutes one evaluation takes: a declared distribution, drawn with Boost.Random
// from a stream the caller owns, so the same stream gives the same minutes on
// every platform we build with.
#include <string>
#include <variant>
#include <vector>

#include "models/random_streams.hpp"
#include "models/time.hpp"

namespace tocsin {

struct FixedMinutes {
    double minutes = 0.0;
};
struct ExponentialMinutes {
    double mean_minutes = 0.0;
};
// Gamma with the given mean and standard deviation (shape = (mean/sd)^2).
struct GammaMinutes {
    double mean_minutes = 0.0;
    double sd_minutes = 0.0;
};
// Lognormal with the given median; `spread_factor` is the geometric standard
// deviation: about two tasks in three take between median/spread and median*spread.
struct LognormalMinutes {
    double median_minutes = 0.0;
    double spread_factor = 1.0;
};
// Each listed value equally likely (e.g. minutes timed on a ward audit).
struct EmpiricalMinutes {
    std::vector<double> minutes;
};

using ServiceTime = std::variant<FixedMinutes, ExponentialMinutes, GammaMinutes, LognormalMinutes, EmpiricalMinutes>;

// Empty when the parameters are usable; otherwise one sentence saying what is
// wrong and what was expected, e.g. "gamma: sd_minutes must be > 0 (got -2)".
std::string service_time_problem(const ServiceTime& distribution);
// Throws std::invalid_argument with the message above.
void check_service_time(const ServiceTime& distribution);

// One draw, in minutes (>= 0). The distribution must be valid.
double draw_minutes(const ServiceTime& distribution, RandomEngine& stream);
double draw_minutes(const ServiceTime& distribution, SplitMixEngine& stream);
// A draw rounded to whole seconds, the clock's resolution.
Seconds draw_seconds(const ServiceTime& distribution, RandomEngine& stream);
Seconds draw_seconds(const ServiceTime& distribution, SplitMixEngine& stream);

double mean_minutes(const ServiceTime& distribution);
// e.g. "gamma (mean 12 min, sd 6 min)"
std::string describe(const ServiceTime& distribution);

}  // namespace tocsin
