#pragma once
// Channel-by-channel burden, so the four channels can be compared side by side
// in the unit a nurse manager would count them in:
//   page                 notices per unit per shift
//   chart_interruption   interruptions per clinician per shift (unit x shift x
//                        opening role, divided by the role's clinicians_per_unit)
//   handoff_list         patients flagged per unit per handoff
//   ranked_review        patients reviewed per review round (per unit or hospital-wide)
//   score_lookup         look-ups per clinician per shift (as chart_interruption)
// Each over the reporting period, zeros included, with the staff minutes the
// deliveries themselves take in the same unit. Catches and lead times are in
// plan_summary and are computed the same way for every channel.
#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "analysis/reporting.hpp"
#include "sim/setup.hpp"
#include "sim/simulate.hpp"
#include "models/chart_openings.hpp"

namespace tocsin {

struct ChannelBurden {
    std::string measure;          // what one value counts, in words
    std::vector<double> values;   // one per unit-shift, clinician-shift, handoff or round
    std::vector<double> minutes;  // delivery minutes, same positions
};

ChannelBurden channel_burden(const SimulationSetup& setup, const Population& population, const ShiftCalendar& calendar,
                             const ReportingShifts& reporting, const Plan& plan, const PlanRecord& record);

// One plan's burden summarised over the reporting period.
struct ChannelBurdenSummary {
    std::string plan;
    Channel channel{};
    std::int64_t occasions = 0, notices = 0, evaluations = 0;
    double delivery_minutes = 0;  // all the plan's notices
    std::string burden;           // what one value counts (ChannelBurden::measure)
    std::optional<double> burden_mean, burden_p90, burden_max, minutes_mean, minutes_p90;  // empty: no value
};

// One handoff list or review round.
struct ReportedRound {
    std::string plan;
    Channel channel{};
    std::string scope;  // unit name, or "hospital"
    Instant at = 0;
    std::int64_t listed = 0, acted = 0;
    double minutes = 0;
};

// Chart interruptions of one opening role on one unit in one reporting shift.
struct ChartInterruptionCount {
    std::string plan, unit, role;
    Instant shift_start = 0;
    std::string shift;
    double interruptions = 0, clinicians = 0, per_clinician = 0, minutes = 0;
};

struct ChannelResults {
    std::vector<ChannelBurdenSummary> burden;                // one per plan
    std::vector<ReportedRound> rounds;                       // every handoff and review round
    std::vector<ChartInterruptionCount> chart_interruptions; // per unit x shift x role, per plan
};

ChannelResults channel_results(const SimulationSetup& setup, const ReportingShifts& reporting, const Population& population,
                               const ShiftCalendar& calendar, const ReplicationRecord& record);

}  // namespace tocsin
