#pragma once
// What a simulation runs: the candidate plans, the staff who answer and how
// work escalates, the shift pattern and wall clock, and the seed. It is a
// plain value; the study layer fills it from a scenario file.
#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "models/chart_openings.hpp"
#include "models/time.hpp"
#include "sim/channel_types.hpp"
#include "sim/escalation.hpp"
#include "sim/fatigue.hpp"
#include "sim/notice.hpp"
#include "sim/rules.hpp"
#include "sim/shifts.hpp"
#include "sim/staff.hpp"

namespace tocsin {

struct Plan {
    std::string name;
    std::string description;
    Channel channel = Channel::page;
    std::size_t score = 0;  // the score its rule reads: 0 the first, k Population::other_scores[k - 1]
    std::string role;  // who answers
    Rule rule;
    StaffPlan staffing;       // first_role indexes SimulationSetup::roles (when roles are declared)
    ChartSettings chart;      // channel chart_interruption
    HandoffSettings handoff;  // channel handoff_list
    ReviewSettings review;    // channel ranked_review
    // Page and chart interruption: response that falls with load; none: off.
    std::optional<FatigueEffect> fatigue;
    // The plan's own staffing, when it declares one; otherwise the scenario's.
    // A review answered by the nurse who also takes pages need not escalate
    // the way the pages do.
    std::optional<EscalationGraph> escalation;  // replaces SimulationSetup::escalation for this plan's tasks
    std::optional<Roster> roster;               // replaces the roster of the role it pages (staffing.first_role)
};

struct SimulationSetup {
    TimeZone zone = TimeZone::utc();
    ShiftPattern shifts;
    std::uint64_t seed = 1;
    std::vector<Plan> plans;
    // Staff (optional). Without roles a notice counts as evaluated at once.
    std::vector<Role> roles;
    EscalationGraph escalation;  // over `roles`
    std::optional<ChartOpeningSource> chart_openings;  // needed by chart-interruption plans
    bool has_staff() const { return !roles.empty(); }
};

// The staff who answer `plan`'s notices for a population with `unit_count`
// units: the scenario's roles and escalation, with the plan's own escalation
// and roster in their place when it declares them.
StaffModel staff_model(const SimulationSetup& setup, const Plan& plan, std::uint32_t unit_count);

// The rule a plan's channel applies. A ranked review keeps a patient off the
// lists for its skip window after a review, which is the rule engine's snooze.
Rule channel_rule(const Plan& plan);

}  // namespace tocsin
