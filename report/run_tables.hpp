#pragma once
// The tables of one replication's results (analysis/results.hpp), as the
// terminal, CSV and JSON show them. Every column name is defined in README,
// "Output columns"; the names are stable.
#include <optional>

#include "analysis/results.hpp"
#include "report/table.hpp"
#include "models/time.hpp"

namespace tocsin {

struct RunTables {
    Table plan_summary;
    Table plan_unit_summary;   // every plan on every unit (report/unit_tables.hpp)
    Table unit_shift_notices;  // the data behind the per-shift distributions
    Table exclusions;
    std::optional<Table> notice_log;  // opt-in: holds encounter ids
    // When the scenario declares roles:
    std::optional<Table> staff_workload, staff_escalations, task_fates;
    std::optional<Table> task_log;    // opt-in: holds encounter ids
    Table channel_burden;             // each channel's burden in its own unit
    Table rounds;                     // handoff lists and review rounds
    Table chart_interruptions;        // per unit x shift x opening role
    std::optional<Table> acceptance_by_load;  // plans that declare fatigue
};

// Times are shown in `zone` (the notice log's in UTC).
RunTables run_tables(const ReplicationResults& results, const TimeZone& zone);

Table plan_summary_table(const ReplicationResults& results);
Table unit_shift_notices_table(const ReplicationResults& results, const TimeZone& zone);
Table exclusions_table(const std::vector<Exclusion>& exclusions);
Table notice_log_table(const std::vector<LoggedNotice>& log);

// Staff (analysis/workload.hpp).
Table staff_workload_table(const std::vector<RoleWorkload>& workload);
// When any role has other work: appends its columns (other work apart from
// alert work, and the total utilisation) to `t`, whose rows are `workload`'s
// in order; otherwise leaves `t` as it is.
void add_other_work_columns(Table& t, const std::vector<RoleWorkload>& workload);
Table escalation_table(const std::vector<EscalationCount>& escalations);
Table task_fate_table(const std::vector<TaskFateCount>& fates);
Table task_log_table(const std::vector<LoggedTask>& log, const TimeZone& zone);

// Channels (analysis/channel_burden.hpp).
Table channel_burden_table(const std::vector<ChannelBurdenSummary>& burden);
Table rounds_table(const std::vector<ReportedRound>& rounds, const TimeZone& zone);
Table chart_interruptions_table(const std::vector<ChartInterruptionCount>& counts, const TimeZone& zone);

// Fatigue (analysis/acceptance_by_load.hpp).
Table acceptance_by_load_table(const std::vector<LoadBandRow>& rows);
// One line per plan that declares fatigue, for the terminal; empty when none does.
std::string acceptance_by_load_text(const std::vector<LoadBandRow>& rows);

// What a kind of exclusion is called in the exclusions table ("skipped rows").
std::string excluded_name(Excluded what);
// The reason column: a skipped row's lines follow its reason in brackets.
std::string exclusion_reason(const Exclusion& exclusion);

}  // namespace tocsin
