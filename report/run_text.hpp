#pragma once
// The terminal summary of a run, rendered from its typed results.
#include <string>
#include <vector>

#include "analysis/results.hpp"
#include "models/time.hpp"
#include "study/run.hpp"
#include "study/scenario.hpp"

namespace tocsin {

// The population and what was excluded from it.
std::string run_header_text(const std::string& title, const TimeZone& zone, const PopulationSummary& population,
                            const std::vector<Exclusion>& exclusions);
// The plans of one replication side by side (and, with staff, their cost in
// people and time; and each channel's burden in its own unit).
std::string plan_summary_text(const ReplicationResults& results);
// One line per warning ("Warning: ..."), for the terminal and the report.
std::vector<std::string> plan_warning_lines(const PlanWarnings& warnings);
// What `tocsin run` prints: the population, the comparison (or the one
// replication's plans), the score's own measures, the frontier, the budget
// answer and the cautions.
std::string run_text(const Scenario& scenario, const RunOutput& output, const RunSettings& settings);

}  // namespace tocsin
