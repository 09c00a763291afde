#include "report/evaluation_tables.hpp"

#include <cmath>
#include <cstdio>
#include <limits>

#include "report/cells.hpp"

namespace tocsin {

namespace {

constexpr double not_a_number = std::numeric_limits<double>::quiet_NaN();

std::string horizon_text(double horizon_hours) {
    return horizon_hours == 0.0 ? std::string("before discharge") : "within " + format_real(horizon_hours) + " h";
}

// A proportion and its interval: three cells, empty when it has no denominator.
void add_proportion(std::vector<Cell>& row, const std::optional<Proportion>& p) {
    if (!p) {
        for (int i = 0; i < 3; ++i) row.emplace_back(std::monostate{});
        return;
    }
    row.emplace_back(p->value);
    row.emplace_back(p->interval.lower);
    row.emplace_back(p->interval.upper);
}

}  // namespace

Cell horizon_cell(double horizon_hours) {
    return horizon_hours == 0.0 ? Cell{std::monostate{}} : Cell{horizon_hours};
}

std::string prediction_auc_interval_method(const PredictionAuc& auc) {
    return auc.bootstrap_replicates > 0 ? "encounter bootstrap, percentile" : "none";
}

Table evaluation_counts_table(const EvaluationCounts& c) {
    Table t = make_table("evaluation_counts", "What the evaluation counted", {"item", "count"});
    t.add_row({std::string("encounters"), c.encounters});
    t.add_row({std::string("encounters with a usable score"), c.encounters_with_score});
    t.add_row({std::string("encounters without a usable score (left out of every measure)"),
               c.encounters - c.encounters_with_score});
    t.add_row({std::string("cases (encounters with an outcome)"), c.cases});
    t.add_row({std::string("cases with a usable score"), c.cases_with_score});
    t.add_row({std::string("usable scores (predictions)"), c.predictions});
    for (const auto& [reason, count] : c.scores_excluded) t.add_row({"scores excluded: " + reason, count});
    for (const auto& [reason, count] : c.encounters_excluded) t.add_row({"encounters excluded: " + reason, count});
    for (const auto& [note, count] : c.notes) t.add_row({"note: " + note, count});
    return t;
}

Table encounter_auc_table(const EncounterAuc& a) {
    Table t = make_table("evaluation_encounter_auc", "Encounter-level discrimination (highest score before time zero)",
                         {"level", "encounters", "cases", "non_cases", "auc", "auc_se", "auc_lower", "auc_upper",
                          "confidence", "interval_method"});
    t.add_row({std::string("encounter"), a.encounters, a.cases, a.non_cases, finite_or_empty(a.auc),
               finite_or_empty(a.standard_error), finite_or_empty(a.interval.lower), finite_or_empty(a.interval.upper),
               a.confidence, std::string(encounter_auc_interval_method)});
    return t;
}

Table threshold_table(const std::vector<ThresholdMeasures>& rows, std::string name, std::string title) {
    Table t = make_table(std::move(name), std::move(title),
                         {"threshold_source", "threshold", "true_positives", "false_positives", "false_negatives",
                          "true_negatives", "sensitivity", "sensitivity_lower", "sensitivity_upper", "specificity",
                          "specificity_lower", "specificity_upper", "ppv", "ppv_lower", "ppv_upper", "npv",
                          "npv_lower", "npv_upper", "share_flagged", "share_flagged_lower", "share_flagged_upper"});
    for (const ThresholdMeasures& m : rows) {
        const ThresholdCounts& c = m.counts;
        std::vector<Cell> row{m.source, c.threshold, c.true_positives, c.false_positives, c.false_negatives,
                              c.true_negatives};
        for (const auto* p : {&m.sensitivity, &m.specificity, &m.ppv, &m.npv, &m.share_flagged}) add_proportion(row, *p);
        t.add_row(std::move(row));
    }
    return t;
}

Table evaluation_thresholds_table(const std::vector<ThresholdMeasures>& rows) {
    return threshold_table(rows, "evaluation_thresholds",
                           "Encounter level by threshold (flagged = highest score >= threshold)");
}

Table prediction_auc_table(const std::vector<PredictionAuc>& rows) {
    Table t = make_table("evaluation_prediction_auc", "Prediction-level discrimination by horizon",
                         {"horizon_hours", "predictions", "positive_predictions", "encounters",
                          "encounters_with_positive", "auc", "auc_lower", "auc_upper", "bootstrap_replicates",
                          "interval_method"});
    for (const PredictionAuc& a : rows)
        t.add_row({a.horizon_hours, a.predictions, a.positive_predictions, a.encounters, a.encounters_with_positive,
                   finite_or_empty(a.auc), finite_or_empty(a.interval.lower), finite_or_empty(a.interval.upper),
                   static_cast<std::int64_t>(a.bootstrap_replicates), prediction_auc_interval_method(a)});
    return t;
}

Table lead_time_table(const std::vector<LeadTimes>& rows) {
    Table t = make_table("evaluation_lead_times", "Lead time from the first score at or above the threshold to time zero",
                         {"threshold", "cases", "cases_crossed", "share_crossed", "lead_hours_p10", "lead_hours_p25",
                          "lead_hours_median", "lead_hours_p75", "lead_hours_p90", "cases_late", "share_late",
                          "min_lead_hours", "window_hours"});
    for (const LeadTimes& l : rows)
        t.add_row({l.threshold, l.cases, l.cases_crossed, cell_or_empty(l.share_crossed), finite_or_empty(l.p10_hours),
                   finite_or_empty(l.p25_hours), finite_or_empty(l.median_hours), finite_or_empty(l.p75_hours),
                   finite_or_empty(l.p90_hours), l.cases_late, cell_or_empty(l.share_late), l.min_lead_hours,
                   l.window_hours});
    return t;
}

Table calibration_table(const std::optional<CalibrationSummary>& calibration) {
    Table t = make_table("evaluation_calibration", "Calibration of the predicted probability (prediction level)",
                         {"outcome", "horizon_hours", "predictions", "observed", "expected", "oe_ratio", "oe_lower",
                          "oe_upper", "oe_bootstrap_lower", "oe_bootstrap_upper", "calibration_intercept",
                          "calibration_intercept_se", "calibration_slope", "calibration_slope_se",
                          "calibration_in_the_large", "calibration_in_the_large_se", "probabilities_clamped",
                          "converged"});
    if (!calibration) return t;
    const ObservedExpected& oe = calibration->observed_expected;
    const LogisticRecalibration& fit = calibration->recalibration;
    t.add_row({horizon_text(calibration->horizon_hours), horizon_cell(calibration->horizon_hours), oe.predictions,
               oe.observed, oe.expected, finite_or_empty(oe.ratio), finite_or_empty(oe.interval.lower),
               finite_or_empty(oe.interval.upper), finite_or_empty(calibration->oe_bootstrap.lower),
               finite_or_empty(calibration->oe_bootstrap.upper), finite_or_empty(fit.intercept),
               finite_or_empty(fit.intercept_se), finite_or_empty(fit.slope), finite_or_empty(fit.slope_se),
               finite_or_empty(fit.calibration_in_the_large), finite_or_empty(fit.calibration_in_the_large_se),
               fit.clamped, std::string(fit.converged ? "yes" : "no")});
    return t;
}

Table calibration_bins_table(const std::vector<CalibrationBin>& bins, std::string name, std::string title) {
    Table t = make_table(std::move(name), std::move(title),
                         {"group", "predictions", "outcomes", "predicted_low", "predicted_high", "mean_predicted",
                          "observed", "observed_lower", "observed_upper"});
    for (std::size_t k = 0; k < bins.size(); ++k) {
        const CalibrationBin& b = bins[k];
        t.add_row({static_cast<std::int64_t>(k + 1), b.predictions, b.outcomes, b.predicted_low, b.predicted_high,
                   b.mean_predicted, b.observed, b.observed_interval.lower, b.observed_interval.upper});
    }
    return t;
}

Table calibration_bins_table(const std::vector<CalibrationBin>& bins) {
    return calibration_bins_table(bins, "evaluation_calibration_bins",
                                  "Calibration by equal-count groups of predicted probability (prediction level)");
}

Table stay_calibration_table(const std::optional<StayCalibration>& calibration) {
    Table t = make_table("evaluation_calibration_stay",
                         "Calibration, stay level (each stay's highest probability against its outcome)",
                         {"level", "outcome", "stays", "observed", "expected", "oe_ratio", "oe_lower", "oe_upper",
                          "calibration_in_the_large", "calibration_in_the_large_se", "calibration_slope",
                          "calibration_slope_se", "calibration_intercept", "calibration_intercept_se",
                          "probabilities_clamped", "converged"});
    if (!calibration) return t;
    const ObservedExpected& oe = calibration->observed_expected;
    const LogisticRecalibration& fit = calibration->recalibration;
    t.add_row({std::string("stay"), std::string("during the stay"), oe.predictions, oe.observed, oe.expected,
               finite_or_empty(oe.ratio), finite_or_empty(oe.interval.lower), finite_or_empty(oe.interval.upper),
               finite_or_empty(fit.calibration_in_the_large), finite_or_empty(fit.calibration_in_the_large_se),
               finite_or_empty(fit.slope), finite_or_empty(fit.slope_se), finite_or_empty(fit.intercept),
               finite_or_empty(fit.intercept_se), fit.clamped, std::string(fit.converged ? "yes" : "no")});
    return t;
}

Table stay_calibration_bins_table(const std::optional<StayCalibration>& calibration) {
    return calibration_bins_table(calibration ? calibration->bins : std::vector<CalibrationBin>{},
                                  "evaluation_calibration_stay_bins",
                                  "Calibration by equal-count groups of stays (each stay's highest probability)");
}

Table calibration_smoothed_table(const SmoothedCurve& curve) {
    Table t = make_table("evaluation_calibration_smoothed", "Smoothed calibration curve (Gaussian kernel on logit scale)",
                         {"predicted", "observed", "effective_n", "bandwidth_logit", "method"});
    for (const SmoothedPoint& s : curve.points)
        t.add_row({s.predicted, finite_or_empty(s.observed), s.effective_n, curve.bandwidth_logit,
                   std::string(smoothed_calibration_method)});
    return t;
}

Table drift_table(const std::vector<DriftPeriod>& periods) {
    Table t = make_table("evaluation_drift", "Discrimination and calibration by period",
                         {"period", "period_start", "outcome", "horizon_hours", "predictions", "positive_predictions",
                          "auc", "observed", "expected", "oe_ratio", "oe_lower", "oe_upper", "horizon_source"});
    for (const DriftPeriod& d : periods) {
        std::vector<Cell> row{d.label, d.start, horizon_text(d.horizon_hours), horizon_cell(d.horizon_hours),
                              d.predictions, d.positive_predictions, finite_or_empty(d.auc)};
        if (const auto& oe = d.observed_expected) {
            for (double v : {oe->observed, oe->expected, oe->ratio, oe->interval.lower, oe->interval.upper})
                row.push_back(finite_or_empty(v));
        } else {
            for (int c = 0; c < 5; ++c) row.emplace_back(std::monostate{});
        }
        row.emplace_back(d.horizon_source);
        t.add_row(std::move(row));
    }
    return t;
}

Table decision_curve_table(const std::vector<DecisionCurvePoint>& curve, std::int64_t total,
                           const std::vector<std::string>& source, std::string name, std::string title) {
    Table t = make_table(std::move(name), std::move(title),
                         {"threshold_source", "threshold_probability", "evaluations_per_case", "true_positives",
                          "false_positives", "total", "net_benefit_model", "net_benefit_treat_all",
                          "net_benefit_treat_none"});
    for (std::size_t r = 0; r < curve.size(); ++r) {
        const DecisionCurvePoint& d = curve[r];
        t.add_row({r < source.size() && !source[r].empty() ? source[r] : std::string("grid"), d.threshold_probability,
                   1.0 / d.threshold_probability, d.true_positives, d.false_positives, total, d.net_benefit_model,
                   d.net_benefit_treat_all, d.net_benefit_treat_none});
    }
    return t;
}

Table evaluation_decision_curve_table(const std::optional<DecisionCurveResult>& curve) {
    if (!curve) return decision_curve_table({}, 0, {}, "evaluation_decision_curve", "Decision curve (needs a probability mapping)");
    return decision_curve_table(curve->points, curve->encounters, curve->source, "evaluation_decision_curve",
                                "Decision curve: evaluate an encounter once its probability reaches the threshold");
}

std::vector<Table> evaluation_tables(const Evaluation& ev) {
    std::vector<Table> tables;
    tables.push_back(evaluation_counts_table(ev.counts));
    tables.push_back(encounter_auc_table(ev.encounter_auc));
    tables.push_back(evaluation_thresholds_table(ev.thresholds));
    tables.push_back(prediction_auc_table(ev.prediction_auc));
    tables.push_back(lead_time_table(ev.lead_times));
    tables.push_back(calibration_table(ev.calibration));
    tables.push_back(calibration_bins_table(ev.calibration_bins));
    tables.push_back(calibration_smoothed_table(ev.calibration_smoothed));
    tables.push_back(stay_calibration_table(ev.stay_calibration));
    tables.push_back(stay_calibration_bins_table(ev.stay_calibration));
    tables.push_back(drift_table(ev.drift));
    tables.push_back(evaluation_decision_curve_table(ev.decision_curve));
    return tables;
}

namespace {

std::string fixed(double v, int decimals) {
    if (!std::isfinite(v)) return "n/a";
    char buf[64];
    std::snprintf(buf, sizeof buf, "%.*f", decimals, v);
    return buf;
}

std::string count(std::int64_t n) { return fixed(static_cast<double>(n), 0); }

std::string with_interval(double v, const Interval& ci, int decimals) {
    std::string s = fixed(v, decimals);
    if (std::isfinite(ci.lower) && std::isfinite(ci.upper))
        s += " (" + fixed(ci.lower, decimals) + " to " + fixed(ci.upper, decimals) + ")";
    return s;
}

std::string percent(const std::optional<Proportion>& p) { return fixed(100 * (p ? p->value : not_a_number), 1); }

std::string discrimination_lines(const Evaluation& ev) {
    const EncounterAuc& a = ev.encounter_auc;
    std::string s = "  Encounters: " + count(a.encounters) + " with a usable score, " + count(a.cases) +
                    " with the outcome\n";
    s += "  Encounter-level AUC: " + with_interval(a.auc, a.interval, 3) + ", " + fixed(100 * a.confidence, 0) +
         "% DeLong interval\n";
    for (const PredictionAuc& p : ev.prediction_auc)
        s += "  Prediction-level AUC, outcome within " + fixed(p.horizon_hours, 0) + " h: " +
             with_interval(p.auc, p.interval, 3) + " over " + count(p.predictions) + " predictions, " +
             count(p.encounters) + " encounters\n";
    return s;
}

// Wald interval from the fit's standard error; the fit treats rows as independent.
std::string with_wald_interval(double v, double se, double confidence) {
    const double z = normal_two_sided_z(confidence);
    return with_interval(v, Interval{v - z * se, v + z * se}, 2);
}

// Committees read "calibration intercept" as calibration-in-the-large (slope
// fixed at 1), so that is the one shown; the two-parameter intercept stays in
// the CSV. A fit that did not converge (one class, separation) has no figures
// worth printing.
std::string recalibration_text(const LogisticRecalibration& fit, double confidence) {
    if (!fit.converged) return "    calibration-in-the-large and slope: not estimable (the fit did not converge)\n";
    return "    calibration-in-the-large " +
           with_wald_interval(fit.calibration_in_the_large, fit.calibration_in_the_large_se, confidence) +
           " (0 is ideal), calibration slope " + with_wald_interval(fit.slope, fit.slope_se, confidence) +
           " (1 is ideal)\n";
}

std::string calibration_lines(const Evaluation& ev, double confidence) {
    std::string s;
    if (const auto& c = ev.calibration)
        s += "  Calibration, prediction level (every score; outcome " + horizon_text(c->horizon_hours) +
             "): observed/expected " + with_interval(c->observed_expected.ratio, c->oe_bootstrap, 2) + " (1 is ideal)\n" +
             recalibration_text(c->recalibration, confidence);
    if (const auto& c = ev.stay_calibration)
        s += "  Calibration, stay level (each stay's highest probability; outcome during the stay): observed/expected " +
             with_interval(c->observed_expected.ratio, c->observed_expected.interval, 2) + " (1 is ideal)\n" +
             recalibration_text(c->recalibration, confidence);
    return s;
}

std::string drift_line(const std::vector<DriftPeriod>& drift) {
    if (drift.empty()) return "";
    const DriftPeriod& d = drift.front();
    return "  Drift (evaluation_drift): " + count(static_cast<std::int64_t>(drift.size())) +
           " periods; each period's AUC" + (d.observed_expected ? " and observed/expected use" : " uses") +
           " the outcome " + horizon_text(d.horizon_hours) + " (the " + d.horizon_source + ")\n";
}

// One line per given threshold (the grid is for files and charts).
std::string threshold_lines(const Evaluation& ev) {
    std::string s;
    for (std::size_t r = 0; r < ev.lead_times.size(); ++r) {
        const ThresholdMeasures* m = r < ev.thresholds.size() ? &ev.thresholds[r] : nullptr;
        if (m && m->source != "given") continue;
        const LeadTimes& l = ev.lead_times[r];
        s += "  Threshold " + format_real(l.threshold, 4) + ": " +
             fixed(100 * l.share_crossed.value_or(not_a_number), 1) + "% of cases crossed it, median lead " +
             fixed(l.median_hours, 1) + " h; sensitivity " + (m ? percent(m->sensitivity) : "n/a") + "%, PPV " +
             (m ? percent(m->ppv) : "n/a") + "%, flags " + (m ? percent(m->share_flagged) : "n/a") +
             "% of encounters\n";
    }
    return s;
}

}  // namespace

std::string evaluation_summary(const Evaluation& ev) {
    std::string s = "Model evaluation (figures rest on this population and its exclusions; not a medical device)\n";
    s += discrimination_lines(ev);
    s += calibration_lines(ev, ev.encounter_auc.confidence);
    s += drift_line(ev.drift);
    s += threshold_lines(ev);
    return s;
}

}  // namespace tocsin
