#include "analysis/evaluation.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <stdexcept>

#include "analysis/calibration.hpp"
#include "analysis/net_benefit.hpp"
#include "analysis/prediction_level.hpp"
#include "analysis/quantiles.hpp"
#include "analysis/roc.hpp"
#include "models/text.hpp"

namespace tocsin {

namespace {

constexpr double not_a_number = std::numeric_limits<double>::quiet_NaN();

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

EvaluationCounts evaluation_counts(const Population& pop) {
    EvaluationCounts c;
    for (std::size_t e = 0; e < pop.encounters.size(); ++e) {
        const bool scored = !pop.scores_of(e).empty();
        const bool is_case = pop.encounters[e].outcome_at.has_value();
        c.encounters_with_score += scored;
        c.cases += is_case;
        c.cases_with_score += scored && is_case;
    }
    c.encounters = static_cast<std::int64_t>(pop.encounters.size());
    c.predictions = static_cast<std::int64_t>(pop.scores.size());
    c.scores_excluded = pop.excluded.scores_by_reason;
    c.encounters_excluded = pop.excluded.encounters_by_reason;
    c.notes = pop.excluded.notes;
    return c;
}

namespace {

// The encounter level as two parallel columns: highest score, and 1 for a case.
struct EncounterLabels {
    std::vector<double> highest_score;
    std::vector<std::uint8_t> is_case;
};

EncounterLabels encounter_labels(const std::vector<EncounterScore>& scores) {
    EncounterLabels l;
    for (const EncounterScore& s : scores) {
        l.highest_score.push_back(s.highest_score);
        l.is_case.push_back(s.is_case ? 1 : 0);
    }
    return l;
}

}  // namespace

EncounterAuc encounter_level_auc(const std::vector<EncounterScore>& scores, double confidence) {
    const EncounterLabels l = encounter_labels(scores);
    const AucEstimate a = auc_delong(l.highest_score, l.is_case, confidence);
    EncounterAuc out;
    out.encounters = static_cast<std::int64_t>(scores.size());
    out.cases = a.positives;
    out.non_cases = a.negatives;
    out.auc = a.auc;
    out.standard_error = a.standard_error;
    out.interval = a.interval;
    out.confidence = confidence;
    return out;
}

std::vector<ThresholdMeasures> encounter_threshold_measures(const std::vector<EncounterScore>& scores,
                                                            const ThresholdList& thresholds, double confidence) {
    const EncounterLabels l = encounter_labels(scores);
    return threshold_measures(counts_at_thresholds(l.highest_score, l.is_case, thresholds.values), thresholds.source,
                              confidence);
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

// pt: the given ones or 0.01 to 0.50, then 1 / N for each N given.
void decision_thresholds(const EvaluationOptions& o, std::vector<double>& thresholds, std::vector<std::string>& source) {
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
}

std::optional<DecisionCurveResult> decision_curve_for(const std::vector<EncounterScore>& scores,
                                                      const EvaluationOptions& o) {
    if (!o.probability) return std::nullopt;
    DecisionCurveResult out;
    std::vector<double> thresholds;
    decision_thresholds(o, thresholds, out.source);
    std::vector<double> p;
    std::vector<std::uint8_t> y;
    for (const EncounterScore& s : scores) {
        p.push_back(o.probability->probability(s.highest_score));
        y.push_back(s.is_case ? 1 : 0);
    }
    out.encounters = static_cast<std::int64_t>(p.size());
    out.points = decision_curve(p, y, thresholds);
    return out;
}

}  // namespace

std::vector<PredictionAuc> prediction_level_auc(const Population& pop, const EvaluationOptions& o) {
    validate(o);
    return prediction_auc_from_ranked(pop, rank_predictions(pop, o.threads), o);
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

namespace {

LeadTimes lead_times_at(const Population& pop, double threshold, std::int64_t cases, double window_hours,
                        double min_lead_hours) {
    std::vector<double> lead = first_crossing_lead_hours(pop, threshold, window_hours);
    std::sort(lead.begin(), lead.end());
    LeadTimes l;
    l.threshold = threshold;
    l.cases = cases;
    l.cases_crossed = static_cast<std::int64_t>(lead.size());
    l.cases_late = static_cast<std::int64_t>(std::lower_bound(lead.begin(), lead.end(), min_lead_hours) - lead.begin());
    if (cases) {
        l.share_crossed = static_cast<double>(l.cases_crossed) / static_cast<double>(cases);
        l.share_late = static_cast<double>(l.cases_late) / static_cast<double>(cases);
    }
    l.p10_hours = quantile_sorted(lead, 0.10);
    l.p25_hours = quantile_sorted(lead, 0.25);
    l.median_hours = quantile_sorted(lead, 0.50);
    l.p75_hours = quantile_sorted(lead, 0.75);
    l.p90_hours = quantile_sorted(lead, 0.90);
    l.min_lead_hours = min_lead_hours;
    l.window_hours = window_hours;
    return l;
}

}  // namespace

std::vector<LeadTimes> lead_times_by_threshold(const Population& pop, const std::vector<double>& thresholds,
                                               double window_hours, double min_lead_hours) {
    std::int64_t cases = 0;
    for (std::size_t e = 0; e < pop.encounters.size(); ++e)
        cases += pop.encounters[e].outcome_at.has_value() && !pop.scores_of(e).empty();
    std::vector<LeadTimes> out;
    for (double threshold : thresholds) out.push_back(lead_times_at(pop, threshold, cases, window_hours, min_lead_hours));
    return out;
}

StayCalibration stay_level_calibration(const std::vector<EncounterScore>& scores, const ProbabilityMapping& m,
                                       int groups, double confidence) {
    std::vector<double> p;
    std::vector<std::uint8_t> y;
    for (const EncounterScore& s : scores) {
        p.push_back(m.probability(s.highest_score));
        if (!(p.back() >= 0.0 && p.back() <= 1.0))
            throw std::invalid_argument("evaluation: the probability mapping turns score " + format_real(s.highest_score) +
                                        " into " + format_real(p.back()) + ", outside [0, 1]");
        y.push_back(s.is_case ? 1 : 0);
    }
    StayCalibration c;
    c.observed_expected = observed_expected(p, y, confidence);
    c.recalibration = logistic_recalibration(p, y);
    if (!p.empty()) c.bins = binned_calibration(p, y, groups, confidence);
    return c;
}

Evaluation evaluate(const Population& pop, const EvaluationOptions& o) {
    validate(o);
    Evaluation ev;
    ev.counts = evaluation_counts(pop);
    const auto encounter_scores = encounter_level_scores(pop);
    ev.encounter_auc = encounter_level_auc(encounter_scores, o.confidence);
    const ThresholdList thresholds = evaluation_thresholds(encounter_scores, o);
    ev.thresholds = encounter_threshold_measures(encounter_scores, thresholds, o.confidence);
    ev.lead_times = lead_times_by_threshold(pop, thresholds.values, o.window_hours, o.min_lead_hours);
    ev.decision_curve = decision_curve_for(encounter_scores, o);
    const RankedPredictions ranked = rank_predictions(pop, o.threads);
    ev.prediction_auc = prediction_auc_from_ranked(pop, ranked, o);
    calibration_from_ranked(pop, ranked, o, ev);
    if (o.probability && !encounter_scores.empty())
        ev.stay_calibration = stay_level_calibration(encounter_scores, *o.probability, o.calibration_groups, o.confidence);
    ev.drift = drift_from_ranked(pop, ranked, o);
    return ev;
}

}  // namespace tocsin
