#pragma once
// Channel-by-channel burden, so the four channels can be compared side by side
// in the unit a nurse manager would count them in:
//   page                 notices per unit per shift
//   chart_interruption   interruptions per clinician per shift (unit x shift x
//                        opening role, divided by the role's clinicians_per_unit)
//   handoff_list         patients flagged per unit per handoff
//   ranked_review        patients reviewed per review round (per unit or hospital-wide)
// Each over the reporting period, zeros included, with the staff minutes the
// deliveries themselves take in the same unit. Catches and lead times are in
// plan_summary and are computed the same way for every channel.
#include <optional>

#include "analysis/results.hpp"
#include "analysis/table.hpp"
#include "models/chart_openings.hpp"

namespace tocsin {

struct ChannelBurden {
    std::string measure;          // what one value counts, in words
    std::vector<double> values;   // one per unit-shift, clinician-shift, handoff or round
    std::vector<double> minutes;  // delivery minutes, same positions
};

ChannelBurden channel_burden(const SimulationSetup& setup, const Population& population, const ShiftCalendar& calendar,
                             const ReportingShifts& reporting, const Plan& plan, const PlanRecord& record);

struct ChannelTables {
    Table channel_burden;       // one row per plan
    Table rounds;               // every handoff and review round
    Table chart_interruptions;  // interruptions per unit x shift x role, per plan
};

ChannelTables channel_tables(const SimulationSetup& setup, const AnalysisSettings& settings, const Population& population, const ShiftCalendar& calendar,
                             const ReplicationRecord& record);

// Rows for the exclusions table from a replayed chart-opening log.
void add_chart_opening_exclusions(Table& exclusions, const ChartOpeningLog& log);

}  // namespace tocsin
