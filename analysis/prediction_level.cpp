#include "analysis/prediction_level.hpp"

#include <algorithm>
#include <climits>
#include <cmath>
#include <cstdio>
#include <limits>
#include <stdexcept>
#include <utility>

#include "analysis/encounter_bootstrap.hpp"
#include "analysis/quantiles.hpp"
#include "analysis/roc.hpp"
#include "analysis/value_ranks.hpp"
#include "models/parallel.hpp"
#include "models/text.hpp"

namespace tocsin {

namespace {

constexpr double not_a_number = std::numeric_limits<double>::quiet_NaN();
// seconds_to_outcome of a prediction on an encounter without an outcome.
constexpr std::int32_t no_outcome = INT32_MAX;
// Horizon limit meaning "before the end of the stay": every case's prediction qualifies.
constexpr std::int32_t rest_of_stay = INT32_MAX - 1;

// Few distinct values: a counting sort that puts each score straight in its
// place, reading the population in order (the same order as ascending_order:
// ranks ascending, ties by position). The encounters are cut into runs of
// about equal score counts, one per thread; a run's scores of one rank go
// after those of the runs before it, so the order is the same for any count.
template <class Place>
void place_by_rank(const Population& pop, const std::vector<std::uint32_t>& used, const DistinctValueRanks& few,
                   unsigned threads, const Place& place) {
    const std::size_t n = pop.scores.size(), ranks = few.count.size();
    const std::size_t runs = std::max<std::size_t>(1, std::min<std::size_t>(threads, used.size()));
    std::vector<std::size_t> first_of_run(runs + 1, used.size());
    for (std::size_t p = 0; p < runs; ++p)
        first_of_run[p] = static_cast<std::size_t>(
            std::lower_bound(used.begin(), used.end(), n / runs * p,
                             [&](std::uint32_t e, std::size_t at) { return pop.score_start[e] < at; }) -
            used.begin());
    std::vector<std::vector<std::size_t>> next(runs, std::vector<std::size_t>(ranks, 0));
    const auto each_score = [&](std::size_t p, const auto& visit) {
        for (std::size_t u = first_of_run[p]; u < first_of_run[p + 1]; ++u)
            for (std::size_t s = pop.score_start[used[u]]; s < pop.score_start[used[u] + 1]; ++s) visit(s, used[u]);
    };
    parallel_for(runs, threads, [&](std::size_t p) { each_score(p, [&](std::size_t s, std::uint32_t) { ++next[p][few.rank[s]]; }); });
    std::size_t at = 0;
    for (std::size_t k = 0; k < ranks; ++k)
        for (std::size_t p = 0; p < runs; ++p) at += std::exchange(next[p][k], at);
    parallel_for(runs, threads, [&](std::size_t p) {
        each_score(p, [&](std::size_t s, std::uint32_t e) { place(next[p][few.rank[s]]++, s, e); });
    });
}

}  // namespace

std::int32_t horizon_limit_seconds(double horizon_hours) {
    if (horizon_hours == 0.0) return rest_of_stay;
    return static_cast<std::int32_t>(std::min<double>(std::llround(horizon_hours * 3600.0), rest_of_stay));
}

RankedPredictions rank_predictions(const Population& pop, unsigned threads) {
    const std::size_t n = pop.scores.size();
    RankedPredictions r;
    r.value.resize(n);
    r.encounter.resize(n);
    r.seconds_to_outcome.resize(n);
    r.available_at.resize(n);
    // Puts score s of encounter e at rank position i.
    const auto place = [&](std::size_t i, std::size_t s, std::uint32_t e) {
        const Score& score = pop.scores[s];
        const Encounter& enc = pop.encounters[e];
        r.value[i] = score.value;
        r.encounter[i] = e;
        r.available_at[i] = score.available_at;
        if (enc.outcome_at) {
            const std::int64_t ahead = *enc.outcome_at - score.available_at;  // > 0 for a usable score
            r.seconds_to_outcome[i] = static_cast<std::int32_t>(std::min<std::int64_t>(ahead, rest_of_stay));
        } else {
            r.seconds_to_outcome[i] = no_outcome;
        }
    };
    for (std::size_t e = 0; e < pop.encounters.size(); ++e)
        if (pop.score_start[e + 1] > pop.score_start[e]) r.encounters_used.push_back(static_cast<std::uint32_t>(e));
    if (const auto few = distinct_value_ranks(n, [&](std::size_t s) { return pop.scores[s].value; }, std::size_t{1} << 16)) {
        place_by_rank(pop, r.encounters_used, *few, threads, place);
        return r;
    }
    std::vector<double> values(n);
    for (std::size_t i = 0; i < n; ++i) values[i] = pop.scores[i].value;
    const std::vector<std::uint32_t> order = ascending_order(values);
    values = {};
    std::vector<std::uint32_t> owner(n);
    for (std::uint32_t e : r.encounters_used)
        for (std::size_t s = pop.score_start[e]; s < pop.score_start[e + 1]; ++s) owner[s] = e;
    for (std::size_t i = 0; i < n; ++i) place(i, order[i], owner[order[i]]);
    return r;
}

double AucSums::auc() const {
    return positives && negatives
               ? static_cast<double>(twice_u) / (2.0 * static_cast<double>(positives) * static_cast<double>(negatives))
               : not_a_number;
}

std::vector<AucSums> auc_sums_by_horizon(const RankedPredictions& r, const std::vector<std::int32_t>& limits,
                                         const std::vector<std::uint32_t>& weights) {
    const std::size_t n = r.value.size(), k = limits.size();
    std::vector<AucSums> sums(k);
    std::vector<std::int64_t> pos(k);
    std::size_t i = 0;
    while (i < n) {
        std::fill(pos.begin(), pos.end(), 0);
        std::int64_t group = 0;
        const double v = r.value[i];
        for (; i < n && r.value[i] == v; ++i) {
            const std::int64_t w = weights.empty() ? 1 : weights[r.encounter[i]];
            const std::int32_t ahead = r.seconds_to_outcome[i];
            group += w;
            for (std::size_t h = 0; h < k; ++h) pos[h] += w * static_cast<std::int64_t>(ahead <= limits[h]);
        }
        for (std::size_t h = 0; h < k; ++h) {
            const std::int64_t neg = group - pos[h];
            sums[h].twice_u += pos[h] * (2 * sums[h].negatives + neg);
            sums[h].negatives += neg;
            sums[h].positives += pos[h];
        }
    }
    return sums;
}

namespace {

Interval percentile_interval(std::vector<double> values, double confidence) {
    values.erase(std::remove_if(values.begin(), values.end(), [](double v) { return !std::isfinite(v); }), values.end());
    if (values.empty()) return {not_a_number, not_a_number};
    std::sort(values.begin(), values.end());
    const double tail = (1.0 - confidence) / 2.0;
    return {quantile_sorted(values, tail), quantile_sorted(values, 1.0 - tail)};
}

// Period boundaries covering [first, last]: calendar months in the zone, or
// fixed blocks of days starting at `origin`. Returns starts and labels.
struct Periods {
    std::vector<Instant> starts;  // ascending; period p is [starts[p], starts[p + 1])
    std::vector<std::string> labels;
};

Periods make_periods(Instant first, Instant last, Instant origin, const EvaluationOptions& o) {
    Periods p;
    if (o.drift_period_days > 0) {
        const Seconds length = days(o.drift_period_days);
        Instant start = origin <= first ? origin + (first - origin) / length * length
                                        : origin - ((origin - first + length - 1) / length) * length;
        for (; start <= last; start += length) {
            p.starts.push_back(start);
            p.labels.push_back(format_local(start, o.zone).substr(0, 10));
        }
        return p;
    }
    CivilTime c = o.zone.to_local(first);
    c.day = 1;
    c.hour = c.minute = c.second = 0;
    for (;;) {
        const Instant start = o.zone.from_local(c);
        if (start > last) break;
        p.starts.push_back(start);
        char label[16];
        std::snprintf(label, sizeof label, "%04d-%02d", c.year, c.month);
        p.labels.emplace_back(label);
        if (++c.month > 12) {
            c.month = 1;
            ++c.year;
        }
    }
    return p;
}
std::vector<std::int32_t> horizon_limits(const std::vector<double>& horizons_hours) {
    std::vector<std::int32_t> limits;
    for (double h : horizons_hours) limits.push_back(horizon_limit_seconds(h));
    return limits;
}

// AUC of every bootstrap replicate, per horizon: [horizon][replicate].
std::vector<std::vector<double>> bootstrap_auc_by_horizon(const Population& pop, const RankedPredictions& r,
                                                          const std::vector<std::int32_t>& limits,
                                                          const EvaluationOptions& o) {
    std::vector<std::vector<double>> replicates(limits.size());
    for (const auto& sums : bootstrap_auc_sums(r, limits, pop.encounters.size(), o))
        for (std::size_t h = 0; h < limits.size(); ++h) replicates[h].push_back(sums[h].auc());
    return replicates;
}

// A case has a positive prediction exactly when its latest usable score
// (the one closest to time zero) is within the horizon.
std::int64_t cases_with_positive_prediction(const Population& pop, const RankedPredictions& r, std::int32_t limit) {
    std::int64_t with_positive = 0;
    for (std::uint32_t e : r.encounters_used) {
        const Encounter& enc = pop.encounters[e];
        if (!enc.outcome_at) continue;
        const Score& last = pop.scores_of(e).back();
        if (*enc.outcome_at - last.available_at <= limit) ++with_positive;
    }
    return with_positive;
}

Interval bootstrap_interval(const std::vector<double>& replicates, const EvaluationOptions& o) {
    return o.bootstrap_replicates > 0 ? percentile_interval(replicates, o.confidence)
                                      : Interval{not_a_number, not_a_number};
}

}  // namespace

std::vector<PredictionAuc> prediction_auc_from_ranked(const Population& pop, const RankedPredictions& r,
                                                      const EvaluationOptions& o) {
    const std::vector<std::int32_t> limits = horizon_limits(o.horizons_hours);
    const auto point = auc_sums_by_horizon(r, limits, {});
    const auto replicates = bootstrap_auc_by_horizon(pop, r, limits, o);
    std::vector<PredictionAuc> out;
    for (std::size_t h = 0; h < limits.size(); ++h) {
        PredictionAuc a;
        a.horizon_hours = o.horizons_hours[h];
        a.predictions = static_cast<std::int64_t>(r.value.size());
        a.positive_predictions = point[h].positives;
        a.encounters = static_cast<std::int64_t>(r.encounters_used.size());
        a.encounters_with_positive = cases_with_positive_prediction(pop, r, limits[h]);
        a.auc = point[h].auc();
        a.interval = bootstrap_interval(replicates[h], o);
        a.bootstrap_replicates = o.bootstrap_replicates;
        out.push_back(a);
    }
    return out;
}

namespace {

// Every prediction's probability and label in ranked order, the same
// grouped by distinct score (for the recalibration fit), and the sums per
// encounter (for the encounter bootstrap of O/E).
struct LabelledProbabilities {
    std::vector<double> p;
    std::vector<std::uint8_t> y;
    std::vector<double> group_p, group_trials, group_events;
    std::vector<double> observed_by_encounter, expected_by_encounter;
};

LabelledProbabilities label_probabilities(const Population& pop, const RankedPredictions& r,
                                          const ProbabilityMapping& m) {
    const std::int32_t limit = horizon_limit_seconds(m.horizon_hours);
    const std::size_t n = r.value.size();
    LabelledProbabilities l;
    l.p.resize(n);
    l.y.resize(n);
    l.observed_by_encounter.assign(pop.encounters.size(), 0.0);
    l.expected_by_encounter.assign(pop.encounters.size(), 0.0);
    for (std::size_t i = 0; i < n; ++i) {
        l.p[i] = m.probability(r.value[i]);
        if (!(l.p[i] >= 0.0 && l.p[i] <= 1.0))
            throw std::invalid_argument("evaluation: the probability mapping turns score " + format_real(r.value[i]) +
                                        " into " + format_real(l.p[i]) + ", outside [0, 1] (points out of 100 need divide:100)");
        l.y[i] = r.seconds_to_outcome[i] <= limit ? 1 : 0;
        if (i == 0 || r.value[i] != r.value[i - 1]) {
            l.group_p.push_back(l.p[i]);
            l.group_trials.push_back(0.0);
            l.group_events.push_back(0.0);
        }
        l.group_trials.back() += 1.0;
        l.group_events.back() += l.y[i];
        l.observed_by_encounter[r.encounter[i]] += l.y[i];
        l.expected_by_encounter[r.encounter[i]] += l.p[i];
    }
    return l;
}

ObservedExpected observed_expected_of_groups(const LabelledProbabilities& l, double confidence) {
    double observed = 0.0, expected = 0.0;
    for (std::size_t k = 0; k < l.group_p.size(); ++k) {
        observed += l.group_events[k];
        expected += l.group_trials[k] * l.group_p[k];
    }
    return observed_expected_from_sums(static_cast<std::int64_t>(l.p.size()), observed, expected, confidence);
}

Interval bootstrap_oe_interval(const Population& pop, const RankedPredictions& r, const LabelledProbabilities& l,
                               const EvaluationOptions& o) {
    std::vector<double> ratios(static_cast<std::size_t>(o.bootstrap_replicates));
    parallel_for(ratios.size(), o.threads, [&](std::size_t b) {
        const auto w = bootstrap_multiplicities(r.encounters_used, pop.encounters.size(), o, static_cast<int>(b));
        double observed = 0.0, expected = 0.0;
        for (std::uint32_t e : r.encounters_used) {
            observed += w[e] * l.observed_by_encounter[e];
            expected += w[e] * l.expected_by_encounter[e];
        }
        ratios[b] = expected > 0 ? observed / expected : not_a_number;
    });
    return bootstrap_interval(ratios, o);
}

}  // namespace

void calibration_from_ranked(const Population& pop, const RankedPredictions& r, const EvaluationOptions& o,
                             Evaluation& ev) {
    if (!o.probability || r.value.empty()) return;
    const LabelledProbabilities l = label_probabilities(pop, r, *o.probability);
    CalibrationSummary c;
    c.horizon_hours = o.probability->horizon_hours;
    c.observed_expected = observed_expected_of_groups(l, o.confidence);
    c.oe_bootstrap = bootstrap_oe_interval(pop, r, l, o);
    c.recalibration = logistic_recalibration_grouped(l.group_p, l.group_trials, l.group_events);
    ev.calibration = c;
    ev.calibration_bins = binned_calibration(l.p, l.y, o.calibration_groups, o.confidence);
    ev.calibration_smoothed = smoothed_calibration(l.p, l.y, o.smoothed_points);
}

namespace {

// The drift check's label: the mapping's horizon, else the first horizon.
double drift_horizon_hours(const EvaluationOptions& o) {
    if (o.probability) return o.probability->horizon_hours;
    return o.horizons_hours.empty() ? 0.0 : o.horizons_hours.front();
}

// The period holding instant t (periods.starts[0] <= t). Up to a few dozen
// periods (months of a year), counting the starts at or before t without a
// branch beats a binary search whose every step is a coin toss.
std::size_t period_of(const std::vector<Instant>& starts, Instant t) {
    if (starts.size() > 48)
        return static_cast<std::size_t>(std::upper_bound(starts.begin(), starts.end(), t) - starts.begin() - 1);
    std::size_t period = 0;
    for (std::size_t q = 1; q < starts.size(); ++q) period += starts[q] <= t;
    return period;
}

struct PeriodSums {
    std::vector<AucSums> auc;
    std::vector<double> expected;  // sum of probabilities (0 without a mapping)
};

// AUC sums and expected outcomes per period in one ascending pass; tied
// scores of one period enter its Mann-Whitney sum together.
PeriodSums sums_by_period(const RankedPredictions& r, const Periods& periods, std::int32_t limit,
                          const EvaluationOptions& o) {
    const std::size_t k = periods.starts.size();
    PeriodSums sums{std::vector<AucSums>(k), std::vector<double>(k, 0.0)};
    std::vector<std::int64_t> pos(k, 0), neg(k, 0);
    std::vector<std::uint32_t> touched;
    std::vector<char> is_touched(k, 0);
    const std::size_t n = r.value.size();
    std::size_t i = 0;
    while (i < n) {
        const double v = r.value[i];
        const double p = o.probability ? o.probability->probability(v) : 0.0;
        for (; i < n && r.value[i] == v; ++i) {
            const auto period = static_cast<std::uint32_t>(period_of(periods.starts, r.available_at[i]));
            if (!is_touched[period]) {
                is_touched[period] = 1;
                touched.push_back(period);
            }
            (r.seconds_to_outcome[i] <= limit ? pos[period] : neg[period]) += 1;
            sums.expected[period] += p;
        }
        for (std::uint32_t q : touched) {
            AucSums& a = sums.auc[q];
            a.twice_u += pos[q] * (2 * a.negatives + neg[q]);
            a.negatives += neg[q];
            a.positives += pos[q];
            pos[q] = neg[q] = 0;
            is_touched[q] = 0;
        }
        touched.clear();
    }
    return sums;
}

}  // namespace

std::vector<DriftPeriod> drift_from_ranked(const Population& pop, const RankedPredictions& r,
                                           const EvaluationOptions& o) {
    std::vector<DriftPeriod> out;
    if (r.value.empty()) return out;
    const double horizon = drift_horizon_hours(o);
    const auto [first_it, last_it] = std::minmax_element(r.available_at.begin(), r.available_at.end());
    const Periods periods = make_periods(*first_it, *last_it, pop.period_start, o);
    const PeriodSums sums = sums_by_period(r, periods, horizon_limit_seconds(horizon), o);
    for (std::size_t q = 0; q < periods.starts.size(); ++q) {
        const AucSums& a = sums.auc[q];
        DriftPeriod d;
        d.label = periods.labels[q];
        d.start = format_local(periods.starts[q], o.zone);
        d.horizon_hours = horizon;
        d.horizon_source = o.probability ? drift_horizon_mapping : drift_horizon_first;
        d.predictions = a.positives + a.negatives;
        d.positive_predictions = a.positives;
        d.auc = a.auc();
        if (o.probability)
            d.observed_expected = observed_expected_from_sums(d.predictions, static_cast<double>(a.positives),
                                                              sums.expected[q], o.confidence);
        out.push_back(std::move(d));
    }
    return out;
}

}  // namespace tocsin
