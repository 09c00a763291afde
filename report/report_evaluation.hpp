#pragma once
// Adds the model-evaluation measures (analysis/evaluation.hpp) to a report:
// the discrimination and calibration tables, a short threshold table, and
// the ROC, calibration and decision-curve charts when their data is there.
#include "analysis/evaluation.hpp"
#include "report/report.hpp"

namespace tocsin {

// The encounter-level ROC curve through the evaluation's threshold grid.
LineChart roc_of(const std::vector<ThresholdMeasures>& rows, const std::string& score_label);

// The decision curve: the score's net benefit beside evaluating everyone.
LineChart decision_curve_of(const DecisionCurveResult& curve, const std::string& score_label);

void add_evaluation(ReportInput& report, const Evaluation& evaluation, const std::string& score_label = "score");

}  // namespace tocsin
