#pragma once
// Who is reached (analysis/group_figures.hpp) as tables, terminal text,
// warning lines and the report's charts.
#include <cstdint>
#include <string>
#include <vector>

#include "analysis/group_figures.hpp"
#include "report/svg.hpp"
#include "report/table.hpp"

namespace tocsin {

// Replication 0's figures, one row per plan and group; a suppressed group's
// figures are left empty and its `suppressed` column is 1.
Table plan_group_summary_table(const std::vector<GroupFigures>& rows, std::uint64_t replication);
// Across replications: mean and 95% CI of each per-group metric.
Table plan_group_comparison_table(const ReplicatedGroupFigures& f);
// Across replications: each group minus its column's first value in the same
// replication (share caught, notices per 100 patient-days, lead), mean and 95% CI.
Table plan_group_differences_table(const ReplicatedGroupFigures& f);
// The score by group: AUC (DeLong), O/E and calibration-in-the-large with a
// probability mapping, and sensitivity and specificity at each plan's threshold.
Table group_score_table(const std::vector<GroupScoreFigures>& rows);
Table group_threshold_table(const std::vector<GroupScoreFigures>& rows);

// Gaps between groups, groups with too few cases, and suppressed groups, one line each.
std::vector<std::string> group_warning_lines(const std::vector<GroupFigures>& figures,
                                             const std::vector<GroupScoreFigures>& scores, std::int64_t smallest_group);

// The terminal's "Who is reached" block; empty without groups.
std::string who_is_reached_text(const std::vector<GroupFigures>& figures, const std::vector<GroupScoreFigures>& scores,
                                std::int64_t smallest_group, const std::string& basis);

// One dot-and-interval chart per plan: the share of each group's cases caught, Wilson 95%.
std::vector<IntervalChart> group_sensitivity_charts(const std::vector<GroupFigures>& figures,
                                                    std::int64_t smallest_group);

// What the group figures are and are not, for the report and README alike.
std::string group_caution_text();

}  // namespace tocsin
