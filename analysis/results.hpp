#pragma once
// What a run reports, computed from the records of a replication. Every
// figure and its column name is defined in README, "Output columns"; the
// names are stable.
#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "analysis/channel_burden.hpp"
#include "analysis/reporting.hpp"
#include "analysis/workload.hpp"
#include "models/chart_openings.hpp"
#include "models/population.hpp"
#include "analysis/settings.hpp"
#include "sim/setup.hpp"
#include "sim/simulate.hpp"

namespace tocsin {

struct PlanFigures {
    std::int64_t notices = 0;
    std::int64_t notices_first = 0, notices_repeat = 0, notices_rise = 0;
    // Per unit-shift over the reporting shifts (every unit x shift, zeros included).
    double per_unit_shift_mean = 0, per_unit_shift_p90 = 0, per_unit_shift_max = 0;
    std::optional<double> per_unit_night_mean, per_unit_night_p90, per_unit_night_max;
    // Distinct encounters with at least one notice, per unit x reporting night shift.
    std::optional<double> patients_per_unit_night_mean, patients_per_unit_night_p90, patients_per_unit_night_max;
    // Over the whole run, as `notices`: the share of notices sent before time zero
    // to patients who went on to the outcome, and of the patients noticed at
    // least once, the share who went on to it. Nothing when there was no notice.
    std::optional<double> notice_ppv, patient_ppv;
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
    // Burdens that need the plan itself (add_plan_burdens). The channel's own
    // unit (analysis/channel_burden.hpp: pages per unit per shift, interruptions
    // per clinician per shift, flags per handoff, reviews per round), and two
    // that mean the same for every channel, per unit per reporting shift: staff
    // minutes (delivery plus evaluation tasks; only with roles) and evaluations started.
    std::optional<double> channel_burden_mean, channel_burden_p90;
    std::optional<double> staff_minutes_per_unit_shift, evaluations_per_unit_shift;
    std::vector<std::int64_t> unit_shift_counts;  // unit-major: [unit * shifts + k]
};

// First instant, per encounter, of a catching action; nothing when not caught.
// `action_at` lists (encounter, instant) pairs in any order.
std::vector<std::optional<Instant>> first_catch(const AnalysisSettings& settings, const Population& population,
                                                const std::vector<std::pair<std::uint32_t, Instant>>& actions);

PlanFigures plan_figures(const AnalysisSettings& settings, const Population& population, const ShiftCalendar& calendar,
                         const ReportingShifts& reporting, const PlanRecord& record);

// Fills the figures that need the plan: the channel's burden in its own unit
// and the channel-neutral burdens, over the reporting period.
void add_plan_burdens(PlanFigures& figures, const SimulationSetup& setup, const Population& population,
                      const ShiftCalendar& calendar, const ReportingShifts& reporting, const Plan& plan,
                      const PlanRecord& record);

// The population a run used, in summary (the population itself is not kept:
// a replayed year holds tens of millions of scores).
struct PopulationSummary {
    std::size_t encounters = 0, units = 0, scores = 0;
    std::int64_t cases = 0;  // encounters with the outcome
    std::size_t reporting_shifts = 0;
    Instant from = 0, until = 0;  // the reporting period
};
PopulationSummary population_summary(const Population& population, const ReportingShifts& reporting);

// Input left out or adjusted, by reason.
enum class Excluded { encounters, scores, notes, skipped_rows, chart_openings, chart_opening_timestamps };
struct Exclusion {
    Excluded what{};
    std::string reason;
    std::int64_t count = 0;
    SkippedRows rows;  // skipped rows: how many and the first lines
};
// `replayed_openings`: the replayed chart-opening log, for its exclusions.
std::vector<Exclusion> exclusions(const Population& population, const ChartOpeningLog* replayed_openings = nullptr);

// One plan's figures in one replication.
struct PlanResult {
    std::string plan;
    Channel channel{};
    PlanFigures figures;
};

// Notices of one plan on one unit in one reporting shift (the data behind the
// per-shift distributions).
struct UnitShiftNotices {
    std::string plan, unit;
    Instant shift_start = 0;
    std::string shift;
    bool night = false;
    std::int64_t notices = 0;
};

// One notice, with the names it is reported under. Patient-level (encounter ids).
struct LoggedNotice {
    std::string plan;
    std::uint64_t replication = 0;
    std::string encounter, unit;
    Instant at = 0;
    double score = 0;
    NoticeReason reason{};
    Channel channel{};
    bool asks_evaluation = false;
    std::optional<std::string> opener;  // chart interruptions: the opening role
    double delivery_minutes = 0;
};

// What the staff did, when the scenario declares roles (analysis/workload.hpp).
struct StaffResults {
    std::vector<RoleWorkload> workload;
    std::vector<EscalationCount> escalations;
    std::vector<TaskFateCount> fates;
    std::optional<std::vector<LoggedTask>> task_log;  // opt-in: holds encounter ids
};

// Everything a run reports about one replication.
struct ReplicationResults {
    std::uint64_t replication = 0;
    PopulationSummary population;
    std::vector<PlanResult> plans;
    std::vector<UnitShiftNotices> unit_shift_notices;
    std::vector<Exclusion> exclusions;
    std::optional<std::vector<LoggedNotice>> notice_log;  // opt-in: holds encounter ids
    std::optional<StaffResults> staff;
    ChannelResults channels;  // each channel's burden in its own unit (analysis/channel_burden.hpp)
};

ReplicationResults replication_results(const SimulationSetup& setup, const AnalysisSettings& settings,
                                       const Population& population, const ShiftCalendar& calendar,
                                       const ReplicationRecord& record, bool with_notice_log, bool with_task_log = false,
                                       const ChartOpeningLog* replayed_openings = nullptr);

}  // namespace tocsin
