#pragma once
// Encounter-level discrimination, kept in models/ so the generator can
// calibrate itself without reaching up into analysis/ (which has the full set
// of evaluation measures with confidence intervals).
#include <cstdint>
#include <span>
#include <vector>

#include "models/population.hpp"

namespace tocsin {

// AUC as the Mann-Whitney probability P(case > control) + 0.5 P(tie), by
// midranks in O(n log n). NaN when either group is empty.
double mann_whitney_auc(std::span<const double> cases, std::span<const double> controls);

// Each encounter's highest usable score (scores are usable only before time
// zero and inside the stay; Population keeps only those). Encounters without
// a usable score take no part.
struct EncounterMaxima {
    std::vector<double> cases;
    std::vector<double> controls;
};
EncounterMaxima encounter_maxima(const Population& population);

// Spearman's rank correlation: Pearson's correlation of the midranks (ties
// share their average rank). NaN with fewer than 2 pairs or no spread.
double spearman_rank_correlation(std::span<const double> x, std::span<const double> y);

}  // namespace tocsin
