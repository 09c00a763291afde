#pragma once
// The population of each replication, as the scenario declares it. Every
// replication is a pure function of (scenario, seed, replication index).
#include "sim/experiment.hpp"
#include "sim/scenario.hpp"

namespace tocsin {

// Loads what must be loaded once (e.g. a replayed log) and returns a factory
// that makes the population of any replication. Throws InputError on bad input.
PopulationFactory population_factory(const Scenario& scenario);

}  // namespace tocsin
