#include "analysis/averted.hpp"

namespace tocsin {

std::string_view to_string(AvertedShape shape) {
    switch (shape) {
        case AvertedShape::linear: return "linear";
        case AvertedShape::step: return "step";
        case AvertedShape::table: return "table";
    }
    return "?";
}

double averted_probability(const AvertedEffect& effect, Seconds lead, Seconds min_lead) {
    if (lead < min_lead) return 0.0;
    switch (effect.shape) {
        case AvertedShape::step: return lead >= effect.full_lead ? effect.probability : 0.0;
        case AvertedShape::linear:
            if (lead >= effect.full_lead) return effect.probability;
            // From zero at the minimum lead up to the full probability at full_lead.
            return effect.probability * static_cast<double>(lead - min_lead) /
                   static_cast<double>(effect.full_lead - min_lead);
        case AvertedShape::table: {
            double p = 0.0;
            for (const AvertedStep& row : effect.table)
                if (lead >= row.lead) p = row.probability;
            return p;
        }
    }
    return 0.0;
}

double expected_averted(const AvertedEffect& effect, Seconds min_lead, const Population& pop,
                        const std::vector<std::optional<Instant>>& caught_at) {
    double sum = 0.0;
    for (std::size_t e = 0; e < caught_at.size(); ++e)
        if (caught_at[e] && pop.encounters[e].outcome_at)
            sum += averted_probability(effect, *pop.encounters[e].outcome_at - *caught_at[e], min_lead);
    return sum;
}

}  // namespace tocsin
