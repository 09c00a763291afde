#include "report/report_evaluation.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

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

Table short_table(std::string name, std::string title, std::vector<std::string> columns) {
    Table t;
    t.name = std::move(name);
    t.title = std::move(title);
    t.columns = std::move(columns);
    return t;
}

Table encounter_discrimination(const EncounterAuc& a, const std::string& score_label) {
    Table t = short_table("evaluation_encounter_auc",
                          "Discrimination, encounter level (each encounter's highest " + score_label + " before the outcome)",
                          {"level", "encounters", "cases", "auc", "auc_lower", "auc_upper", "interval_method"});
    t.add_row({std::string("encounter"), a.encounters, a.cases, finite_or_empty(a.auc), finite_or_empty(a.interval.lower),
               finite_or_empty(a.interval.upper), std::string(encounter_auc_interval_method)});
    return t;
}

Table prediction_discrimination(const std::vector<PredictionAuc>& rows, const std::string& score_label) {
    Table t = short_table("evaluation_prediction_auc",
                          "Discrimination, prediction level (every " + score_label + ", outcome within the horizon)",
                          {"horizon_hours", "predictions", "auc", "auc_lower", "auc_upper", "interval_method"});
    for (const PredictionAuc& a : rows)
        t.add_row({a.horizon_hours, a.predictions, finite_or_empty(a.auc), finite_or_empty(a.interval.lower),
                   finite_or_empty(a.interval.upper), prediction_auc_interval_method(a)});
    return t;
}

// Given thresholds when there are any, else the grid: a table a person can read.
Table thresholds_to_read(const std::vector<ThresholdMeasures>& rows) {
    Table t = short_table("evaluation_thresholds", "By threshold, encounter level (Wilson intervals)",
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

LineChart roc_of(const std::vector<ThresholdMeasures>& rows, const std::string& score_label) {
    std::vector<CurvePoint> roc = {{0, 0}, {1, 1}};
    for (const ThresholdMeasures& m : rows) roc.push_back({1 - value_or_nan(m.specificity), value_or_nan(m.sensitivity)});
    LineChart chart = roc_chart(sorted_by_x(roc), score_label);
    chart.description += " Points are the thresholds of the table's grid.";
    return chart;
}

Table calibration_to_read(const CalibrationSummary& c) {
    Table t = short_table("evaluation_calibration", "Calibration, prediction level",
                          {"horizon_hours", "predictions", "oe_ratio", "oe_bootstrap_lower", "oe_bootstrap_upper",
                           "calibration_intercept", "calibration_slope"});
    t.add_row({horizon_cell(c.horizon_hours), c.observed_expected.predictions, finite_or_empty(c.observed_expected.ratio),
               finite_or_empty(c.oe_bootstrap.lower), finite_or_empty(c.oe_bootstrap.upper),
               finite_or_empty(c.recalibration.intercept), finite_or_empty(c.recalibration.slope)});
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

LineChart decision_curve_of(const DecisionCurveResult& curve, const std::string& score_label) {
    std::vector<CurvePoint> model, treat_all;
    for (const DecisionCurvePoint& d : curve.points) {
        model.push_back({d.threshold_probability, d.net_benefit_model});
        treat_all.push_back({d.threshold_probability, d.net_benefit_treat_all});
    }
    return decision_curve_chart(sorted_by_x(model), sorted_by_x(treat_all), score_label);
}

}  // namespace

void add_evaluation(ReportInput& in, const Evaluation& e, const std::string& score_label) {
    const std::vector<std::pair<std::string, std::string>> labels = {
        {"level", "Level"}, {"encounters", "encounters"}, {"cases", "cases"}, {"auc", "AUC"},
        {"interval_method", "interval"}, {"horizon_hours", "outcome within, hours"}, {"predictions", "predictions"},
        {"threshold", "threshold"}, {"sensitivity", "sensitivity"}, {"specificity", "specificity"},
        {"ppv", "positive predictive value"}, {"npv", "negative predictive value"},
        {"share_flagged", "share of encounters flagged"}, {"oe_ratio", "observed / expected"},
        {"calibration_intercept", "calibration intercept"}, {"calibration_slope", "calibration slope"}};
    for (const auto& [name, label] : labels) in.column_labels.emplace(name, label);

    in.evaluation_tables.push_back(encounter_discrimination(e.encounter_auc, score_label));
    if (!e.prediction_auc.empty()) in.evaluation_tables.push_back(prediction_discrimination(e.prediction_auc, score_label));
    if (!e.thresholds.empty()) {
        in.evaluation_tables.push_back(thresholds_to_read(e.thresholds));
        in.evaluation_charts.push_back(roc_of(e.thresholds, score_label));
    }
    if (e.calibration) in.evaluation_tables.push_back(calibration_to_read(*e.calibration));
    if (!e.calibration_bins.empty()) in.evaluation_charts.push_back(calibration_of(e.calibration_bins, e.calibration_smoothed));
    if (e.decision_curve && !e.decision_curve->points.empty())
        in.evaluation_charts.push_back(decision_curve_of(*e.decision_curve, score_label));
}

}  // namespace tocsin
