#include "analysis/evaluation_scenario.hpp"

namespace tocsin {

EvaluationOptions evaluation_options_for(const Scenario& sc) {
    EvaluationOptions o;
    o.window_hours = static_cast<double>(sc.window) / 3600.0;
    o.min_lead_hours = static_cast<double>(sc.min_lead) / 3600.0;
    o.zone = sc.zone;
    o.seed = sc.seed;
    if (sc.source == PopulationSource::generate && sc.generator.scores.scale == ScoreScale::probability)
        o.probability = ProbabilityMapping{};  // generated probabilities are probabilities as they are
    return o;
}

}  // namespace tocsin
