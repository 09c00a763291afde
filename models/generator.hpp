#pragma once
// A generated population: patients arrive on each unit, stay, sometimes reach
// the outcome (time zero), and are scored at a regular cadence. Every knob is
// something a committee can read and argue about (beds, arrivals by hour of
// week, length of stay, outcome rate, score noise, a rise before time zero).
//
// Common random numbers: arrivals of unit u come from stream
// (seed, replication, arrivals, u); the stay and the score trajectory of the
// n-th arrival on unit u come from streams (stay, entity) and (trajectory,
// entity) with entity = encounter_entity(u, n); a case's own rise, when
// drift_size_sd is not 0, from (rise_size, entity). Every stream draws the same
// number of values whatever the knob values, so changing one unit's rate, the
// drift size or the missing-score probability leaves every other draw where
// it was. A patient-group value comes from (patient_group, entity_key(entity,
// column name)): declaring groups moves no other draw, and a group's score
// shift moves only its own patients' scores. A further score's draws come
// from (other_score, entity_key(entity, score name)): see GeneratedOtherScore.
#include <array>
#include <cstdint>
#include <functional>
#include <optional>
#include <span>
#include <string>
#include <vector>

#include "models/population.hpp"
#include "models/time.hpp"

namespace tocsin {

constexpr int hours_per_week = 168;

// Arrivals per hour by local hour of week; index 0 = Monday 00:00-01:00.
using WeeklyRate = std::array<double, hours_per_week>;

struct UnitConfig {
    std::string name;
    int beds = 20;
    WeeklyRate arrivals_per_hour{};  // mean admissions per hour at each hour of week
};

enum class StayDistribution { lognormal, gamma };

struct StayConfig {
    StayDistribution distribution = StayDistribution::lognormal;
    double median_hours = 72.0;  // lognormal: exp(mu)
    double log_sd = 0.7;         // lognormal: sigma of log(hours)
    double mean_hours = 80.0;    // gamma
    double sd_hours = 60.0;      // gamma
};

struct OutcomeConfig {
    double probability = 0.05;      // share of admitted encounters that reach time zero
    // Time zero falls at a uniform fraction of the drawn stay in [earliest, latest].
    double earliest_fraction = 0.1;
    double latest_fraction = 1.0;
    bool ends_stay = true;  // e.g. unplanned ICU transfer: the ward stay ends at time zero
};

// Points: values in [0, 100], the latent level is in points and clamped.
// Probability: values in (0, 1), the latent level is on the logit scale.
enum class ScoreScale { points, probability };

struct ScoreConfig {
    ScoreScale scale = ScoreScale::points;
    double cadence_minutes = 60.0;
    double jitter_minutes = 10.0;        // each gap is cadence +/- uniform(jitter); must be < cadence
    double missing_probability = 0.0;    // a scheduled score is never recorded
    double latency_median_minutes = 0.0; // available_at - scored_at is lognormal; 0 = immediate
    double latency_log_sd = 0.0;
    // Latent level = baseline + patient offset (fixed per stay) + noise (per score) + drift.
    double baseline = 20.0;
    double between_patient_sd = 6.0;
    double within_patient_sd = 6.0;
    // Correlation of the score-to-score noise one hour apart: the noise is an
    // AR(1) process on the scores' schedule, correlation carryover^(gap in
    // hours) from one scheduled score to the next, sd within_patient_sd
    // throughout. 0: drawn afresh at each score. Noise that carries over
    // crosses a threshold less often, so a plan pages less.
    double noise_carryover = 0.0;
    // Cases only: a linear rise from 0 to drift_size, starting a uniform number of
    // hours in [onset_min, onset_max] before time zero and complete at time zero.
    double drift_size = 20.0;
    // Each case's own rise is drift_size + drift_size_sd x a standard normal
    // (stream rise_size): patients differ in how far they climb, and a log
    // whose rises vary is harder to catch than one where every case climbs
    // alike. Drawn from its own stream, so 0 leaves every other draw as it was.
    double drift_size_sd = 0.0;
    double drift_onset_min_hours = 6.0;
    double drift_onset_max_hours = 48.0;
};

// A further score of the same generated patients, e.g. the score in use today
// beside a candidate. It is scored at the first score's instants (scored_at
// and available_at alike, the same scheduled rows missing), so the two differ
// only in their values. Its latent level has its own baseline, spreads,
// noise carry-over, rise (drift_size, drift_size_sd) and scale, taken from
// `level`; the schedule and drift onset fields of `level` are not used: the
// case's rise starts when the first score's does. `correlation` is the share
// of the patient's own level it has in common with the first score:
// offset = between_patient_sd x (correlation x z1 + sqrt(1 - correlation^2) x z),
// z1 the first score's standardised patient offset. Its own draws come from
// (other_score, entity_key(entity, text_entity(name))), so declaring it moves
// no draw of the first score. Group score shifts apply to the first score only.
struct GeneratedOtherScore {
    std::string name;
    ScoreConfig level;
    double correlation = 0.0;
    std::optional<double> target_auc{};  // calibrate level.drift_size to this encounter-level AUC
};

// A patient-group column the generator fills in: each encounter's value is
// drawn with the declared shares, and its scores' latent level may be moved
// by a value's own shift, to show what a score that runs low (or high) for
// one group does to who is reached.
struct GeneratedGroup {
    GroupColumn column;
    std::vector<double> shares;       // one per value; what is left over is "not recorded"
    std::vector<double> score_shift;  // one per level (values, then "not recorded"); points, or logits
};

struct GeneratorConfig {
    std::vector<UnitConfig> units;
    std::vector<GeneratedGroup> groups{};
    StayConfig stay;
    OutcomeConfig outcome;
    ScoreConfig scores;
    std::vector<GeneratedOtherScore> other_scores{};
    std::string score_name = "score";  // the first score's name, when there are other scores
    Instant period_start = 0;  // the population covers [period_start, period_end)
    Instant period_end = 0;
    // Arrivals start this long before period_start so that the census at the
    // start is already realistic; stays still present at period_start are kept
    // with all their scores (like a log extract of everyone on the unit).
    double warmup_days = 14.0;
    TimeZone zone = TimeZone::utc();  // hour of week is read on this local clock
};

// Throws std::invalid_argument naming the field ("units[2].beds: ...").
void validate(const GeneratorConfig& config);

// The stream entity of the n-th arrival (counting turned-away arrivals) on a unit.
constexpr std::uint64_t encounter_entity(std::uint32_t unit, std::uint64_t arrival_index) {
    return (static_cast<std::uint64_t>(unit) << 40) | arrival_index;
}

// Local hour of week (0 = Monday 00:00) of an instant.
int hour_of_week(Instant at, const TimeZone& zone);

// What generation counted besides the encounters themselves.
struct GenerationSummary {
    std::vector<std::string> units;
    Exclusions excluded;
    std::int64_t encounters = 0;
    std::int64_t scores = 0;
};

// Called once per kept encounter, unit by unit, in admission order within a
// unit. An arrival that finds every bed taken is turned away and counted in
// Exclusions::encounters_by_reason ("arrival turned away, unit full: <unit>";
// only arrivals inside the period count); a scheduled score that goes missing
// is counted in notes. `scores` holds the usable scores only, in rule order; the span is
// valid during the call only.
using EncounterSink = std::function<void(const Encounter&, std::span<const Score>)>;

// Every score of one encounter: [0] the first, [k] other_scores[k - 1].
using EncounterScoresSink = std::function<void(const Encounter&, std::span<const std::vector<Score>>)>;

// Streaming form: the population never sits in memory at once (one unit's
// current occupants and one encounter's scores at a time). Encounters come
// unit by unit, not in global time order: a consumer that needs time order
// across units (shared staff queues) must merge per-unit streams itself.
GenerationSummary generate_streaming(const GeneratorConfig& config, std::uint64_t seed, std::uint64_t replication,
                                     const EncounterSink& sink);
// The same with the other scores (GeneratorConfig::other_scores) beside the first.
GenerationSummary generate_streaming(const GeneratorConfig& config, std::uint64_t seed, std::uint64_t replication,
                                     const EncounterScoresSink& sink);

// The whole population in memory. Encounters are ordered by unit, then admission.
Population generate_population(const GeneratorConfig& config, std::uint64_t seed, std::uint64_t replication);

// What calibrate_to_auc found.
struct AucCalibration {
    GeneratorConfig config;        // the input with drift_size and outcome probability set
    double achieved_auc = 0.0;     // on the calibration population
    double drift_size = 0.0;
    int populations_generated = 0;
    std::int64_t cases = 0;        // with a usable score, in the calibration population
    std::int64_t controls = 0;
    // The calibration population: `config` over [config.period_start,
    // calibration_period_end), replication 0 of the given seed.
    Instant calibration_period_end = 0;
};

// Sets outcome.probability to the target rate and finds scores.drift_size by
// bisection so that the encounter-level AUC (each encounter's highest usable
// score; Mann-Whitney) of a calibration population matches `target_auc`
// within `auc_tolerance`. With common random numbers the AUC does not
// decrease as the drift grows, so bisection is safe.
//
// The calibration population is not the scenario's period but one long
// enough for about `calibration_cases` expected cases (at least 28 days, at
// most 3 years), starting at period_start: the knob should carry the target
// discrimination, not the sampling noise of a small hospital-month (with
// 1,000 cases the AUC's standard error is about 0.01), and a large hospital
// needs only part of its year. Throws std::invalid_argument, saying which
// AUCs are reachable, when the target is not.
AucCalibration calibrate_to_auc(const GeneratorConfig& config, double target_auc, double target_outcome_rate,
                                std::uint64_t seed, double auc_tolerance = 0.002, double calibration_cases = 1000);

// What calibrate_other_scores found for one further score, on the
// calibration population (replication 0 over [period_start,
// calibration_period_end)): its AUC, and the Spearman rank correlation of
// the stays' highest first score and highest further score (stays with both).
struct OtherScoreReached {
    std::string name;
    std::optional<double> target_auc;
    double drift_size = 0.0;
    double achieved_auc = 0.0;
    double maxima_rank_correlation = 0.0;
    std::int64_t stays = 0;  // with both scores
};
struct OtherScoresCalibration {
    GeneratorConfig config;  // with each targeted score's drift_size set
    std::vector<OtherScoreReached> reached;
    Instant calibration_period_end = 0;
    std::int64_t cases = 0, controls = 0;
};

// Calibrates each other score that has a target AUC the way calibrate_to_auc
// does the first (same bisection, same calibration population), then reports
// what every other score reached. `config` should already carry the first
// score's calibrated drift.
OtherScoresCalibration calibrate_other_scores(const GeneratorConfig& config, std::uint64_t seed,
                                              double auc_tolerance = 0.002, double calibration_cases = 1000);

}  // namespace tocsin
