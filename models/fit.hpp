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
#include <optional>
#include <string>
#include <vector>

#include "models/generator.hpp"
#include "models/population.hpp"
#include "models/time.hpp"

namespace tocsin {

// The scale a log's scores are on, as far as the scores themselves show it:
// a value outside 0 to 1 cannot be a probability, so it means points; all
// within 0 to 1 with at least one strictly between means probability; no
// scores, or only 0s and 1s, fit either scale.
struct ScaleEvidence {
    ScoreRange range;
    std::int64_t strictly_between = 0;   // scores in (0, 1)
    std::optional<ScoreScale> detected;  // none: the scores cannot tell
};
ScaleEvidence score_scale_evidence(const Population& population);

// The scale to fit on: the one asked for (`given`) when the scores do not
// contradict it, else the one the scores show. No scale when the scores
// cannot tell and none was given, or when probability was given for scores
// outside 0 to 1; `reason` then says why, else which scale and why (one line
// for the fit's notes).
struct ScaleChoice {
    std::optional<ScoreScale> scale;
    std::string reason;
};
ScaleChoice choose_score_scale(const ScaleEvidence& evidence, std::optional<ScoreScale> given);

struct FitOptions {
    TimeZone zone = TimeZone::utc();    // hour of week is read on this clock
    // None: the scale the scores show (choose_score_scale). Fitting on the
    // wrong one is silent and large: 0-1 scores read as points make the
    // fitted population page a third as often as the log.
    std::optional<ScoreScale> scale;
    StayDistribution stay_distribution = StayDistribution::lognormal;
    bool outcome_ends_stay = true;
    double drift_window_hours = 96.0;   // how far before time zero to look for a rise
    // Pool the weekdays: one rate per local hour of day, the same every day.
    // Steadier for a log of a few weeks (6 weeks give 6 admissions-hours per
    // hour of week, 42 per hour of day).
    bool arrivals_by_hour_of_day = false;
    // The part of the log that records every admission (the scenario's
    // reporting period, when declared). A log's first and last days hold the
    // stays running on from before it and out after it, without their
    // admissions; counted over the whole log, the rates come out too low (a
    // four-week log with twelve days of discharges after it: a quarter low).
    // None: the population's period.
    std::optional<Instant> complete_from, complete_until;
};

struct GeneratorFit {
    GeneratorConfig config;
    std::vector<std::string> notes;     // caveats for the user, one line each
    std::int64_t encounters_admitted = 0;  // admitted inside [admissions_from, admissions_until)
    Instant admissions_from = 0, admissions_until = 0;  // where the rates count admissions
    std::int64_t cases = 0;
    std::int64_t scores = 0;
};

// Throws std::invalid_argument when the population is too small to fit
// (no admissions in the period, no controls with two or more scores, ...) or
// when choose_score_scale gives no scale (with its reason). The scale chosen
// and why is the first note.
GeneratorFit fit_generator(const Population& population, const FitOptions& options = {});

// The fitted knobs as an editable YAML fragment (the `population: generate:`
// block of a scenario), with the notes as comments.
std::string scenario_fragment(const GeneratorConfig& config, const std::vector<std::string>& notes = {});

}  // namespace tocsin
