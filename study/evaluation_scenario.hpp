#pragma once
// Evaluation options that follow a scenario: its catch window and minimum
// lead, its time zone (drift months), its seed (bootstrap), and - for a
// generated population on the probability scale - the score as a probability.
// The CLI's `evaluate` and a run's results start from the same defaults.
#include "analysis/evaluation.hpp"
#include "study/scenario.hpp"

namespace tocsin {

EvaluationOptions evaluation_options_for(const Scenario& scenario);
// Each other score's probability mapping: a generated score on the
// probability scale is read as a probability; others have none.
std::vector<std::optional<ProbabilityMapping>> other_score_probabilities(const Scenario& scenario);

}  // namespace tocsin
