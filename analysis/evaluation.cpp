#include "analysis/evaluation.hpp"

#include <algorithm>
#include <boost/random/uniform_int_distribution.hpp>
#include <climits>
#include <cmath>
#include <cstdio>
#include <limits>
#include <stdexcept>

#include "analysis/calibration.hpp"
#include "analysis/net_benefit.hpp"
#include "analysis/quantiles.hpp"
#include "analysis/roc.hpp"
#include "models/random_streams.hpp"

namespace tocsin {

namespace {

constexpr double not_a_number = std::numeric_limits<double>::quiet_NaN();
// seconds_to_outcome of a prediction on an encounter without an outcome.
constexpr std::int32_t no_outcome = INT32_MAX;
// Horizon limit meaning "before the end of the stay": every case's prediction qualifies.
constexpr std::int32_t rest_of_stay = INT32_MAX - 1;

Cell real_or_empty(double v) { return std::isfinite(v) ? Cell{v} : Cell{std::monostate{}}; }

std::int32_t horizon_limit_seconds(double horizon_hours) {
    if (horizon_hours == 0.0) return rest_of_stay;
    return static_cast<std::int32_t>(std::min<double>(std::llround(horizon_hours * 3600.0), rest_of_stay));
}

Cell horizon_cell(double horizon_hours) {
    return horizon_hours == 0.0 ? Cell{std::monostate{}} : Cell{horizon_hours};
}

std::string horizon_text(double horizon_hours) {
    return horizon_hours == 0.0 ? std::string("before discharge") : "within " + format_real(horizon_hours) + " h";
}

void validate(const EvaluationOptions& o) {
    if (!(o.confidence > 0.0 && o.confidence < 1.0)) throw std::invalid_argument("evaluation: confidence must be in (0, 1)");
    for (double h : o.horizons_hours)
        if (!(h > 0.0)) throw std::invalid_argument("evaluation: every horizon must be a positive number of hours");
    if (!(o.window_hours > 0.0)) throw std::invalid_argument("evaluation: window_hours must be positive");
    if (!(o.min_lead_hours >= 0.0)) throw std::invalid_argument("evaluation: min_lead_hours must not be negative");
    if (o.bootstrap_replicates < 0) throw std::invalid_argument("evaluation: bootstrap_replicates must not be negative");
    if (o.drift_period_days < 0) throw std::invalid_argument("evaluation: drift_period_days must not be negative");
    if (o.probability) {
        const ProbabilityMapping& m = *o.probability;
        // Every measure orders predictions by score; a mapping that reversed
        // that order would silently turn the calibration curve around.
        if (m.kind == ProbabilityMapping::Kind::divide && !(m.divisor > 0.0))
            throw std::invalid_argument("evaluation: probability divisor must be positive (higher score, higher risk)");
        if (m.kind == ProbabilityMapping::Kind::logistic && !(m.slope > 0.0))
            throw std::invalid_argument("evaluation: probability slope must be positive (higher score, higher risk)");
        if (!(m.horizon_hours >= 0.0)) throw std::invalid_argument("evaluation: probability horizon must not be negative");
    }
    for (double pt : o.decision_threshold_probabilities)
        if (!(pt > 0.0 && pt < 1.0)) throw std::invalid_argument("evaluation: decision threshold probabilities must be in (0, 1)");
    for (double n : o.evaluations_per_case)
        if (!(n > 1.0)) throw std::invalid_argument("evaluation: evaluations per case found must be greater than 1");
}

// Every usable score, in ascending order of value, with what each measure
// needs next to it (so later passes read memory in order).
struct RankedPredictions {
    std::vector<double> value;
    std::vector<std::uint32_t> encounter;
    std::vector<std::int32_t> seconds_to_outcome;  // no_outcome for non-cases
    std::vector<Instant> available_at;
    std::vector<std::uint32_t> encounters_used;  // encounters with at least one prediction, ascending
};

RankedPredictions rank_predictions(const Population& pop) {
    const std::size_t n = pop.scores.size();
    RankedPredictions r;
    std::vector<std::uint32_t> order;
    {
        std::vector<double> values(n);
        for (std::size_t i = 0; i < n; ++i) values[i] = pop.scores[i].value;
        order = ascending_order(values);
    }
    std::vector<std::uint32_t> owner(n);
    for (std::size_t e = 0; e < pop.encounters.size(); ++e) {
        if (pop.score_start[e + 1] > pop.score_start[e]) r.encounters_used.push_back(static_cast<std::uint32_t>(e));
        for (std::size_t i = pop.score_start[e]; i < pop.score_start[e + 1]; ++i) owner[i] = static_cast<std::uint32_t>(e);
    }
    r.value.resize(n);
    r.encounter.resize(n);
    r.seconds_to_outcome.resize(n);
    r.available_at.resize(n);
    for (std::size_t i = 0; i < n; ++i) {
        const std::uint32_t s = order[i];
        const Score& score = pop.scores[s];
        const Encounter& enc = pop.encounters[owner[s]];
        r.value[i] = score.value;
        r.encounter[i] = owner[s];
        r.available_at[i] = score.available_at;
        if (enc.outcome_at) {
            const std::int64_t ahead = *enc.outcome_at - score.available_at;  // > 0 for a usable score
            r.seconds_to_outcome[i] = static_cast<std::int32_t>(std::min<std::int64_t>(ahead, rest_of_stay));
        } else {
            r.seconds_to_outcome[i] = no_outcome;
        }
    }
    return r;
}

struct AucSums {
    std::int64_t twice_u = 0, positives = 0, negatives = 0;
    double auc() const {
        return positives && negatives ? static_cast<double>(twice_u) /
                                            (2.0 * static_cast<double>(positives) * static_cast<double>(negatives))
                                      : not_a_number;
    }
};

// AUC at several horizons in one ascending pass. `weights` (per encounter)
// gives each prediction its encounter's bootstrap multiplicity; empty = 1.
std::vector<AucSums> auc_by_horizon(const RankedPredictions& r, const std::vector<std::int32_t>& limits,
                                    const std::vector<std::uint32_t>& weights) {
    const std::size_t n = r.value.size(), k = limits.size();
    std::vector<AucSums> sums(k);
    std::vector<std::int64_t> pos(k);
    std::size_t i = 0;
    while (i < n) {
        std::fill(pos.begin(), pos.end(), 0);
        std::int64_t group = 0;
        const double v = r.value[i];
        // Branch-free on purpose: a third of bootstrap weights are 0 and the
        // labels are unpredictable, so multiplying beats skipping.
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

// Multiplicity of each encounter in bootstrap replicate b: |used| draws with
// replacement from the encounters that have predictions. One stream per
// replicate, so a replicate does not depend on how many came before it.
std::vector<std::uint32_t> bootstrap_weights(const std::vector<std::uint32_t>& used, std::size_t encounters,
                                             const EvaluationOptions& o, int replicate) {
    std::vector<std::uint32_t> w(encounters, 0);
    if (used.empty()) return w;
    RandomEngine engine = make_stream(o.seed, o.replication, StreamPurpose::evaluation_bootstrap,
                                      static_cast<std::uint64_t>(replicate));
    boost::random::uniform_int_distribution<std::size_t> pick(0, used.size() - 1);
    for (std::size_t d = 0; d < used.size(); ++d) ++w[used[pick(engine)]];
    return w;
}

Interval percentile_interval(std::vector<double> values, double confidence) {
    values.erase(std::remove_if(values.begin(), values.end(), [](double v) { return !std::isfinite(v); }), values.end());
    if (values.empty()) return {not_a_number, not_a_number};
    std::sort(values.begin(), values.end());
    const double tail = (1.0 - confidence) / 2.0;
    return {quantile_sorted(values, tail), quantile_sorted(values, 1.0 - tail)};
}

Table make_table(std::string name, std::string title, std::vector<std::string> columns) {
    Table t;
    t.name = std::move(name);
    t.title = std::move(title);
    t.columns = std::move(columns);
    return t;
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

}  // namespace

double ProbabilityMapping::probability(double score) const {
    switch (kind) {
        case Kind::as_is: return score;
        case Kind::divide: return score / divisor;
        case Kind::logistic: {
            const double x = intercept + slope * score;
            return x >= 0 ? 1.0 / (1.0 + std::exp(-x)) : std::exp(x) / (1.0 + std::exp(x));
        }
    }
    return not_a_number;
}

std::vector<EncounterScore> encounter_level_scores(const Population& pop) {
    std::vector<EncounterScore> out;
    for (std::size_t e = 0; e < pop.encounters.size(); ++e) {
        const auto scores = pop.scores_of(e);
        if (scores.empty()) continue;
        double highest = scores.front().value;
        for (const Score& s : scores) highest = std::max(highest, s.value);
        out.push_back({static_cast<std::uint32_t>(e), highest, pop.encounters[e].outcome_at.has_value()});
    }
    return out;
}

Table evaluation_counts(const Population& pop) {
    Table t = make_table("evaluation_counts", "What the evaluation counted", {"item", "count"});
    std::int64_t with_score = 0, cases = 0, cases_with_score = 0;
    for (std::size_t e = 0; e < pop.encounters.size(); ++e) {
        const bool scored = !pop.scores_of(e).empty();
        const bool is_case = pop.encounters[e].outcome_at.has_value();
        with_score += scored;
        cases += is_case;
        cases_with_score += scored && is_case;
    }
    const auto n = static_cast<std::int64_t>(pop.encounters.size());
    t.add_row({std::string("encounters"), n});
    t.add_row({std::string("encounters with a usable score"), with_score});
    t.add_row({std::string("encounters without a usable score (left out of every measure)"), n - with_score});
    t.add_row({std::string("cases (encounters with an outcome)"), cases});
    t.add_row({std::string("cases with a usable score"), cases_with_score});
    t.add_row({std::string("usable scores (predictions)"), static_cast<std::int64_t>(pop.scores.size())});
    for (const auto& [reason, count] : pop.excluded.scores_by_reason)
        t.add_row({"scores excluded: " + reason, count});
    for (const auto& [reason, count] : pop.excluded.encounters_by_reason)
        t.add_row({"encounters excluded: " + reason, count});
    for (const auto& [note, count] : pop.excluded.notes) t.add_row({"note: " + note, count});
    return t;
}

Table encounter_auc_table(const std::vector<EncounterScore>& scores, double confidence) {
    Table t = make_table("evaluation_encounter_auc", "Encounter-level discrimination (highest score before time zero)",
                         {"level", "encounters", "cases", "non_cases", "auc", "auc_se", "auc_lower", "auc_upper",
                          "confidence", "interval_method"});
    std::vector<double> values;
    std::vector<std::uint8_t> labels;
    for (const EncounterScore& s : scores) {
        values.push_back(s.highest_score);
        labels.push_back(s.is_case ? 1 : 0);
    }
    const AucEstimate a = auc_delong(values, labels, confidence);
    t.add_row({std::string("encounter"), static_cast<std::int64_t>(scores.size()), a.positives, a.negatives,
               real_or_empty(a.auc), real_or_empty(a.standard_error), real_or_empty(a.interval.lower),
               real_or_empty(a.interval.upper), confidence, std::string("DeLong 1988")});
    return t;
}

ThresholdList evaluation_thresholds(const std::vector<EncounterScore>& scores, const EvaluationOptions& o) {
    ThresholdList list;
    if (o.threshold_grid_points > 0 && !scores.empty()) {
        double lo = scores.front().highest_score, hi = lo;
        for (const EncounterScore& s : scores) {
            lo = std::min(lo, s.highest_score);
            hi = std::max(hi, s.highest_score);
        }
        for (double t : even_grid(lo, hi, o.threshold_grid_points)) {
            list.values.push_back(t);
            list.source.emplace_back("grid");
        }
    }
    for (double t : o.thresholds) {
        list.values.push_back(t);
        list.source.emplace_back("given");
    }
    return list;
}

namespace {

Table prediction_auc_from_ranked(const Population& pop, const RankedPredictions& r, const EvaluationOptions& o) {
    Table t = make_table("evaluation_prediction_auc", "Prediction-level discrimination by horizon",
                         {"horizon_hours", "predictions", "positive_predictions", "encounters",
                          "encounters_with_positive", "auc", "auc_lower", "auc_upper", "bootstrap_replicates",
                          "interval_method"});
    std::vector<std::int32_t> limits;
    for (double h : o.horizons_hours) limits.push_back(horizon_limit_seconds(h));
    const auto point = auc_by_horizon(r, limits, {});
    std::vector<std::vector<double>> replicates(limits.size());
    for (int b = 0; b < o.bootstrap_replicates; ++b) {
        const auto w = bootstrap_weights(r.encounters_used, pop.encounters.size(), o, b);
        const auto sums = auc_by_horizon(r, limits, w);
        for (std::size_t h = 0; h < limits.size(); ++h) replicates[h].push_back(sums[h].auc());
    }
    for (std::size_t h = 0; h < limits.size(); ++h) {
        // A case has a positive prediction exactly when its latest usable score
        // (the one closest to time zero) is within the horizon.
        std::int64_t with_positive = 0;
        for (std::uint32_t e : r.encounters_used) {
            const Encounter& enc = pop.encounters[e];
            if (!enc.outcome_at) continue;
            const Score& last = pop.scores_of(e).back();  // latest available: closest to time zero
            if (*enc.outcome_at - last.available_at <= limits[h]) ++with_positive;
        }
        const Interval ci = o.bootstrap_replicates > 0 ? percentile_interval(replicates[h], o.confidence)
                                                      : Interval{not_a_number, not_a_number};
        t.add_row({o.horizons_hours[h], static_cast<std::int64_t>(r.value.size()), point[h].positives,
                   static_cast<std::int64_t>(r.encounters_used.size()), with_positive, real_or_empty(point[h].auc()),
                   real_or_empty(ci.lower), real_or_empty(ci.upper), static_cast<std::int64_t>(o.bootstrap_replicates),
                   std::string(o.bootstrap_replicates > 0 ? "encounter bootstrap, percentile" : "none")});
    }
    return t;
}

struct CalibrationTables {
    Table summary, bins, smoothed;
};

CalibrationTables calibration_from_ranked(const Population& pop, const RankedPredictions& r,
                                          const EvaluationOptions& o) {
    CalibrationTables out;
    out.summary = make_table("evaluation_calibration", "Calibration of the predicted probability",
                             {"outcome", "horizon_hours", "predictions", "observed", "expected", "oe_ratio",
                              "oe_lower", "oe_upper", "oe_bootstrap_lower", "oe_bootstrap_upper",
                              "calibration_intercept", "calibration_intercept_se", "calibration_slope",
                              "calibration_slope_se", "calibration_in_the_large", "calibration_in_the_large_se",
                              "probabilities_clamped", "converged"});
    out.bins = make_table("evaluation_calibration_bins", "Calibration by equal-count groups of predicted probability",
                          {"group", "predictions", "outcomes", "predicted_low", "predicted_high", "mean_predicted",
                           "observed", "observed_lower", "observed_upper"});
    out.smoothed = make_table("evaluation_calibration_smoothed",
                              "Smoothed calibration curve (Gaussian kernel on logit scale)",
                              {"predicted", "observed", "effective_n", "bandwidth_logit", "method"});
    if (!o.probability || r.value.empty()) return out;
    const ProbabilityMapping& m = *o.probability;
    const std::int32_t limit = horizon_limit_seconds(m.horizon_hours);
    const std::size_t n = r.value.size();

    std::vector<double> p(n);
    std::vector<std::uint8_t> y(n);
    std::vector<double> group_p, group_trials, group_events;
    std::vector<double> observed_by_encounter(pop.encounters.size(), 0.0), expected_by_encounter(pop.encounters.size(), 0.0);
    for (std::size_t i = 0; i < n; ++i) {
        p[i] = m.probability(r.value[i]);
        if (!(p[i] >= 0.0 && p[i] <= 1.0))
            throw std::invalid_argument("evaluation: the probability mapping turns score " + format_real(r.value[i]) +
                                        " into " + format_real(p[i]) + ", outside [0, 1] (points out of 100 need divide:100)");
        y[i] = r.seconds_to_outcome[i] <= limit ? 1 : 0;
        if (i == 0 || r.value[i] != r.value[i - 1]) {
            group_p.push_back(p[i]);
            group_trials.push_back(0.0);
            group_events.push_back(0.0);
        }
        group_trials.back() += 1.0;
        group_events.back() += y[i];
        observed_by_encounter[r.encounter[i]] += y[i];
        expected_by_encounter[r.encounter[i]] += p[i];
    }
    double observed = 0.0, expected = 0.0;
    for (std::size_t k = 0; k < group_p.size(); ++k) {
        observed += group_events[k];
        expected += group_trials[k] * group_p[k];
    }
    const ObservedExpected oe = observed_expected_from_sums(static_cast<std::int64_t>(n), observed, expected, o.confidence);
    std::vector<double> boot;
    for (int b = 0; b < o.bootstrap_replicates; ++b) {
        const auto w = bootstrap_weights(r.encounters_used, pop.encounters.size(), o, b);
        double ob = 0.0, ex = 0.0;
        for (std::uint32_t e : r.encounters_used) {
            ob += w[e] * observed_by_encounter[e];
            ex += w[e] * expected_by_encounter[e];
        }
        boot.push_back(ex > 0 ? ob / ex : not_a_number);
    }
    const Interval boot_ci = o.bootstrap_replicates > 0 ? percentile_interval(boot, o.confidence)
                                                       : Interval{not_a_number, not_a_number};
    const LogisticRecalibration fit = logistic_recalibration_grouped(group_p, group_trials, group_events);
    out.summary.add_row({horizon_text(m.horizon_hours), horizon_cell(m.horizon_hours), static_cast<std::int64_t>(n),
                         observed, expected, real_or_empty(oe.ratio), real_or_empty(oe.interval.lower),
                         real_or_empty(oe.interval.upper), real_or_empty(boot_ci.lower), real_or_empty(boot_ci.upper),
                         real_or_empty(fit.intercept), real_or_empty(fit.intercept_se), real_or_empty(fit.slope),
                         real_or_empty(fit.slope_se), real_or_empty(fit.calibration_in_the_large),
                         real_or_empty(fit.calibration_in_the_large_se), fit.clamped,
                         std::string(fit.converged ? "yes" : "no")});
    const auto bins = binned_calibration(p, y, o.calibration_groups, o.confidence);
    for (std::size_t k = 0; k < bins.size(); ++k) {
        const CalibrationBin& b = bins[k];
        out.bins.add_row({static_cast<std::int64_t>(k + 1), b.predictions, b.outcomes, b.predicted_low, b.predicted_high,
                          b.mean_predicted, b.observed, b.observed_interval.lower, b.observed_interval.upper});
    }
    const SmoothedCurve curve = smoothed_calibration(p, y, o.smoothed_points);
    for (const SmoothedPoint& s : curve.points)
        out.smoothed.add_row({s.predicted, real_or_empty(s.observed), s.effective_n, curve.bandwidth_logit,
                              std::string("Nadaraya-Watson, Gaussian kernel, 2048 linear bins (Wand 1994)")});
    return out;
}

Table drift_from_ranked(const Population& pop, const RankedPredictions& r, const EvaluationOptions& o) {
    Table t = make_table("evaluation_drift", "Discrimination and calibration by period",
                         {"period", "period_start", "outcome", "horizon_hours", "predictions", "positive_predictions",
                          "auc", "observed", "expected", "oe_ratio", "oe_lower", "oe_upper"});
    if (r.value.empty()) return t;
    const double horizon = o.probability ? o.probability->horizon_hours
                                         : (o.horizons_hours.empty() ? 0.0 : o.horizons_hours.front());
    const std::int32_t limit = horizon_limit_seconds(horizon);
    const auto [first_it, last_it] = std::minmax_element(r.available_at.begin(), r.available_at.end());
    const Periods periods = make_periods(*first_it, *last_it, pop.period_start, o);
    const std::size_t k = periods.starts.size();
    std::vector<AucSums> sums(k);
    std::vector<std::int64_t> pos(k, 0), neg(k, 0);
    std::vector<double> expected(k, 0.0);
    std::vector<std::uint32_t> touched;
    std::vector<char> is_touched(k, 0);
    const std::size_t n = r.value.size();
    std::size_t i = 0;
    while (i < n) {
        const double v = r.value[i];
        const double p = o.probability ? o.probability->probability(v) : 0.0;
        for (; i < n && r.value[i] == v; ++i) {
            const auto at = std::upper_bound(periods.starts.begin(), periods.starts.end(), r.available_at[i]);
            const auto period = static_cast<std::uint32_t>(at - periods.starts.begin() - 1);
            if (!is_touched[period]) {
                is_touched[period] = 1;
                touched.push_back(period);
            }
            (r.seconds_to_outcome[i] <= limit ? pos[period] : neg[period]) += 1;
            expected[period] += p;
        }
        for (std::uint32_t q : touched) {
            sums[q].twice_u += pos[q] * (2 * sums[q].negatives + neg[q]);
            sums[q].negatives += neg[q];
            sums[q].positives += pos[q];
            pos[q] = neg[q] = 0;
            is_touched[q] = 0;
        }
        touched.clear();
    }
    for (std::size_t q = 0; q < k; ++q) {
        const std::int64_t count = sums[q].positives + sums[q].negatives;
        std::vector<Cell> row{periods.labels[q], format_local(periods.starts[q], o.zone), horizon_text(horizon),
                              horizon_cell(horizon), count, sums[q].positives, real_or_empty(sums[q].auc())};
        if (o.probability) {
            const ObservedExpected oe = observed_expected_from_sums(count, static_cast<double>(sums[q].positives),
                                                                    expected[q], o.confidence);
            for (double v : {oe.observed, oe.expected, oe.ratio, oe.interval.lower, oe.interval.upper})
                row.push_back(real_or_empty(v));
        } else {
            for (int c = 0; c < 5; ++c) row.emplace_back(std::monostate{});
        }
        t.add_row(std::move(row));
    }
    return t;
}

Table decision_curve_for(const std::vector<EncounterScore>& scores, const EvaluationOptions& o) {
    if (!o.probability) {
        return decision_curve_table({}, 0, {}, "evaluation_decision_curve",
                                    "Decision curve (needs a probability mapping)");
    }
    std::vector<double> thresholds;
    std::vector<std::string> source;
    if (o.decision_threshold_probabilities.empty()) {
        for (int i = 1; i <= 50; ++i) {
            thresholds.push_back(i / 100.0);
            source.emplace_back("grid");
        }
    } else {
        for (double pt : o.decision_threshold_probabilities) {
            thresholds.push_back(pt);
            source.emplace_back("given");
        }
    }
    for (double n : o.evaluations_per_case) {
        thresholds.push_back(threshold_probability_from_evaluations_per_case(n));
        source.emplace_back("evaluations_per_case");
    }
    std::vector<double> p;
    std::vector<std::uint8_t> y;
    for (const EncounterScore& s : scores) {
        p.push_back(o.probability->probability(s.highest_score));
        y.push_back(s.is_case ? 1 : 0);
    }
    return decision_curve_table(decision_curve(p, y, thresholds), static_cast<std::int64_t>(p.size()), source,
                                "evaluation_decision_curve",
                                "Decision curve: evaluate an encounter once its probability reaches the threshold");
}

}  // namespace

Table prediction_auc_table(const Population& pop, const EvaluationOptions& o) {
    validate(o);
    return prediction_auc_from_ranked(pop, rank_predictions(pop), o);
}

std::vector<double> first_crossing_lead_hours(const Population& pop, double threshold, double window_hours) {
    const Seconds window = static_cast<Seconds>(std::llround(window_hours * 3600.0));
    std::vector<double> out;
    for (std::size_t e = 0; e < pop.encounters.size(); ++e) {
        const Encounter& enc = pop.encounters[e];
        if (!enc.outcome_at) continue;
        for (const Score& s : pop.scores_of(e)) {  // in the order of availability
            if (s.available_at < *enc.outcome_at - window || s.value < threshold) continue;
            out.push_back(static_cast<double>(*enc.outcome_at - s.available_at) / 3600.0);
            break;
        }
    }
    return out;
}

Table lead_time_table(const Population& pop, const std::vector<double>& thresholds, double window_hours,
                      double min_lead_hours) {
    Table t = make_table("evaluation_lead_times", "Lead time from the first score at or above the threshold to time zero",
                         {"threshold", "cases", "cases_crossed", "share_crossed", "lead_hours_p10", "lead_hours_p25",
                          "lead_hours_median", "lead_hours_p75", "lead_hours_p90", "cases_late", "share_late",
                          "min_lead_hours", "window_hours"});
    std::int64_t cases = 0;
    for (std::size_t e = 0; e < pop.encounters.size(); ++e)
        cases += pop.encounters[e].outcome_at.has_value() && !pop.scores_of(e).empty();
    for (double threshold : thresholds) {
        std::vector<double> lead = first_crossing_lead_hours(pop, threshold, window_hours);
        std::sort(lead.begin(), lead.end());
        const auto late = static_cast<std::int64_t>(std::lower_bound(lead.begin(), lead.end(), min_lead_hours) - lead.begin());
        const auto crossed = static_cast<std::int64_t>(lead.size());
        auto share = [&](std::int64_t k) { return cases ? Cell{static_cast<double>(k) / static_cast<double>(cases)} : Cell{}; };
        std::vector<Cell> row{threshold, cases, crossed, share(crossed)};
        for (double q : {0.10, 0.25, 0.50, 0.75, 0.90}) row.push_back(real_or_empty(quantile_sorted(lead, q)));
        row.insert(row.end(), {late, share(late), min_lead_hours, window_hours});
        t.add_row(std::move(row));
    }
    return t;
}

Evaluation evaluate(const Population& pop, const EvaluationOptions& o) {
    validate(o);
    Evaluation ev;
    ev.counts = evaluation_counts(pop);
    const auto encounter_scores = encounter_level_scores(pop);
    ev.encounter_auc = encounter_auc_table(encounter_scores, o.confidence);
    const ThresholdList thresholds = evaluation_thresholds(encounter_scores, o);
    {
        std::vector<double> values;
        std::vector<std::uint8_t> labels;
        for (const EncounterScore& s : encounter_scores) {
            values.push_back(s.highest_score);
            labels.push_back(s.is_case ? 1 : 0);
        }
        ev.thresholds = threshold_table(counts_at_thresholds(values, labels, thresholds.values), thresholds.source,
                                        o.confidence, "evaluation_thresholds",
                                        "Encounter level by threshold (flagged = highest score >= threshold)");
    }
    ev.lead_times = lead_time_table(pop, thresholds.values, o.window_hours, o.min_lead_hours);
    ev.decision_curve = decision_curve_for(encounter_scores, o);
    const RankedPredictions ranked = rank_predictions(pop);
    ev.prediction_auc = prediction_auc_from_ranked(pop, ranked, o);
    CalibrationTables c = calibration_from_ranked(pop, ranked, o);
    ev.calibration = std::move(c.summary);
    ev.calibration_bins = std::move(c.bins);
    ev.calibration_smoothed = std::move(c.smoothed);
    ev.drift = drift_from_ranked(pop, ranked, o);
    return ev;
}

std::vector<const Table*> evaluation_tables(const Evaluation& ev) {
    return {&ev.counts, &ev.encounter_auc, &ev.thresholds, &ev.prediction_auc, &ev.lead_times,
            &ev.calibration, &ev.calibration_bins, &ev.calibration_smoothed, &ev.drift, &ev.decision_curve};
}

namespace {

// Cell lookup by column name in row r; NaN when empty or not a number.
double number_at(const Table& t, std::size_t r, const std::string& column) {
    const auto it = std::find(t.columns.begin(), t.columns.end(), column);
    if (it == t.columns.end() || r >= t.rows.size()) return not_a_number;
    const Cell& c = t.rows[r][static_cast<std::size_t>(it - t.columns.begin())];
    if (const double* d = std::get_if<double>(&c)) return *d;
    if (const std::int64_t* i = std::get_if<std::int64_t>(&c)) return static_cast<double>(*i);
    return not_a_number;
}

std::string fixed(double v, int decimals) {
    if (!std::isfinite(v)) return "n/a";
    char buf[64];
    std::snprintf(buf, sizeof buf, "%.*f", decimals, v);
    return buf;
}

std::string with_interval(double v, double lo, double hi, int decimals) {
    std::string s = fixed(v, decimals);
    if (std::isfinite(lo) && std::isfinite(hi)) s += " (" + fixed(lo, decimals) + " to " + fixed(hi, decimals) + ")";
    return s;
}

}  // namespace

std::string evaluation_summary(const Evaluation& ev) {
    std::string s = "Model evaluation (figures rest on this population and its exclusions; not a medical device)\n";
    const Table& a = ev.encounter_auc;
    const double confidence = number_at(a, 0, "confidence");
    s += "  Encounters: " + fixed(number_at(a, 0, "encounters"), 0) + " with a usable score, " +
         fixed(number_at(a, 0, "cases"), 0) + " with the outcome\n";
    s += "  Encounter-level AUC: " +
         with_interval(number_at(a, 0, "auc"), number_at(a, 0, "auc_lower"), number_at(a, 0, "auc_upper"), 3) + ", " +
         fixed(100 * confidence, 0) + "% DeLong interval\n";
    for (std::size_t r = 0; r < ev.prediction_auc.rows.size(); ++r) {
        const Table& p = ev.prediction_auc;
        s += "  Prediction-level AUC, outcome within " + fixed(number_at(p, r, "horizon_hours"), 0) + " h: " +
             with_interval(number_at(p, r, "auc"), number_at(p, r, "auc_lower"), number_at(p, r, "auc_upper"), 3) +
             " over " + fixed(number_at(p, r, "predictions"), 0) + " predictions, " +
             fixed(number_at(p, r, "encounters"), 0) + " encounters\n";
    }
    if (!ev.calibration.rows.empty()) {
        const Table& c = ev.calibration;
        s += "  Calibration: observed/expected " +
             with_interval(number_at(c, 0, "oe_ratio"), number_at(c, 0, "oe_bootstrap_lower"),
                           number_at(c, 0, "oe_bootstrap_upper"), 2) +
             ", intercept " + fixed(number_at(c, 0, "calibration_intercept"), 2) + ", slope " +
             fixed(number_at(c, 0, "calibration_slope"), 2) + " (ideal: 1, 0, 1)\n";
    }
    for (std::size_t r = 0; r < ev.lead_times.rows.size(); ++r) {
        const Table& l = ev.lead_times;
        if (r < ev.thresholds.rows.size() && std::get<std::string>(ev.thresholds.rows[r][0]) != "given") continue;
        s += "  Threshold " + format_real(number_at(l, r, "threshold"), 4) + ": " +
             fixed(100 * number_at(l, r, "share_crossed"), 1) + "% of cases crossed it, median lead " +
             fixed(number_at(l, r, "lead_hours_median"), 1) + " h; sensitivity " +
             fixed(100 * number_at(ev.thresholds, r, "sensitivity"), 1) + "%, PPV " +
             fixed(100 * number_at(ev.thresholds, r, "ppv"), 1) + "%, flags " +
             fixed(100 * number_at(ev.thresholds, r, "share_flagged"), 1) + "% of encounters\n";
    }
    return s;
}

}  // namespace tocsin
