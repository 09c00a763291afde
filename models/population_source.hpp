#pragma once
// The population of each replication, as a scenario declares it: the
// replayed log (or its bootstrap resamples), or a generated population, then
// the stress-test shift when one is declared. Every replication is a pure
// function of (setup, replication index).
#include <cstdint>
#include <functional>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "models/bootstrap.hpp"
#include "models/generator.hpp"
#include "models/population.hpp"
#include "models/replay.hpp"
#include "models/stress.hpp"
#include "models/time.hpp"

namespace tocsin {

enum class PopulationSource { replay, generate };

// Where a key sits in the scenario file, for errors found after loading.
struct KeyLocation {
    long line = 0;
    long column = 0;
};

struct PopulationSetup {
    PopulationSource source = PopulationSource::replay;
    ReplaySource replay;                       // source == replay
    std::optional<BootstrapConfig> bootstrap;  // replay: how replications 1, 2, ... resample the log
    GeneratorConfig generator;                 // source == generate
    std::optional<double> target_auc;          // generate: calibrate scores.drift_size to this
    std::optional<ShiftStress> shift;          // stress test applied to every replication
    TimeZone zone = TimeZone::utc();           // the log's local times
    std::uint64_t seed = 1;
    // generate: which of its log's benefit or burden figures a fitted
    // population does not reproduce (`tocsin fit --check`); empty: none known.
    std::string fit_check;
    // Where target_auc and shift were declared, so errors found while
    // preparing name the scenario file's line.
    std::string file;
    KeyLocation target_auc_at, shift_at, bootstrap_at, other_scores_at;
};

// What is worth doing once per scenario rather than once per replication:
// reading the log, or calibrating the generator to a target AUC.
struct PreparedPopulation {
    // replay; shared so that copies of the prepared population (a factory's,
    // replication 0 of a plain replay) never copy a year of scores
    std::shared_ptr<const Population> log;
    std::optional<EligibleDays> bootstrap_days;  // replay with bootstrap: the days it draws from
    GeneratorConfig generator;                  // generate, after calibration
    std::optional<AucCalibration> calibration;  // generate with target_auc
    std::optional<OtherScoresCalibration> other_scores;  // generate with other scores: what each reached
};

// Throws InputError (naming the scenario key) on bad input, when a target AUC
// is out of reach, when a shift names a unit the log does not have, or when
// the bootstrap has no eligible day.
PreparedPopulation prepare_population(const PopulationSetup& setup);
// The same for a replayed scenario whose log was read elsewhere (by another
// process, which sent it): everything but the reading.
PreparedPopulation prepare_population(const PopulationSetup& setup, Population log);

// Replication 0 of a replayed scenario is the log as replayed.
Population population_for(const PopulationSetup& setup, const PreparedPopulation& prepared, std::uint64_t replication);

// Whether replication 0 is the log itself (a replay without a stress test),
// so that its figures are the log's own.
bool replication_zero_is_the_log(const PopulationSetup& setup);
// What replication 0 is, for a table's basis: "the log as replayed",
// "replication 0: one generated population", ...
std::string replication_zero_basis(const PopulationSetup& setup);

// A line or two on where the population comes from (calibration result, the
// days a bootstrap draws from), for `check` and `run`.
std::string describe_prepared(const PopulationSetup& setup, const PreparedPopulation& prepared);
// One line per generated further score: the AUC and the rank correlation of
// stay maxima with the first score it reached (part of describe_prepared,
// and of a run report's assumptions).
std::vector<std::string> other_scores_reached(const PreparedPopulation& prepared);

// Makes the population of any replication (safe to call from several threads
// at once). Shared and read-only: replication 0 of a plain replay is the
// prepared log itself, not a copy of it.
using PopulationFactory = std::function<std::shared_ptr<const Population>(std::uint64_t replication)>;

// The first form prepares the population itself.
PopulationFactory population_factory(const PopulationSetup& setup);
PopulationFactory population_factory(const PopulationSetup& setup, const PreparedPopulation& prepared);

}  // namespace tocsin
