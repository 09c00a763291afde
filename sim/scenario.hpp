#pragma once
// A scenario: where the population comes from, the wall clock, what counts as
// a catch, and the candidate plans. Loaded strictly from YAML (see
// sim/scenario_schema.cpp for every key).
#include <cstdint>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "models/bootstrap.hpp"
#include "models/generator.hpp"
#include "models/chart_openings.hpp"
#include "models/replay.hpp"
#include "models/stress.hpp"
#include "models/time.hpp"
#include "sim/channel_types.hpp"
#include "sim/notice.hpp"
#include "sim/rules.hpp"
#include "sim/shifts.hpp"
#include "sim/staff.hpp"

namespace tocsin {

inline constexpr int scenario_schema_version = 1;

struct Plan {
    std::string name;
    std::string description;
    Channel channel = Channel::page;
    std::string role;  // who answers
    Rule rule;
    StaffPlan staffing;  // first_role indexes Scenario::roles (when roles are declared)
    ChartSettings chart;      // channel chart_interruption
    HandoffSettings handoff;  // channel handoff_list
    ReviewSettings review;    // channel ranked_review (its skip window is rule.snooze)
};

enum class PopulationSource { replay, generate };

// Where a key sits in the scenario file, for errors found after loading.
struct KeyLocation {
    long line = 0;
    long column = 0;
};

struct Scenario {
    std::string file;         // path as given
    std::uint64_t source_hash = 0;  // FNV-1a of the scenario text, for the run record
    std::string directory;    // for resolving relative paths
    std::string name;
    std::string description;
    std::string time_zone_name;
    TimeZone zone = TimeZone::utc();
    std::uint64_t seed = 1;
    std::uint64_t replications = 1;
    ShiftPattern shifts;
    Seconds window = hours(24);   // a catch starts no earlier than window before time zero
    Seconds min_lead = 0;         // ... and at least min_lead before it
    std::string score_label = "score";
    PopulationSource source = PopulationSource::replay;
    ReplaySource replay;                       // source == replay
    std::optional<BootstrapConfig> bootstrap;  // replay: how replications 1, 2, ... resample the log
    GeneratorConfig generator;                 // source == generate (zone = the scenario's)
    std::optional<double> target_auc;          // generate: calibrate scores.drift_size to this
    KeyLocation target_auc_at;
    std::optional<ShiftStress> shift;          // stress test applied to every replication
    KeyLocation shift_at;
    std::optional<Instant> period_start, period_end;  // reporting period, when declared
    std::vector<Plan> plans;
    // Staff (optional). Without roles a notice counts as evaluated at once.
    std::vector<Role> roles;
    EscalationGraph escalation;  // over `roles`, validated at load
    bool has_staff() const { return !roles.empty(); }
    std::optional<ChartOpeningSource> chart_openings;  // needed by chart-interruption plans
};

// The staff of a scenario for a population with `unit_count` units.
StaffModel staff_model(const Scenario& scenario, std::uint32_t unit_count);

// Throws InputError (file:line:column, key) on any problem.
Scenario load_scenario(const std::string& path);
Scenario parse_scenario(const std::string& yaml_text, const std::string& file_label, const std::string& directory);

// Why this scenario cannot run `replications` replications; empty when it
// can. The `replications` key and the command-line override share it.
std::string replications_problem(const Scenario& scenario, std::uint64_t replications);
// Sets replications from a command-line option's text, with the key's range
// and the check above; an InputError names "command line" and the option.
void override_replications(Scenario& scenario, std::string_view option, const std::string& text);

// Plain-words description of what will be simulated, for `tocsin check`.
std::string describe_scenario(const Scenario& scenario);
std::string describe_rule(const Rule& rule, const std::string& score_label);

}  // namespace tocsin
