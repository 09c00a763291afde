#pragma once
// Outcomes averted under a stated effect: a scenario may declare, as an
// assumption, how likely an evaluation is to prevent the outcome given how
// long before time zero it starts (AnalysisSettings::averted). A case's
// chance of being averted is that of its first catching action (the start of
// the evaluation with staff; the notice that asked for it without), so the
// expected outcomes averted by a plan is the sum of those chances over its
// caught cases. These figures are the declared assumption applied to
// simulated catches, never an estimate from data (averted_caution); README,
// "Outcomes averted, under a stated effect".
#include <optional>
#include <string_view>
#include <vector>

#include "analysis/settings.hpp"
#include "models/population.hpp"

namespace tocsin {

// Said beside every figure built on the declared effect.
inline constexpr std::string_view averted_caution =
    "the declared effect applied to simulated catches, not an estimate from data";

std::string_view to_string(AvertedShape shape);

// The chance that an evaluation starting `lead` before time zero averts the
// outcome; 0 below `min_lead` (not a catch).
double averted_probability(const AvertedEffect& effect, Seconds lead, Seconds min_lead);

// The sum over cases of averted_probability at their first catch (`caught_at`
// per encounter, as first_catch gives).
double expected_averted(const AvertedEffect& effect, Seconds min_lead, const Population& population,
                        const std::vector<std::optional<Instant>>& caught_at);

}  // namespace tocsin
