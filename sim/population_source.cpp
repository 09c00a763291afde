#include "sim/population_source.hpp"

#include <memory>

#include "models/replay.hpp"

namespace tocsin {

PopulationFactory population_factory(const Scenario& scenario) {
    auto replayed = std::make_shared<const Population>(load_replay(scenario.replay, scenario.zone));
    return [replayed](std::uint64_t) { return *replayed; };
}

}  // namespace tocsin
