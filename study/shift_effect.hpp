#pragma once
// What a stress-test shift changed: the same plans on the same (shifted)
// populations, with figures split at the shift's start. Notices per unit per
// night count complete night shifts wholly before or wholly after the start
// (a night that straddles it counts in neither); sensitivity splits cases by
// whether time zero falls before or after it. Changes are paired by
// replication (after - before in the same replication), with the interval of
// analysis/comparison.hpp (Student t over replications).
#include <cstdint>
#include <string>
#include <vector>

#include "analysis/comparison.hpp"
#include "study/experiment.hpp"
#include "study/scenario.hpp"

namespace tocsin {

// The figures split at the shift, in this order for each plan.
enum class ShiftEffectMetric { per_unit_night_mean, per_unit_shift_mean, sensitivity };
std::string_view to_string(ShiftEffectMetric metric);

// One figure of one plan before and after the shift's start. `before` and
// `after` are over the replications where each is defined; `change` over those
// where both are (its n is the replications column).
struct ShiftEffectFigure {
    std::string plan;
    ShiftEffectMetric metric{};
    MeanInterval before, after, change;
};

struct ShiftEffect {
    Instant from = 0;  // the shift's start
    std::uint64_t replications = 0;
    std::vector<ShiftEffectFigure> figures;  // plans in scenario order, metrics in enum order
};

// Requires scenario.population.shift. Runs every replication once more (same streams,
// so the populations are those of the main run).
ShiftEffect shift_effect(const Scenario& scenario, const PopulationFactory& make_population, unsigned threads);

}  // namespace tocsin
