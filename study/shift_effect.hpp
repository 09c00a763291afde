#pragma once
// What a stress-test shift changed: the same plans on the same (shifted)
// populations, with figures split at the shift's start. Notices per unit per
// night count complete night shifts wholly before or wholly after the start
// (a night that straddles it counts in neither); sensitivity splits cases by
// whether time zero falls before or after it. Changes are paired by
// replication (after - before in the same replication), with the interval of
// analysis/comparison.hpp (Student t over replications).
#include <string>

#include "analysis/table.hpp"
#include "study/experiment.hpp"
#include "study/scenario.hpp"

namespace tocsin {

struct ShiftEffect {
    Table table;       // "shift_effect": plan, metric, before/after/change with 95% intervals
    std::string text;  // terminal summary
};

// Requires scenario.population.shift. Runs every replication once more (same streams,
// so the populations are those of the main run).
ShiftEffect shift_effect(const Scenario& scenario, const PopulationFactory& make_population, unsigned threads);

}  // namespace tocsin
