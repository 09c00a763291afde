#include "study/evaluation_scenario.hpp"

namespace tocsin {

EvaluationOptions evaluation_options_for(const Scenario& sc) {
    EvaluationOptions o;
    o.window_hours = static_cast<double>(sc.analysis.window) / 3600.0;
    o.min_lead_hours = static_cast<double>(sc.analysis.min_lead) / 3600.0;
    o.zone = sc.simulation.zone;
    o.seed = sc.simulation.seed;
    if (sc.population.source == PopulationSource::generate && sc.population.generator.scores.scale == ScoreScale::probability)
        o.probability = ProbabilityMapping{};  // generated probabilities are probabilities as they are
    return o;
}

std::vector<std::optional<ProbabilityMapping>> other_score_probabilities(const Scenario& sc) {
    std::vector<std::optional<ProbabilityMapping>> out(sc.other_scores.size());
    if (sc.population.source != PopulationSource::generate) return out;
    const auto& generated = sc.population.generator.other_scores;
    for (std::size_t k = 0; k < out.size() && k < generated.size(); ++k)
        if (generated[k].level.scale == ScoreScale::probability) out[k] = ProbabilityMapping{};
    return out;
}

}  // namespace tocsin
