#include "models/discrimination.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <numeric>

namespace tocsin {

double mann_whitney_auc(std::span<const double> cases, std::span<const double> controls) {
    if (cases.empty() || controls.empty()) return std::numeric_limits<double>::quiet_NaN();
    struct Tagged {
        double value;
        bool is_case;
    };
    std::vector<Tagged> all;
    all.reserve(cases.size() + controls.size());
    for (double v : cases) all.push_back({v, true});
    for (double v : controls) all.push_back({v, false});
    std::sort(all.begin(), all.end(), [](const Tagged& a, const Tagged& b) { return a.value < b.value; });
    // Sum of case midranks (1-based) -> U = R1 - n1 (n1 + 1) / 2.
    double case_rank_sum = 0.0;
    std::size_t i = 0;
    while (i < all.size()) {
        std::size_t j = i;
        std::size_t cases_in_tie = 0;
        while (j < all.size() && all[j].value == all[i].value) {
            cases_in_tie += all[j].is_case ? 1 : 0;
            ++j;
        }
        const double midrank = (static_cast<double>(i + 1) + static_cast<double>(j)) / 2.0;
        case_rank_sum += midrank * static_cast<double>(cases_in_tie);
        i = j;
    }
    const double n1 = static_cast<double>(cases.size());
    const double n0 = static_cast<double>(controls.size());
    return (case_rank_sum - n1 * (n1 + 1.0) / 2.0) / (n1 * n0);
}

EncounterMaxima encounter_maxima(const Population& population) {
    EncounterMaxima maxima;
    for (std::size_t e = 0; e < population.encounters.size(); ++e) {
        auto scores = population.scores_of(e);
        if (scores.empty()) continue;
        double highest = scores.front().value;
        for (const Score& s : scores) highest = std::max(highest, s.value);
        (population.encounters[e].outcome_at ? maxima.cases : maxima.controls).push_back(highest);
    }
    return maxima;
}

namespace {

// 1-based midranks of `x`: tied values share the average of their ranks.
std::vector<double> midranks(std::span<const double> x) {
    std::vector<std::size_t> order(x.size());
    std::iota(order.begin(), order.end(), std::size_t{0});
    std::stable_sort(order.begin(), order.end(), [&](std::size_t a, std::size_t b) { return x[a] < x[b]; });
    std::vector<double> rank(x.size());
    for (std::size_t i = 0; i < order.size();) {
        std::size_t j = i;
        while (j < order.size() && x[order[j]] == x[order[i]]) ++j;
        const double midrank = (static_cast<double>(i + 1) + static_cast<double>(j)) / 2.0;
        for (std::size_t k = i; k < j; ++k) rank[order[k]] = midrank;
        i = j;
    }
    return rank;
}

}  // namespace

double spearman_rank_correlation(std::span<const double> x, std::span<const double> y) {
    const double nan = std::numeric_limits<double>::quiet_NaN();
    if (x.size() != y.size() || x.size() < 2) return nan;
    const std::vector<double> rx = midranks(x), ry = midranks(y);
    const double mean = (static_cast<double>(x.size()) + 1.0) / 2.0;  // of any set of midranks
    double sxy = 0, sxx = 0, syy = 0;
    for (std::size_t i = 0; i < rx.size(); ++i) {
        sxy += (rx[i] - mean) * (ry[i] - mean);
        sxx += (rx[i] - mean) * (rx[i] - mean);
        syy += (ry[i] - mean) * (ry[i] - mean);
    }
    if (sxx == 0 || syy == 0) return nan;
    return sxy / std::sqrt(sxx * syy);
}

}  // namespace tocsin
