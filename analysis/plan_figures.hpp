#pragma once
// One plan's figures in one replication (PlanFigures), and the counting they
// share with the per-unit figures (analysis/unit_figures.hpp). Every figure and
// its column name is defined in README, "Output columns".
#include <cstdint>
#include <optional>
#include <utility>
#include <vector>

#include "analysis/reporting.hpp"
#include "analysis/settings.hpp"
#include "models/population.hpp"
#include "sim/setup.hpp"
#include "sim/shifts.hpp"
#include "sim/simulate.hpp"

namespace tocsin {

struct PlanFigures {
    std::int64_t notices = 0;
    std::int64_t notices_first = 0, notices_repeat = 0, notices_rise = 0;
    // Per unit-shift over the reporting shifts (every unit x shift, zeros included).
    double per_unit_shift_mean = 0, per_unit_shift_p90 = 0, per_unit_shift_max = 0;
    std::optional<double> per_unit_night_mean, per_unit_night_p90, per_unit_night_max;
    // The worst ward: each unit's own mean and 90th percentile over its nights,
    // the highest over units. A pooled percentile hides a busy ward among quiet
    // ones ("no ward over 4 pages on 9 nights in 10" is decided by the worst).
    std::optional<double> worst_unit_night_mean, worst_unit_night_p90;
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
    // Only with a declared effect (analysis/averted.hpp): the expected outcomes
    // averted (the sum of the caught cases' chances) and evaluations per one.
    // The declared assumption applied to simulated catches, not an estimate from data.
    std::optional<double> assumed_averted, evaluations_per_assumed_averted;
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

// The notices that ask for an evaluation, as (encounter, instant).
std::vector<std::pair<std::uint32_t, Instant>> evaluation_requests(const PlanRecord& record);
// The actions that can catch a case: with staff the evaluation starts, else
// evaluation_requests (only an evaluation can catch a case).
std::vector<std::pair<std::uint32_t, Instant>> catching_actions(const PlanRecord& record);

// Distinct encounters noticed per unit x reporting shift, unit-major as
// PlanFigures::unit_shift_counts; counted in night shifts only (0 elsewhere).
std::vector<std::int64_t> patients_per_unit_shift(const ShiftCalendar& calendar, const ReportingShifts& reporting,
                                                  std::size_t units, const PlanRecord& record);

// One unit's values of a unit-major per-shift vector over the night shifts of
// the reporting period, sorted.
std::vector<double> unit_night_values(const std::vector<std::int64_t>& per_unit_shift, std::size_t unit,
                                      const ShiftCalendar& calendar, const ReportingShifts& reporting);

}  // namespace tocsin
