#include "report/report_evaluation.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

namespace tocsin {

namespace {

std::size_t column(const Table& t, const std::string& name) {
    return static_cast<std::size_t>(std::find(t.columns.begin(), t.columns.end(), name) - t.columns.begin());
}

double number(const Table& t, std::size_t row, const std::string& name) {
    const std::size_t c = column(t, name);
    if (c >= t.columns.size()) return std::numeric_limits<double>::quiet_NaN();
    const Cell& cell = t.rows[row][c];
    if (std::holds_alternative<double>(cell)) return std::get<double>(cell);
    if (std::holds_alternative<std::int64_t>(cell)) return static_cast<double>(std::get<std::int64_t>(cell));
    return std::numeric_limits<double>::quiet_NaN();
}

std::string text(const Table& t, std::size_t row, const std::string& name) {
    const std::size_t c = column(t, name);
    return c < t.columns.size() && std::holds_alternative<std::string>(t.rows[row][c]) ? std::get<std::string>(t.rows[row][c]) : "";
}

// The named columns of a table that it has, in the order named.
Table columns_of(const Table& t, const std::vector<std::string>& names, const std::string& title) {
    Table out;
    out.name = t.name;
    out.title = title;
    std::vector<std::size_t> keep;
    for (const std::string& n : names)
        if (const std::size_t c = column(t, n); c < t.columns.size()) {
            keep.push_back(c);
            out.columns.push_back(n);
        }
    for (const auto& row : t.rows) {
        std::vector<Cell> cells;
        for (std::size_t c : keep) cells.push_back(row[c]);
        out.add_row(std::move(cells));
    }
    return out;
}

std::vector<CurvePoint> sorted_by_x(std::vector<CurvePoint> points) {
    std::stable_sort(points.begin(), points.end(), [](const CurvePoint& a, const CurvePoint& b) { return a.x < b.x; });
    return points;
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

    if (!e.encounter_auc.rows.empty())
        in.evaluation_tables.push_back(columns_of(e.encounter_auc, {"level", "encounters", "cases", "auc", "auc_lower", "auc_upper", "interval_method"},
                                                  "Discrimination, encounter level (each encounter's highest " + score_label + " before the outcome)"));
    if (!e.prediction_auc.rows.empty())
        in.evaluation_tables.push_back(columns_of(e.prediction_auc, {"horizon_hours", "predictions", "auc", "auc_lower", "auc_upper", "interval_method"},
                                                  "Discrimination, prediction level (every " + score_label + ", outcome within the horizon)"));
    if (!e.thresholds.rows.empty()) {
        // Given thresholds when there are any, else the grid: a table a person can read.
        Table t = columns_of(e.thresholds, {"threshold", "sensitivity", "sensitivity_lower", "sensitivity_upper", "specificity",
                                            "specificity_lower", "specificity_upper", "ppv", "ppv_lower", "ppv_upper",
                                            "share_flagged", "share_flagged_lower", "share_flagged_upper"},
                             "By threshold, encounter level (Wilson intervals)");
        bool any_given = false;
        for (std::size_t r = 0; r < e.thresholds.rows.size(); ++r) any_given = any_given || text(e.thresholds, r, "threshold_source") == "given";
        if (any_given) {
            Table given = t;
            given.rows.clear();
            for (std::size_t r = 0; r < e.thresholds.rows.size(); ++r)
                if (text(e.thresholds, r, "threshold_source") == "given") given.rows.push_back(t.rows[r]);
            t = given;
        }
        in.evaluation_tables.push_back(t);

        std::vector<CurvePoint> roc = {{0, 0}, {1, 1}};
        for (std::size_t r = 0; r < e.thresholds.rows.size(); ++r)
            roc.push_back({1 - number(e.thresholds, r, "specificity"), number(e.thresholds, r, "sensitivity")});
        LineChart chart = roc_chart(sorted_by_x(roc), score_label);
        chart.description += " Points are the thresholds of the table's grid.";
        in.evaluation_charts.push_back(chart);
    }
    if (!e.calibration.rows.empty())
        in.evaluation_tables.push_back(columns_of(e.calibration, {"horizon_hours", "predictions", "oe_ratio", "oe_bootstrap_lower",
                                                                  "oe_bootstrap_upper", "calibration_intercept", "calibration_slope"},
                                                  "Calibration, prediction level"));
    if (!e.calibration_bins.rows.empty()) {
        std::vector<CurvePoint> bins, smoothed;
        for (std::size_t r = 0; r < e.calibration_bins.rows.size(); ++r)
            bins.push_back({number(e.calibration_bins, r, "mean_predicted"), number(e.calibration_bins, r, "observed")});
        for (std::size_t r = 0; r < e.calibration_smoothed.rows.size(); ++r)
            smoothed.push_back({number(e.calibration_smoothed, r, "predicted"), number(e.calibration_smoothed, r, "observed")});
        LineChart chart = calibration_chart(sorted_by_x(bins), "groups of predictions");
        if (!smoothed.empty()) chart.curves.push_back({"smoothed", sorted_by_x(smoothed), true});
        in.evaluation_charts.push_back(chart);
    }
    if (!e.decision_curve.rows.empty()) {
        std::vector<CurvePoint> model, treat_all;
        for (std::size_t r = 0; r < e.decision_curve.rows.size(); ++r) {
            const double pt = number(e.decision_curve, r, "threshold_probability");
            model.push_back({pt, number(e.decision_curve, r, "net_benefit_model")});
            treat_all.push_back({pt, number(e.decision_curve, r, "net_benefit_treat_all")});
        }
        in.evaluation_charts.push_back(decision_curve_chart(sorted_by_x(model), sorted_by_x(treat_all), score_label));
    }
}

}  // namespace tocsin
