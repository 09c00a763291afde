#pragma once
// What a run reports, computed from the records of a replication. Every
// figure and its column name is defined in README, "Output columns"; the
// names are stable.
#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "analysis/acceptance_by_load.hpp"
#include "analysis/channel_burden.hpp"
#include "analysis/plan_figures.hpp"
#include "analysis/group_figures.hpp"
#include "analysis/unit_figures.hpp"
#include "analysis/reporting.hpp"
#include "analysis/workload.hpp"
#include "models/chart_openings.hpp"
#include "models/population.hpp"
#include "analysis/settings.hpp"
#include "sim/setup.hpp"
#include "sim/simulate.hpp"

namespace tocsin {

// The population a run used, in summary (the population itself is not kept:
// a replayed year holds tens of millions of scores).
struct PopulationSummary {
    std::size_t encounters = 0, units = 0, scores = 0;
    std::vector<std::string> unit_names;  // in the population's order
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
    std::vector<UnitFigures> units;  // every plan on every unit (analysis/unit_figures.hpp)
    std::vector<GroupFigures> groups;  // every plan for every patient group (analysis/group_figures.hpp)
    std::vector<UnitShiftNotices> unit_shift_notices;
    std::vector<Exclusion> exclusions;
    std::optional<std::vector<LoggedNotice>> notice_log;  // opt-in: holds encounter ids
    std::optional<StaffResults> staff;
    ChannelResults channels;  // each channel's burden in its own unit (analysis/channel_burden.hpp)
    std::vector<LoadBandRow> acceptance_by_load;  // plans that declare fatigue (analysis/acceptance_by_load.hpp)
};

ReplicationResults replication_results(const SimulationSetup& setup, const AnalysisSettings& settings,
                                       const Population& population, const ShiftCalendar& calendar,
                                       const ReplicationRecord& record, bool with_notice_log, bool with_task_log = false,
                                       const ChartOpeningLog* replayed_openings = nullptr);

// The same, from each plan's figures and each plan's figures on each unit
// already computed for this record (`plan_figures` with `add_plan_burdens`,
// `unit_figures` and `group_figures`), as a run does for every replication:
// not computed twice.
struct KnownFigures {
    std::vector<PlanFigures> plans;
    std::vector<UnitFigures> units;
    std::vector<GroupFigures> groups;
};
ReplicationResults replication_results(const SimulationSetup& setup, const AnalysisSettings& settings,
                                       const Population& population, const ShiftCalendar& calendar,
                                       const ReplicationRecord& record, KnownFigures known, bool with_notice_log,
                                       bool with_task_log, const ChartOpeningLog* replayed_openings);

}  // namespace tocsin
