#pragma once
// Sweeps: vary numeric plan or staffing parameters over lists or ranges
// without editing the scenario. Several axes make a grid. The grid is built on
// the scenario's YAML, so every generated plan goes through the same strict
// loader as a hand-written one.
//
// An axis is "PATH=VALUES". PATH is dotted and starts with "plan." (a key of
// the swept plan, e.g. "plan.rule.threshold") or "roles.<role>." (staffing of
// the role the swept plan pages, e.g. "roles.cover nurse.roster.night"); a
// list item on the way is picked by its position or by its `name`. VALUES is
// "a,b,c" or "from:to:step" (inclusive).
#include <string>
#include <vector>

#include "sim/scenario.hpp"

namespace tocsin {

struct SweepAxis {
    std::string path;
    std::vector<double> values;
};

// Throws std::runtime_error saying what was expected.
SweepAxis parse_sweep_axis(const std::string& spec);

struct SweepRequest {
    std::string base_plan;         // name of the plan to vary; empty = the scenario's `sweep.plan` or first plan
    std::vector<SweepAxis> axes;   // empty = the scenario's `sweep.vary`
    bool keep_other_plans = false; // also run the scenario's other plans as they are
    std::size_t max_plans = 5000;
};

// The scenario with its plans replaced by the grid (each named
// "<base> key=value, key=value"). Throws InputError / std::runtime_error.
Scenario sweep_scenario(const std::string& scenario_path, const SweepRequest& request);

}  // namespace tocsin
