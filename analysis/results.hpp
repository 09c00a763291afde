#pragma once
// What a run reports, computed from the records of a replication. Every
// figure and its column name is defined in README, "Output columns"; the
// names are stable.
#include <optional>
#include <vector>

#include "analysis/table.hpp"
#include "models/population.hpp"
#include "analysis/settings.hpp"
#include "sim/setup.hpp"
#include "sim/simulate.hpp"

namespace tocsin {

// The complete shifts whose per-unit counts are reported.
struct ReportingShifts {
    std::vector<std::size_t> shifts;  // indices into the calendar, ascending
    Instant from = 0, until = 0;
};
ReportingShifts reporting_shifts(const AnalysisSettings& settings, const Population& population, const ShiftCalendar& calendar);

struct PlanFigures {
    std::int64_t notices = 0;
    std::int64_t notices_first = 0, notices_repeat = 0, notices_rise = 0;
    // Per unit-shift over the reporting shifts (every unit x shift, zeros included).
    double per_unit_shift_mean = 0, per_unit_shift_p90 = 0, per_unit_shift_max = 0;
    std::optional<double> per_unit_night_mean, per_unit_night_p90, per_unit_night_max;
    std::int64_t cases = 0, caught = 0, missed = 0;
    std::int64_t evaluated_non_cases = 0;  // encounters without the outcome that had an evaluation
    std::optional<double> sensitivity;
    std::optional<double> lead_median_hours, lead_q1_hours, lead_q3_hours;
    std::optional<double> notices_per_catch;
    // With staff, catches and lead count from evaluation starts;
    // these say what the notices alone would have caught, had evaluation been instant.
    std::int64_t evaluations = 0;  // tasks started (= notices without staff)
    std::int64_t caught_by_notice = 0;
    std::optional<double> lead_from_notice_median_hours;
    std::optional<double> wait_median_minutes, wait_p90_minutes;  // notice to evaluation start
    std::optional<std::int64_t> never_taken_up;
    std::vector<std::int64_t> unit_shift_counts;  // unit-major: [unit * shifts + k]
};

// First instant, per encounter, of a catching action; nothing when not caught.
// `action_at` lists (encounter, instant) pairs in any order.
std::vector<std::optional<Instant>> first_catch(const AnalysisSettings& settings, const Population& population,
                                                const std::vector<std::pair<std::uint32_t, Instant>>& actions);

PlanFigures plan_figures(const AnalysisSettings& settings, const Population& population, const ShiftCalendar& calendar,
                         const ReportingShifts& reporting, const PlanRecord& record);

struct RunTables {
    Table plan_summary;
    Table unit_shift_notices;  // the data behind the per-shift distributions
    Table exclusions;
    std::optional<Table> notice_log;  // opt-in: holds encounter ids
    // When the scenario declares roles (analysis/workload.hpp):
    std::optional<Table> staff_workload, staff_escalations, task_fates;
    std::optional<Table> task_log;    // opt-in: holds encounter ids
    Table channel_burden;             // each channel's burden in its own unit (analysis/channel_tables.hpp)
    Table rounds;                     // handoff lists and review rounds
    Table chart_interruptions;        // per unit x shift x opening role
};

// `replayed_openings`: the replayed chart-opening log, for its exclusions.
RunTables run_tables(const SimulationSetup& setup, const AnalysisSettings& settings, const Population& population, const ShiftCalendar& calendar,
                     const ReplicationRecord& record, bool with_notice_log, bool with_task_log = false,
                     const ChartOpeningLog* replayed_openings = nullptr);

// Parts of the terminal summary: the population and exclusions; the plan table.
std::string run_header_text(const std::string& title, const TimeZone& zone, const Population& population, const RunTables& tables,
                            const ReportingShifts& reporting);
std::string plan_summary_text(const RunTables& tables);
// A readable terminal summary of a run of one replication.
std::string run_summary_text(const std::string& title, const TimeZone& zone, const Population& population, const RunTables& tables,
                             const ReportingShifts& reporting);

}  // namespace tocsin
