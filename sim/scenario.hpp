#pragma once
// A scenario: where the population comes from, the wall clock, what counts as
// a catch, and the candidate plans. Loaded strictly from YAML (see
// sim/scenario_schema.cpp for every key).
#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "models/chart_openings.hpp"
#include "models/replay.hpp"
#include "models/time.hpp"
#include "sim/channel_types.hpp"
#include "sim/notice.hpp"
#include "sim/rules.hpp"
#include "sim/shifts.hpp"

namespace tocsin {

inline constexpr int scenario_schema_version = 1;

struct Plan {
    std::string name;
    std::string description;
    Channel channel = Channel::page;
    std::string role;  // who answers
    Rule rule;
    ChartSettings chart;      // channel chart_interruption
    HandoffSettings handoff;  // channel handoff_list
    ReviewSettings review;    // channel ranked_review (its skip window is rule.snooze)
};

struct Scenario {
    std::string file;         // path as given
    std::string directory;    // for resolving relative paths
    std::string name;
    std::string description;
    std::string time_zone_name;
    TimeZone zone = TimeZone::utc();
    std::uint64_t seed = 1;
    ShiftPattern shifts;
    Seconds window = hours(24);   // a catch starts no earlier than window before time zero
    Seconds min_lead = 0;         // ... and at least min_lead before it
    std::string score_label = "score";
    ReplaySource replay;
    std::optional<Instant> period_start, period_end;  // reporting period, when declared
    std::vector<Plan> plans;
    std::optional<ChartOpeningSource> chart_openings;  // needed by chart-interruption plans
};

// Throws InputError (file:line:column, key) on any problem.
Scenario load_scenario(const std::string& path);
Scenario parse_scenario(const std::string& yaml_text, const std::string& file_label, const std::string& directory);

// Plain-words description of what will be simulated, for `tocsin check`.
std::string describe_scenario(const Scenario& scenario);
std::string describe_rule(const Rule& rule, const std::string& score_label);

}  // namespace tocsin
