#include "analysis/score_comparison.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <map>

#include <boost/random/binomial_distribution.hpp>

#include "models/random_streams.hpp"

namespace tocsin {

std::vector<Evaluation> other_score_evaluations(const Population& pop, EvaluationOptions options,
                                                const std::vector<std::optional<ProbabilityMapping>>& probability) {
    std::vector<Evaluation> out;
    for (std::size_t k = 1; k < pop.score_count(); ++k) {
        options.probability = k - 1 < probability.size() ? probability[k - 1] : std::nullopt;
        out.push_back(evaluate(with_only_score(pop, k), options));
    }
    return out;
}

std::vector<double> stay_maxima(const Population& pop, std::size_t score) {
    std::vector<double> out(pop.encounters.size(), std::numeric_limits<double>::quiet_NaN());
    for (std::size_t e = 0; e < pop.encounters.size(); ++e)
        for (const Score& s : pop.scores_of(e, score))
            if (std::isnan(out[e]) || s.value > out[e]) out[e] = s.value;
    return out;
}

namespace {

// threshold_flagging on values already in descending order, without NaN.
double threshold_in_descending(const std::vector<double>& values, std::int64_t flagged) {
    if (flagged <= 0 || values.empty()) return std::numeric_limits<double>::infinity();
    const auto n = static_cast<std::int64_t>(values.size());
    const double at = values[static_cast<std::size_t>(std::min(flagged, n) - 1)];
    // A threshold at `at` flags every value >= it, ties included; the next
    // distinct value above it flags exactly the values before `at`'s first.
    const auto first_at = std::lower_bound(values.begin(), values.end(), at, std::greater<>()) - values.begin();
    const auto last_at = std::upper_bound(values.begin(), values.end(), at, std::greater<>()) - values.begin();
    if (first_at == 0) return at;
    const double above = values[static_cast<std::size_t>(first_at - 1)];
    return flagged - first_at <= last_at - flagged ? above : at;
}

}  // namespace

double threshold_flagging(std::vector<double> values, std::int64_t flagged) {
    std::erase_if(values, [](double v) { return std::isnan(v); });
    std::sort(values.begin(), values.end(), std::greater<>());
    return threshold_in_descending(values, flagged);
}

namespace {

// The stays compared: both scores usable. `first` and `other` are stay maxima.
struct Paired {
    std::vector<double> a, b;
    std::vector<std::uint8_t> outcome;
};

Paired paired_stays(const Population& pop, const std::vector<double>& first, const std::vector<double>& other,
                    ScorePairAuc* counts) {
    Paired p;
    for (std::size_t e = 0; e < first.size(); ++e) {
        const bool has_a = !std::isnan(first[e]), has_b = !std::isnan(other[e]);
        if (counts) {
            if (has_a && !has_b) ++counts->only_first;
            if (!has_a && has_b) ++counts->only_other;
            if (!has_a && !has_b) ++counts->neither;
        }
        if (!has_a || !has_b) continue;
        p.a.push_back(first[e]);
        p.b.push_back(other[e]);
        p.outcome.push_back(pop.encounters[e].outcome_at ? 1 : 0);
    }
    return p;
}

// The percentile interval of the net-benefit difference over stay resamples.
// A stay's share of the difference depends only on its cell (case or not,
// flagged by one score only, or alike), so drawing the cells' counts from the
// multinomial with the observed shares is resampling whole stays, at a cost
// per resample that does not grow with the stays.
Interval resampled_difference(const ThresholdComparison& c, double odds, const ScoreComparisonOptions& options,
                              std::uint64_t entity) {
    const double n = static_cast<double>(c.stays);
    const std::array<double, 4> weight{1.0, -1.0, -odds, odds};  // per stay, times n
    const std::array<std::int64_t, 4> cells{c.cases_by[1], c.cases_by[2], c.non_cases_by[1], c.non_cases_by[2]};
    RandomEngine engine = make_stream(options.seed, 0, StreamPurpose::score_comparison, entity);
    std::vector<double> draws(static_cast<std::size_t>(options.resamples));
    for (double& d : draws) {
        std::int64_t left = c.stays;
        double mass_left = 1.0;
        d = 0;
        for (std::size_t k = 0; k < cells.size() && left > 0; ++k) {
            const double p = std::clamp(static_cast<double>(cells[k]) / n / mass_left, 0.0, 1.0);
            const std::int64_t drawn = boost::random::binomial_distribution<std::int64_t, double>(left, p)(engine);
            d += weight[k] * static_cast<double>(drawn) / n;
            left -= drawn;
            mass_left -= static_cast<double>(cells[k]) / n;
        }
    }
    std::sort(draws.begin(), draws.end());
    const double tail = (1.0 - options.confidence) / 2.0;
    // Type 1 percentile (the inverse of the empirical distribution), as ScoreSample::percentile.
    auto quantile = [&](double q) {
        const auto k = static_cast<std::size_t>(std::max(1.0, std::ceil(q * static_cast<double>(draws.size()) - 1e-9)));
        return draws[std::min(k, draws.size()) - 1];
    };
    return {quantile(tail), quantile(1.0 - tail)};
}

ThresholdComparison compare_at(const Paired& p, const Plan& plan, const std::string& plan_score,
                               const std::string& other_score, double matched) {
    ThresholdComparison c{.plan = plan.name, .plan_score = plan_score, .other_score = other_score,
                          .plan_threshold = plan.rule.threshold, .matched_threshold = matched};
    c.stays = static_cast<std::int64_t>(p.a.size());
    for (std::size_t i = 0; i < p.a.size(); ++i) {
        const bool by_plan = p.a[i] >= plan.rule.threshold, by_other = p.b[i] >= matched;
        const std::size_t cell = by_plan ? (by_other ? 0 : 1) : (by_other ? 2 : 3);
        (p.outcome[i] ? c.cases_by : c.non_cases_by)[cell] += 1;
        c.cases += p.outcome[i];
    }
    return c;
}

}  // namespace

std::vector<MatchedPlans> matched_plans(const ReplicatedFigures& f, const std::vector<Plan>& plans,
                                        const std::vector<std::string>& score_names, std::size_t burden,
                                        std::size_t benefit) {
    std::vector<MatchedPlans> out;
    auto mean_of = [&](std::size_t p, std::size_t metric) { return mean_interval(f.of(p, metric)).mean; };
    for (std::size_t p = 0; p < plans.size() && p < f.plans.size(); ++p) {
        if (plans[p].score == 0 || plans[p].score >= score_names.size()) continue;
        std::optional<std::size_t> best;
        double best_gap = 0;
        for (std::size_t q = 0; q < plans.size() && q < f.plans.size(); ++q) {
            if (plans[q].score != 0 || plans[q].channel != plans[p].channel) continue;
            const double gap = std::abs(mean_of(q, burden) - mean_of(p, burden));
            if (!std::isfinite(gap)) continue;
            if (!best || gap < best_gap) best = q, best_gap = gap;
        }
        if (!best) continue;
        out.push_back({plans[p].name, plans[*best].name, score_names[plans[p].score], score_names[0],
                       std::string(plan_metrics()[burden].name), std::string(plan_metrics()[benefit].name),
                       paired_difference(f, p, *best, burden), paired_difference(f, p, *best, benefit)});
    }
    return out;
}

ScoreComparison compare_scores(const Population& pop, const std::vector<Plan>& plans,
                               const ScoreComparisonOptions& options) {
    ScoreComparison out;
    if (pop.score_count() < 2) return out;
    std::vector<std::vector<double>> maxima;
    for (std::size_t k = 0; k < pop.score_count(); ++k) maxima.push_back(stay_maxima(pop, k));
    auto name_of = [&](std::size_t k) { return k == 0 ? pop.score_name : pop.other_scores[k - 1].name; };
    for (std::size_t k = 1; k < pop.score_count(); ++k) {
        ScorePairAuc a{.first = name_of(0), .other = name_of(k), .confidence = options.confidence};
        const Paired p = paired_stays(pop, maxima[0], maxima[k], &a);
        a.stays = static_cast<std::int64_t>(p.a.size());
        for (std::uint8_t y : p.outcome) (y ? a.cases : a.controls) += 1;
        if (a.cases > 0 && a.controls > 0) a.test = paired_auc_delong(p.a, p.b, p.outcome, options.confidence);
        out.auc.push_back(std::move(a));
    }
    // The stays of each pair of scores, and the other score's values in
    // descending order, made once for every plan that reads the same score
    // (a sweep may hold hundreds).
    std::map<std::pair<std::size_t, std::size_t>, std::pair<Paired, std::vector<double>>> pairs;
    for (const Plan& plan : plans) {
        if (!std::isfinite(plan.rule.threshold) || plan.score >= pop.score_count()) continue;
        for (std::size_t k = 0; k < pop.score_count(); ++k) {
            if (k == plan.score) continue;
            auto [at, fresh] = pairs.try_emplace({plan.score, k});
            if (fresh) {
                at->second.first = paired_stays(pop, maxima[plan.score], maxima[k], nullptr);
                at->second.second = at->second.first.b;
                std::sort(at->second.second.begin(), at->second.second.end(), std::greater<>());
            }
            const Paired& p = at->second.first;
            std::int64_t flagged = 0;
            for (double v : p.a) flagged += v >= plan.rule.threshold;
            const double matched = threshold_in_descending(at->second.second, flagged);
            const ThresholdComparison base = compare_at(p, plan, name_of(plan.score), name_of(k), matched);
            for (double per_case : options.evaluations_per_case) {
                ThresholdComparison c = base;
                const double odds = 1.0 / (per_case - 1.0);  // pt / (1 - pt) with pt = 1 / N
                const double n = static_cast<double>(c.stays);
                c.evaluations_per_case = per_case;
                c.resamples = options.resamples;
                if (c.stays == 0) {
                    out.thresholds.push_back(std::move(c));
                    continue;
                }
                auto net_benefit = [&](std::int64_t tp, std::int64_t fp) {
                    return static_cast<double>(tp) / n - static_cast<double>(fp) / n * odds;
                };
                c.net_benefit_plan = net_benefit(c.cases_by[0] + c.cases_by[1], c.non_cases_by[0] + c.non_cases_by[1]);
                c.net_benefit_other = net_benefit(c.cases_by[0] + c.cases_by[2], c.non_cases_by[0] + c.non_cases_by[2]);
                c.difference = c.net_benefit_plan - c.net_benefit_other;
                c.difference_interval = resampled_difference(
                    c, odds, options,
                    entity_key({text_entity(plan.name), text_entity(c.other_score),
                                static_cast<std::uint64_t>(std::llround(per_case * 1000))}));
                out.thresholds.push_back(std::move(c));
            }
        }
    }
    return out;
}

}  // namespace tocsin
