#pragma once
// Every pooled figure broken down by unit (ward): a nurse manager answers for
// one ward, and a pooled 90th percentile can sit below one busy ward's own.
// Computed from the records of a replication, one value per plan and unit;
// across replications each is reported as a mean with its 95% interval, the
// same way as the plans' figures (analysis/comparison.hpp).
//
// Per unit, with the same definitions as the pooled figures of
// analysis/results.hpp restricted to that unit: a notice and an encounter
// belong to the encounter's unit; cases and catches are that unit's patients.
// The notices of a plan sum over its units to the plan's notices, and so do
// cases and catches.
#include <cstdint>
#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "analysis/plan_figures.hpp"
#include "sim/setup.hpp"

namespace tocsin {

struct UnitFigures {
    std::string plan, unit;
    std::int64_t notices = 0;  // whole run, as PlanFigures::notices
    // Notices per shift and per night shift, and distinct patients noticed per
    // night shift, on this unit (reporting period, zeros included).
    std::optional<double> shift_mean, shift_p90, shift_max;
    std::optional<double> night_mean, night_p90, night_max;
    std::optional<double> patients_per_night_mean, patients_per_night_p90, patients_per_night_max;
    // Share of the unit's notices sent before time zero to patients who went on to the outcome.
    std::optional<double> notice_ppv;
    std::int64_t cases = 0, caught = 0;
    std::optional<double> sensitivity, lead_median_hours;
    // Minutes worked per shift by the plan's unit teams on this unit (roles
    // with one team per unit, summed), over complete shifts of the reporting
    // period; empty when the plan's escalation path has no such role.
    std::optional<double> team_minutes_per_shift_mean, team_minutes_per_shift_p90;
};

// One row per plan and unit, plan-major in the setup's plan order, units in
// the population's order. `figures[p]` are plan p's figures from plan_figures.
std::vector<UnitFigures> unit_figures(const SimulationSetup& setup, const AnalysisSettings& settings,
                                      const Population& population, const ShiftCalendar& calendar,
                                      const ReportingShifts& reporting, const ReplicationRecord& record,
                                      std::span<const PlanFigures> figures);

// A per-unit figure reported across replications.
struct UnitMetric {
    std::string_view name;   // stable column value; the plan metric's name where one exists
    std::string_view label;  // for people
    double (*value)(const UnitFigures&);  // NaN when undefined
};
const std::vector<UnitMetric>& unit_metrics();
std::size_t unit_metric_index(std::string_view name);  // throws std::out_of_range when unknown

// values[plan][unit][metric][replication]; a unit missing from a replication
// leaves NaN there (left out of the means, as any undefined figure).
struct ReplicatedUnitFigures {
    std::vector<std::string> plans, units;  // units in order of first appearance
    std::vector<std::vector<std::vector<std::vector<double>>>> values;
    std::uint64_t replications = 0;

    std::span<const double> of(std::size_t plan, std::size_t unit, std::size_t metric) const {
        return values[plan][unit][metric];
    }
};
ReplicatedUnitFigures collect_unit_figures(const std::vector<std::string>& plan_names,
                                           const std::vector<std::vector<UnitFigures>>& by_replication);

}  // namespace tocsin
