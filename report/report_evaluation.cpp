#include "report/report_evaluation.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include "models/text.hpp"
#include "report/cells.hpp"
#include "report/evaluation_tables.hpp"

namespace tocsin {

namespace {

constexpr double not_a_number = std::numeric_limits<double>::quiet_NaN();

std::vector<CurvePoint> sorted_by_x(std::vector<CurvePoint> points) {
    std::stable_sort(points.begin(), points.end(), [](const CurvePoint& a, const CurvePoint& b) { return a.x < b.x; });
    return points;
}

double value_or_nan(const std::optional<Proportion>& p) { return p ? p->value : not_a_number; }
double finite_or_nan(double v) { return std::isfinite(v) ? v : not_a_number; }

Table encounter_discrimination(const EncounterAuc& a, const std::string& score_label) {
    Table t = make_table("evaluation_encounter_auc",
                          "Discrimination, encounter level (each encounter's highest " + score_label + " before the outcome)",
                          {"level", "encounters", "cases", "auc", "auc_lower", "auc_upper", "interval_method"});
    t.add_row({std::string("encounter"), a.encounters, a.cases, finite_or_empty(a.auc), finite_or_empty(a.interval.lower),
               finite_or_empty(a.interval.upper), std::string(encounter_auc_interval_method)});
    return t;
}

Table prediction_discrimination(const std::vector<PredictionAuc>& rows, const std::string& score_label) {
    Table t = make_table("evaluation_prediction_auc",
                          "Discrimination, prediction level (every " + score_label + ", outcome within the horizon)",
                          {"horizon_hours", "predictions", "auc", "auc_lower", "auc_upper", "interval_method"});
    for (const PredictionAuc& a : rows)
        t.add_row({a.horizon_hours, a.predictions, finite_or_empty(a.auc), finite_or_empty(a.interval.lower),
                   finite_or_empty(a.interval.upper), prediction_auc_interval_method(a)});
    return t;
}

// Given thresholds when there are any, else the grid: a table a person can read.
Table thresholds_to_read(const std::vector<ThresholdMeasures>& rows) {
    Table t = make_table("evaluation_thresholds", "By threshold, encounter level (Wilson intervals)",
                          {"threshold", "sensitivity", "sensitivity_lower", "sensitivity_upper", "specificity",
                           "specificity_lower", "specificity_upper", "ppv", "ppv_lower", "ppv_upper", "share_flagged",
                           "share_flagged_lower", "share_flagged_upper"});
    const bool any_given = std::any_of(rows.begin(), rows.end(), [](const ThresholdMeasures& m) { return m.source == "given"; });
    for (const ThresholdMeasures& m : rows) {
        if (any_given && m.source != "given") continue;
        std::vector<Cell> row{m.counts.threshold};
        for (const auto* p : {&m.sensitivity, &m.specificity, &m.ppv, &m.share_flagged}) {
            if (*p) {
                row.insert(row.end(), {(*p)->value, (*p)->interval.lower, (*p)->interval.upper});
            } else {
                row.insert(row.end(), {Cell{}, Cell{}, Cell{}});
            }
        }
        t.add_row(std::move(row));
    }
    return t;
}


// Committees read "calibration intercept" as calibration-in-the-large, so the
// two-parameter fit's intercept is left to the CSV. Intervals are Wald, from
// the fit's standard errors.
void add_calibration_row(Table& t, std::string level, std::string outcome, std::int64_t rows,
                         const ObservedExpected& oe, const Interval& oe_interval, const LogisticRecalibration& fit,
                         double z) {
    const double citl = fit.calibration_in_the_large, se = fit.calibration_in_the_large_se;
    t.add_row({std::move(level), std::move(outcome), rows, finite_or_empty(oe.ratio), finite_or_empty(oe_interval.lower),
               finite_or_empty(oe_interval.upper), finite_or_empty(citl), finite_or_empty(citl - z * se),
               finite_or_empty(citl + z * se), finite_or_empty(fit.slope), finite_or_empty(fit.slope - z * fit.slope_se),
               finite_or_empty(fit.slope + z * fit.slope_se)});
}

Table calibration_to_read(const Evaluation& e, double confidence) {
    Table t = make_table("evaluation_calibration",
                          "Calibration: prediction level (every score) and stay level (each stay's highest probability); "
                          "intervals: O/E by encounter bootstrap (prediction) or delta method (stay), the fits' by Wald",
                          {"level", "outcome", "predictions_or_stays", "oe_ratio", "oe_ratio_lower", "oe_ratio_upper", "calibration_in_the_large",
                           "calibration_in_the_large_lower", "calibration_in_the_large_upper", "calibration_slope",
                           "calibration_slope_lower", "calibration_slope_upper"});
    const double z = normal_two_sided_z(confidence);
    if (const auto& c = e.calibration) {
        const std::string outcome = c->horizon_hours == 0.0 ? std::string("before discharge")
                                                            : "within " + format_real(c->horizon_hours) + " h";
        add_calibration_row(t, "prediction", outcome, c->observed_expected.predictions, c->observed_expected,
                            c->oe_bootstrap, c->recalibration, z);
    }
    if (const auto& c = e.stay_calibration)
        add_calibration_row(t, "stay", "during the stay", c->observed_expected.predictions, c->observed_expected,
                            c->observed_expected.interval, c->recalibration, z);
    return t;
}

// Which outcome each period's AUC uses changes with a probability mapping, so
// the table says it on every row. Observed / expected only exists with one.
Table drift_to_read(const std::vector<DriftPeriod>& periods) {
    const bool with_oe = !periods.empty() && periods.front().observed_expected.has_value();
    std::vector<std::string> columns{"period", "outcome", "horizon_source", "predictions", "auc"};
    if (with_oe) columns.emplace_back("oe_ratio");
    Table t = make_table("evaluation_drift", "Drift by period, prediction level", std::move(columns));
    for (const DriftPeriod& d : periods) {
        const std::string outcome = d.horizon_hours == 0.0 ? std::string("before discharge")
                                                           : "within " + format_real(d.horizon_hours) + " h";
        std::vector<Cell> row{d.label, outcome, d.horizon_source, d.predictions, finite_or_empty(d.auc)};
        if (with_oe) row.push_back(d.observed_expected ? finite_or_empty(d.observed_expected->ratio) : Cell{});
        t.add_row(std::move(row));
    }
    return t;
}

LineChart calibration_of(const std::vector<CalibrationBin>& bins, const SmoothedCurve& curve) {
    std::vector<CurvePoint> binned, smoothed;
    for (const CalibrationBin& b : bins) binned.push_back({b.mean_predicted, b.observed});
    for (const SmoothedPoint& s : curve.points) smoothed.push_back({s.predicted, finite_or_nan(s.observed)});
    LineChart chart = calibration_chart(sorted_by_x(binned), "groups of predictions");
    if (!smoothed.empty()) chart.curves.push_back({"smoothed", sorted_by_x(smoothed), true});
    return chart;
}


}  // namespace

LineChart decision_curve_of(const DecisionCurveResult& curve, const std::string& score_label) {
    std::vector<CurvePoint> model, treat_all;
    for (const DecisionCurvePoint& d : curve.points) {
        model.push_back({d.threshold_probability, d.net_benefit_model});
        treat_all.push_back({d.threshold_probability, d.net_benefit_treat_all});
    }
    return decision_curve_chart(sorted_by_x(model), sorted_by_x(treat_all), score_label);
}

LineChart roc_of(const std::vector<ThresholdMeasures>& rows, const std::string& score_label) {
    std::vector<CurvePoint> roc = {{0, 0}, {1, 1}};
    for (const ThresholdMeasures& m : rows) roc.push_back({1 - value_or_nan(m.specificity), value_or_nan(m.sensitivity)});
    LineChart chart = roc_chart(sorted_by_x(roc), score_label);
    chart.description += " Points are the thresholds of the table's grid.";
    return chart;
}

void add_evaluation(ReportInput& in, const Evaluation& e, const std::string& score_label) {
    const std::vector<std::pair<std::string, std::string>> labels = {
        {"level", "Level"}, {"encounters", "encounters"}, {"cases", "cases"}, {"auc", "AUC"},
        {"interval_method", "interval"}, {"horizon_hours", "outcome within, hours"}, {"predictions", "predictions"},
        {"threshold", "threshold"}, {"sensitivity", "sensitivity"}, {"specificity", "specificity"},
        {"ppv", "positive predictive value"}, {"npv", "negative predictive value"},
        {"share_flagged", "share of encounters flagged"}, {"oe_ratio", "observed / expected"},
        {"predictions_or_stays", "predictions or stays"},
        {"calibration_in_the_large", "calibration-in-the-large (0 is ideal)"},
        {"calibration_slope", "calibration slope (1 is ideal)"}, {"horizon_source", "outcome chosen by"}};
    for (const auto& [name, label] : labels) in.column_labels.emplace(name, label);

    in.evaluation_tables.push_back(encounter_discrimination(e.encounter_auc, score_label));
    if (!e.prediction_auc.empty()) in.evaluation_tables.push_back(prediction_discrimination(e.prediction_auc, score_label));
    if (!e.thresholds.empty()) {
        in.evaluation_tables.push_back(thresholds_to_read(e.thresholds));
        in.evaluation_charts.push_back(roc_of(e.thresholds, score_label));
    }
    if (e.calibration || e.stay_calibration)
        in.evaluation_tables.push_back(calibration_to_read(e, e.encounter_auc.confidence));
    if (!e.calibration_bins.empty()) in.evaluation_charts.push_back(calibration_of(e.calibration_bins, e.calibration_smoothed));
    if (!e.drift.empty()) in.evaluation_tables.push_back(drift_to_read(e.drift));
    if (e.decision_curve && !e.decision_curve->points.empty())
        in.evaluation_charts.push_back(decision_curve_of(*e.decision_curve, score_label));
}

}  // namespace tocsin
