#pragma once
// Net benefit of each plan (Vickers & Elkin 2006), treating a bedside
// evaluation as the intervention: a caught case is a true positive, a patient
// without the outcome who was evaluated a false positive. Thresholds are given
// as N, the evaluations one would accept per case found (pt = 1 / N), so model
// and workflow are judged in the same unit as the decision curve.
#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "analysis/results.hpp"

namespace tocsin {

struct PlanNetBenefit {
    std::string plan;
    double evaluations_per_case = 0, threshold_probability = 0;
    std::int64_t true_positives = 0, false_positives = 0, encounters = 0;
    std::optional<double> net_benefit, net_benefit_treat_all;  // empty without encounters
};

// One per plan and threshold, plans outermost.
std::vector<PlanNetBenefit> plan_net_benefit(const std::vector<std::string>& plans, const std::vector<PlanFigures>& figures,
                                             std::size_t encounters, const std::vector<double>& evaluations_per_case);

}  // namespace tocsin
