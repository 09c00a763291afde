#include "analysis/plan_warnings.hpp"

#include <algorithm>
#include <cmath>
#include <numeric>
#include <tuple>

namespace tocsin {

namespace {

// What "identical" compares: what a committee would see differ first.
auto identity(const PlanFigures& f) { return std::tie(f.notices, f.caught, f.unit_shift_counts); }

}  // namespace

PlanWarnings plan_warnings(const std::vector<Plan>& plans, const std::vector<ScoreSample>& samples,
                           const std::vector<PlanFigures>& figures) {
    PlanWarnings w;
    for (const Plan& p : plans) {
            if (p.score >= samples.size()) continue;
            const ScoreSample& observed = samples[p.score];
            const ScoreRange range = observed.range();
            if (range.scores == 0) continue;
            const double t = p.rule.threshold;
            if (!std::isfinite(t)) continue;
            if (t < range.lowest || t > range.highest) {
                w.thresholds.push_back({p.name, t, range, t > range.highest});
                continue;
            }
            const double share = observed.share_at_or_above(t);
            if (share >= most_scores_share)
                w.low_thresholds.push_back({p.name, t, share, observed.percentile(1 - most_scores_share), range});
            else if (t > 0 && t < 1 && range.highest > 1)
                w.probability_thresholds.push_back({p.name, t, share, range});
        }
    // Sorted by figures (stable, so scenario order within a group): equal plans
    // sit together, O(P log P) comparisons even for a sweep's many plans.
    const std::size_t n = std::min(plans.size(), figures.size());
    std::vector<std::size_t> order(n);
    std::iota(order.begin(), order.end(), std::size_t{0});
    std::stable_sort(order.begin(), order.end(),
                     [&](std::size_t a, std::size_t b) { return identity(figures[a]) < identity(figures[b]); });
    std::vector<std::vector<std::size_t>> groups;
    for (std::size_t i = 0; i < n;) {
        std::size_t j = i + 1;
        while (j < n && identity(figures[order[j]]) == identity(figures[order[i]])) ++j;
        if (j - i > 1) groups.emplace_back(order.begin() + static_cast<std::ptrdiff_t>(i), order.begin() + static_cast<std::ptrdiff_t>(j));
        i = j;
    }
    std::sort(groups.begin(), groups.end());  // by first plan: scenario order
    for (const auto& g : groups) {
        IdenticalPlans same;
        for (std::size_t p : g) same.plans.push_back(plans[p].name);
        w.identical.push_back(std::move(same));
    }
    return w;
}

}  // namespace tocsin
