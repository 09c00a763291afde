#pragma once
// The per-ward figures (analysis/unit_figures.hpp) as tables and terminal
// text. Column names are those of the pooled figures where one exists
// (README, "Output columns").
#include <string>
#include <vector>

#include "analysis/unit_figures.hpp"
#include "report/table.hpp"

namespace tocsin {

// plan_unit_summary: one row per plan and unit of one replication.
Table plan_unit_summary_table(const std::vector<UnitFigures>& units, std::uint64_t replication);
// plan_unit_comparison: plan, unit, metric, mean, ci_low, ci_high, replications.
Table plan_unit_comparison_table(const ReplicatedUnitFigures& f);
// The report's view: one row per unit and plan (grouped by unit), each figure
// as NAME, NAME_lo, NAME_hi (the mean over replications and its 95% interval).
Table per_ward_table(const ReplicatedUnitFigures& f);
// The terminal's view: one small table per ward, one row per plan, means over
// replications. Empty with fewer than two units (the pooled table says it all);
// one line pointing to the files when there are more than 12 plans.
std::string per_ward_text(const ReplicatedUnitFigures& f);
// Whether any plan has a unit team (a role with one team per unit) on some unit.
bool has_unit_teams(const ReplicatedUnitFigures& f);

}  // namespace tocsin
