#include "analysis/plan_net_benefit.hpp"

namespace tocsin {

std::vector<PlanNetBenefit> plan_net_benefit(const std::vector<std::string>& plans, const std::vector<PlanFigures>& figures,
                                             std::size_t encounters, const std::vector<double>& evaluations_per_case) {
    std::vector<PlanNetBenefit> out;
    const double n = static_cast<double>(encounters);
    for (std::size_t p = 0; p < plans.size(); ++p)
        for (double per_case : evaluations_per_case) {
            const double pt = 1.0 / per_case, odds = pt / (1.0 - pt);
            const PlanFigures& f = figures[p];
            const double tp = static_cast<double>(f.caught), fp = static_cast<double>(f.evaluated_non_cases);
            const double prevalence = static_cast<double>(f.cases) / n;
            PlanNetBenefit b{plans[p], per_case, pt, f.caught, f.evaluated_non_cases,
                             static_cast<std::int64_t>(encounters), std::nullopt, std::nullopt};
            if (n > 0) {
                b.net_benefit = tp / n - fp / n * odds;
                b.net_benefit_treat_all = prevalence - (1.0 - prevalence) * odds;
            }
            out.push_back(std::move(b));
        }
    return out;
}

}  // namespace tocsin
