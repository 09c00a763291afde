#pragma once
// Sweeps: vary plan or staffing parameters over lists or ranges without
// editing the scenario. Several axes make a grid. The grid is built on the
// scenario's YAML, so every generated plan goes through the same strict
// loader as a hand-written one.
//
// An axis is "PATH=VALUES". PATH is dotted and starts with "plan." (a key of
// the swept plan, e.g. "plan.rule.threshold") or "roles.<role>." (staffing of
// the role the swept plan pages, e.g. "roles.cover nurse.roster.night"); a
// list item on the way is picked by its position or by its `name`. VALUES is
// "a,b,c" or "from:to:step" (numbers, inclusive). A value is a number or, for
// a text key, text (e.g. plan.review.scope=unit,hospital); for a list key the
// items are joined by '+' (plan.review.times=08:00,08:00+20:00). The key
// schema (study/scenario_schema.cpp) says which a key takes.
//
// A generated plan is named "<base> <tag><value> ...", short enough to read in
// a chart: the tag is a short form of the varied key (t = threshold, s =
// snooze_minutes, otherwise the key's own name) and a text value follows an
// '='; its description spells every key and value out.
#include <string>
#include <vector>

#include "study/scenario.hpp"

namespace tocsin {

// A grid holds at most this many plans. Each plan is simulated in every
// replication, so a larger grid is almost always a mistyped step; its size is
// worked out from the axes before any value or plan is built.
inline constexpr std::size_t sweep_plan_limit = 5000;

struct SweepAxis {
    std::string path;
    // As they will be written into the scenario: a number in its shortest
    // exact text, or text (list items joined by '+').
    std::vector<std::string> values;
    // Where the axis was given, for errors: "--vary" on the command line or
    // an item of the scenario's sweep.vary.
    std::string file = "command line";
    long line = 0;
    long column = 0;
    std::string field = "--vary";
};

// Throws InputError (command line, --vary) saying what was expected; a range
// with more than `max_values` values is refused before it is built.
SweepAxis parse_sweep_axis(const std::string& spec, std::size_t max_values = sweep_plan_limit);

struct SweepRequest {
    std::string base_plan;         // name of the plan to vary; empty = the scenario's `sweep.plan` or first plan
    std::vector<SweepAxis> axes;   // empty = the scenario's `sweep.vary`
    bool keep_other_plans = false; // also run the scenario's other plans as they are
    std::size_t max_plans = sweep_plan_limit;
};

// The scenario with its plans replaced by the grid (named as above). Every
// problem is an InputError naming the axis (option or scenario line) it
// comes from.
Scenario sweep_scenario(const std::string& scenario_path, const SweepRequest& request);

// Where each plan of a swept scenario sits on the grid, for views that move
// along one axis at a time (the what-if page).
struct SweepGrid {
    std::vector<SweepAxis> axes;  // the axes swept, values as written into the scenario
    // Per plan, in the scenario's plan order: the index of its value on each
    // axis; empty for a plan kept as written (keep_other_plans).
    std::vector<std::vector<std::size_t>> positions;
};
struct SweptScenario {
    Scenario scenario;
    SweepGrid grid;
};
SweptScenario sweep_with_grid(const std::string& scenario_path, const SweepRequest& request);

}  // namespace tocsin
