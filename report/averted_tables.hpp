#pragma once
// Outcomes averted under the declared effect (analysis/averted.hpp), as a
// table and terminal lines. Every figure carries the caution beside it: the
// declared assumption applied to simulated catches, not an estimate from data.
#include <optional>
#include <string>

#include "analysis/comparison.hpp"
#include "report/table.hpp"

namespace tocsin {

// Per plan: expected outcomes averted and evaluations per outcome averted
// (mean and 95% CI over replications), the paired difference in outcomes
// averted from `reference_plan`, and the caution in its own column. Nothing
// when the scenario declares no effect.
std::optional<Table> outcomes_averted_table(const ReplicatedFigures& f, std::size_t reference_plan = 0);

// The same for the terminal; empty when no effect is declared.
std::string outcomes_averted_text(const ReplicatedFigures& f, std::size_t reference_plan = 0);

}  // namespace tocsin
