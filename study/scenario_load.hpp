#pragma once
#include <array>
// The loader's own helpers, shared by study/scenario*.cpp: each reads one part
// of a scenario file through `Section`, which takes every default and range
// from the key's declaration (study/scenario_schema.cpp).
#include <string>
#include <string_view>
#include <vector>

#include <yaml-cpp/yaml.h>

#include "study/scenario.hpp"
#include "study/scenario_keys.hpp"

namespace tocsin::scenario_load {

inline constexpr const char* weekday_names[] = {"monday", "tuesday", "wednesday", "thursday", "friday", "saturday", "sunday"};

Seconds seconds_from_minutes(double minutes);
std::string resolve(const std::string& directory, const std::string& path);
std::string joined(const std::vector<std::string>& names);
Instant timestamp(const Section& s, std::string_view key, const TimeZone& zone);
// A sub-section, or an empty one when it is left out, so that each of its keys
// still reads its declared default.
YAML::Node section_or_empty(const Section& s, std::string_view key);
// A rate by local hour from a list of one number (all day) or of 24 (hour 00
// first), each within the key's declared range; `unit` names it in messages.
std::array<double, 24> hourly_rates(const Section& s, std::string_view key, const std::string& unit);

// population: replay or generate, bootstrap, stress test (study/scenario_load_population.cpp)
void load_population(const Section& top, Scenario& sc);
// roles[] and escalation[] (study/scenario_load_staff.cpp)
std::vector<Role> load_roles(const Section& top, const ShiftPattern& shifts);
EscalationGraph load_escalation(const Section& top, const std::vector<Role>& roles);
// A plan's own escalation list and roster (plans[].escalation, plans[].roster),
// checked against the roles as its tasks find them; needs p.staffing.first_role.
void load_plan_staffing(const Section& s, Plan& p, const SimulationSetup& setup, const std::string& where);
// chart_openings and plans[] (study/scenario_load_plans.cpp)
ChartOpeningSource load_chart_openings(const Section& s, const std::string& directory);
std::vector<Plan> load_plans(const Section& top, const Scenario& sc);

}  // namespace tocsin::scenario_load
