#pragma once
// Fitting the generator to a log: estimate every GeneratorConfig knob from a
// (replayed) population so that a committee can start from its own data,
// edit a scenario fragment, and generate as many replications as it needs.
//
// What a log cannot show, and how the fit leans:
// - arrivals turned away when a unit was full never appear: rates are those
//   of admissions, and beds = the highest census seen (both lower bounds);
// - when the outcome ends the stay, a case's stay is cut short: stays are
//   fitted on controls only, and the outcome's timing within the stay comes
//   from moments (E[T] = E[F] E[L], E[T^2] = E[F^2] E[L^2], F uniform);
// - scores before the log starts and charting delays longer than the rest of
//   the stay are missing, so latency is slightly under-estimated.
#include <cstdint>
#include <string>
#include <vector>

#include "models/generator.hpp"
#include "models/population.hpp"
#include "models/time.hpp"

namespace tocsin {

struct FitOptions {
    TimeZone zone = TimeZone::utc();    // hour of week is read on this clock
    ScoreScale scale = ScoreScale::points;
    StayDistribution stay_distribution = StayDistribution::lognormal;
    bool outcome_ends_stay = true;
    double drift_window_hours = 96.0;   // how far before time zero to look for a rise
    // Pool the weekdays: one rate per local hour of day, the same every day.
    // Steadier for a log of a few weeks (6 weeks give 6 admissions-hours per
    // hour of week, 42 per hour of day).
    bool arrivals_by_hour_of_day = false;
};

struct GeneratorFit {
    GeneratorConfig config;
    std::vector<std::string> notes;     // caveats for the user, one line each
    std::int64_t encounters_admitted = 0;  // admitted inside the period
    std::int64_t cases = 0;
    std::int64_t scores = 0;
};

// Throws std::invalid_argument when the population is too small to fit
// (no admissions in the period, no controls with two or more scores, ...).
GeneratorFit fit_generator(const Population& population, const FitOptions& options = {});

// The fitted knobs as an editable YAML fragment (the `population: generate:`
// block of a scenario), with the notes as comments.
std::string scenario_fragment(const GeneratorConfig& config, const std::vector<std::string>& notes = {});

}  // namespace tocsin
