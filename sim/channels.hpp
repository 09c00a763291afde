#pragma once
// The channels besides the page, on the same rule engine (RuleState):
// - chart interruption: the rule is asked at each chart opening, on the latest
//   score available at that instant (available_at <= opening);
// - handoff list: at each handoff, every current inpatient whose rule fires
//   on the latest available score is flagged;
// - ranked review: at each review time, the top N current inpatients by latest
//   available score whose rule would fire (the threshold is the floor; the
//   snooze is the "reviewed within the last H hours" skip) are listed, and the
//   team reviews them within its capacity.
// A current inpatient at T: admitted <= T < min(discharged, outcome).
//
// Ranked review order (deterministic, whatever the input row order): higher
// latest score first; then the patient whose latest score became available
// earlier (high for longer); then encounter id in text order. With a per-unit
// scope and a team capacity, reviews are taken rank by rank across units
// (every unit's first, then every unit's second, ... units in name order)
// until the capacity is used.
#include <cstdint>
#include <span>
#include <vector>

#include "models/chart_openings.hpp"
#include "models/population.hpp"
#include "sim/rules.hpp"
#include "sim/setup.hpp"
#include "sim/simulate.hpp"

namespace tocsin {

// Staff minutes one notice's delivery takes (the interruption, the handoff
// discussion of a flagged patient, the review), apart from any evaluation task
// it creates; a page's delivery is counted as none.
double delivery_minutes(const Plan& plan);

// One encounter's chart openings in one replication, with one acceptance draw
// (uniform on [0, 1)) per opening shared by every plan (common random numbers).
// The draw is keyed by the opening itself: (encounter, opening role's name,
// instant, occurrence among earlier openings by that role at that instant), so
// it does not move when openings by another role are added or removed.
struct EncounterOpenings {
    std::vector<ChartOpening> openings;
    std::vector<double> acceptance_draws;
    std::vector<double> lookup_draws;      // only when a look-up plan is declared
    std::vector<std::uint64_t> role_keys;  // text_entity of each opening role's name, filled on first use
};

// Replayed (from `replayed`) or generated openings of encounter `e`, with
// their acceptance draws and, `with_lookups`, their look-up draws.
void openings_for_encounter(const SimulationSetup& setup, const Population& population,
                            const ChartOpeningLog* replayed, std::size_t e, std::uint64_t replication,
                            EncounterOpenings& out,
                            bool with_lookups = false);

// The chart-interruption rule of one plan for one encounter. Appends notices in
// time order and returns the number of openings the rule was asked at.
std::int64_t fire_chart_rule(const Plan& plan, const RuleClock& clock, std::span<const Score> scores,
                             const EncounterOpenings& openings, std::uint32_t encounter, std::uint32_t unit,
                             std::uint32_t plan_index, std::vector<Notice>& out);

// The look-up channel of one plan for one encounter: at each opening by its
// role, the opener looks the score up when the opening's look-up draw is below
// the probability for its local hour; every look-up is a notice (it costs the
// look-up minutes), and it asks for an evaluation when the rule fires on the
// latest score then. Returns the number of openings considered.
std::int64_t fire_lookup_rule(const Plan& plan, const RuleClock& clock, std::span<const Score> scores,
                              const EncounterOpenings& openings, std::uint32_t encounter, std::uint32_t unit,
                              std::uint32_t plan_index, std::vector<Notice>& out);

// Every instant in [from, to] whose local time of day is one of `times_minutes`.
// A time in a skipped hour (clocks go forward) moves forward by the gap; one in a
// repeated hour (clocks go back) is taken once, at its earlier instant.
std::vector<Instant> daily_instants(const std::vector<int>& times_minutes, const TimeZone& zone, Instant from,
                                    Instant to);

// A handoff-list or ranked-review plan as a sweep over its rounds in time order,
// keeping the census of current inpatients. `plan` overrides setup.plans[plan_index]
// (used to size a review list without copying the setup).
PlanRecord run_round_channel(const SimulationSetup& setup, const Population& population, const ShiftCalendar& calendar,
                             const Plan& plan, std::uint32_t plan_index, std::uint64_t replication);

}  // namespace tocsin
