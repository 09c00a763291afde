#pragma once
// One replication: every plan of a scenario run over the same population
// (common random numbers), recording every notice.
#include <cstdint>
#include <optional>
#include <utility>
#include <vector>

#include "models/phase_log.hpp"
#include "models/population.hpp"
#include "sim/fatigue.hpp"
#include "sim/notice.hpp"
#include "sim/setup.hpp"
#include "sim/shifts.hpp"
#include "sim/staff.hpp"

namespace tocsin {

struct PlanRecord {
    std::vector<Notice> notices;  // in time order (ties: encounter, then score order)
    // The tasks those notices gave the staff, one per notice that asks for an
    // evaluation, in notice order (TaskRecord::notice indexes `notices`);
    // present when the scenario declares roles, except for a ranked review
    // (its review team does the reviews, within the review's own capacity).
    std::optional<StaffRun> staff;
    // Evaluation instants the rule was asked at: usable scores (page), chart
    // openings by the plan's roles, unit handoffs, review rounds per scope.
    std::int64_t occasions = 0;
    std::vector<Round> rounds;  // handoff list and ranked review, in time order
    // Ranked review: (encounter, round instant) for every patient on a top-N
    // list, reviewed or left over by the team's capacity.
    std::vector<std::pair<std::uint32_t, Instant>> listed;
    // When the plan declares fatigue: the load each notice met, one per notice.
    std::vector<NoticeLoad> loads;
};

struct ReplicationRecord {
    std::uint64_t replication = 0;
    std::vector<PlanRecord> plans;  // one per scenario plan, same order
};

// The shift calendar covering every stay of the population and the instants
// cover_from and cover_until when given (a declared reporting period).
ShiftCalendar calendar_for(const SimulationSetup& setup, const Population& population, std::optional<Instant> cover_from,
                           std::optional<Instant> cover_until);

// Runs every plan on the population, then (when the scenario declares roles)
// each plan's notices through its own staff (task minutes keyed per task, see
// sim/staff.hpp). `threads` splits encounters into blocks; the record is identical
// whatever the thread count. Chart-interruption plans read `replayed_openings`
// when the scenario replays chart openings (see load_chart_openings), and
// generate them otherwise.
ReplicationRecord simulate_replication(const SimulationSetup& setup, const Population& population,
                                       const ShiftCalendar& calendar, std::uint64_t replication,
                                       unsigned threads = 1, const ChartOpeningLog* replayed_openings = nullptr,
                                       PhaseLog* phases = nullptr);

}  // namespace tocsin
