#pragma once
// The population of each replication, as the scenario declares it: the
// replayed log (or its bootstrap resamples), or a generated population, then
// the stress-test shift when one is declared. Every replication is a pure
// function of (scenario, seed, replication index).
#include <cstdint>
#include <optional>
#include <string>

#include "models/generator.hpp"
#include "models/population.hpp"
#include "sim/experiment.hpp"
#include "sim/scenario.hpp"

namespace tocsin {

// What is worth doing once per scenario rather than once per replication:
// reading the log, or calibrating the generator to a target AUC.
struct PreparedPopulation {
    std::optional<Population> log;              // replay
    GeneratorConfig generator;                  // generate, after calibration
    std::optional<AucCalibration> calibration;  // generate with target_auc
};

// Throws InputError (naming the scenario key) on bad input, when a target AUC
// is out of reach, or when a shift names a unit the log does not have.
PreparedPopulation prepare_population(const Scenario& scenario);

// Replication 0 of a replayed scenario is the log as replayed.
Population population_for(const Scenario& scenario, const PreparedPopulation& prepared, std::uint64_t replication);

// A line or two on where the population comes from (calibration result), for `check` and `run`.
std::string describe_prepared(const Scenario& scenario, const PreparedPopulation& prepared);

// A factory that makes the population of any replication (safe to call from
// several threads at once). The first form prepares the population itself.
PopulationFactory population_factory(const Scenario& scenario);
PopulationFactory population_factory(const Scenario& scenario, const PreparedPopulation& prepared);

}  // namespace tocsin
