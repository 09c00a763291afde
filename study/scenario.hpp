#pragma once
// A scenario: where the population comes from, the wall clock, what counts as
// a catch, and the candidate plans. Loaded strictly from YAML (see
// study/scenario_schema.cpp for every key).
#include <cstdint>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "analysis/settings.hpp"
#include "models/population_source.hpp"
#include "sim/setup.hpp"
#include "sim/simulate.hpp"
#include "study/describe.hpp"  // describe_scenario: what `tocsin check` prints

namespace tocsin {

inline constexpr int scenario_schema_version = 1;

// A score as reports name it: what plans call it and what it is called.
struct ScoreLabel {
    std::string name;
    std::string label;
};

// A scenario file, read: each layer's plain input, plus what names the study.
struct Scenario {
    std::string file;               // path as given
    std::uint64_t source_hash = 0;  // FNV-1a of the scenario text, for the run record
    std::string directory;          // for resolving relative paths
    std::string name;
    std::string description;
    std::string time_zone_name;
    std::string score_label = "score";
    std::string score_name = "score";        // what plans call the first score
    std::vector<ScoreLabel> other_scores{};  // population.other_scores, in order
    std::uint64_t replications = 1;
    PopulationSetup population;  // models: where each replication's population comes from
    SimulationSetup simulation;  // sim: plans, staff, shifts, clock, seed
    AnalysisSettings analysis;   // analysis: catch window and reporting period
};

// Throws InputError (file:line:column, key) on any problem.
Scenario load_scenario(const std::string& path);
Scenario parse_scenario(const std::string& yaml_text, const std::string& file_label, const std::string& directory);

// Why this scenario cannot run `replications` replications; empty when it
// can. The `replications` key and the command-line override share it.
std::string replications_problem(const Scenario& scenario, std::uint64_t replications);
// Sets replications from a command-line option's text, with the key's range
// and the check above; an InputError names "command line" and the option.
void override_replications(Scenario& scenario, std::string_view option, const std::string& text);

// The shift calendar of one replication: every stay of the population and the
// declared reporting period.
ShiftCalendar calendar_for(const Scenario& scenario, const Population& population);

}  // namespace tocsin
