// Model-evaluation measures in the report: the demo's score evaluated and
// handed to add_evaluation. Checks what lands where; the measures themselves
// are checked by the evaluation tests.
#include <doctest/doctest.h>

#include "study/evaluation_scenario.hpp"
#include "report/report_evaluation.hpp"
#include "models/replay.hpp"
#include "study/scenario.hpp"

using namespace tocsin;

TEST_CASE("report_evaluation.demo_score") {
    const Scenario sc = load_scenario(std::string(TOCSIN_SOURCE_DIR) + "/scenarios/fernhollow-replay.yaml");
    EvaluationOptions options = evaluation_options_for(sc);
    options.thresholds = {55, 70};
    options.bootstrap_replicates = 20;  // speed; the interval's width is not under test here
    const Evaluation e = evaluate(load_replay(sc.population.replay, sc.simulation.zone), options);

    ReportInput in;
    add_evaluation(in, e, sc.score_label);
    // Encounter AUC, prediction AUC, the threshold table and drift; the demo
    // score is on a 0-100 scale with no probability mapping, so no calibration table.
    REQUIRE(in.evaluation_tables.size() == 4);
    CHECK(in.evaluation_tables[3].name == "evaluation_drift");
    CHECK(in.evaluation_tables[0].title.find("highest deterioration score") != std::string::npos);
    // Only the two given thresholds are listed, in the given order.
    const Table& by_threshold = in.evaluation_tables[2];
    REQUIRE(by_threshold.rows.size() == 2);
    CHECK(std::get<double>(by_threshold.rows[0][0]) == 55);
    CHECK(std::get<double>(by_threshold.rows[1][0]) == 70);
    // The ROC only, from (0, 0) to (1, 1) in order of false-positive rate.
    REQUIRE(in.evaluation_charts.size() == 1);
    const auto& roc = in.evaluation_charts[0].curves[0].points;
    REQUIRE(roc.size() == e.thresholds.size() + 2);
    CHECK(roc.front().x == 0);
    CHECK(roc.back().y == 1);
    for (std::size_t i = 1; i < roc.size(); ++i) CHECK(roc[i - 1].x <= roc[i].x);

    const std::string page = render_report(in);
    CHECK(page.find("<section id=\"evaluation\"") != std::string::npos);
    CHECK(page.find("id=\"fig-evaluation-1\"") != std::string::npos);
    CHECK(page.find("id=\"fig-evaluation-2\"") == std::string::npos);
    CHECK(page.find(">AUC</th>") != std::string::npos);
    // auc with auc_lower / auc_upper folds into one cell.
    CHECK(page.find("auc_lower") == std::string::npos);
}

TEST_CASE("report_evaluation.calibration_is_named_plainly_at_both_levels") {
    const Scenario sc = load_scenario(std::string(TOCSIN_SOURCE_DIR) + "/scenarios/fernhollow-replay.yaml");
    EvaluationOptions options = evaluation_options_for(sc);
    options.bootstrap_replicates = 0;
    ProbabilityMapping m;
    m.kind = ProbabilityMapping::Kind::divide;
    m.divisor = 100;
    options.probability = m;
    const Evaluation e = evaluate(load_replay(sc.population.replay, sc.simulation.zone), options);
    REQUIRE(e.calibration);
    REQUIRE(e.stay_calibration);

    ReportInput in;
    add_evaluation(in, e, sc.score_label);
    const Table* calibration = nullptr;
    const Table* drift = nullptr;
    for (const Table& t : in.evaluation_tables) {
        if (t.name == "evaluation_calibration") calibration = &t;
        if (t.name == "evaluation_drift") drift = &t;
    }
    REQUIRE(calibration);
    // One row per level, the level and its outcome named on the row.
    REQUIRE(calibration->rows.size() == 2);
    CHECK(std::get<std::string>(calibration->rows[0][0]) == "prediction");
    CHECK(std::get<std::string>(calibration->rows[1][0]) == "stay");
    CHECK(std::get<std::string>(calibration->rows[1][1]) == "during the stay");
    CHECK(std::get<std::int64_t>(calibration->rows[1][2]) == e.stay_calibration->observed_expected.predictions);
    // The two-parameter intercept is not in the report (committees would read
    // it as calibration-in-the-large); calibration-in-the-large and slope are.
    for (const std::string& column : calibration->columns) CHECK(column != "calibration_intercept");
    CHECK(in.column_labels.at("calibration_in_the_large") == "calibration-in-the-large (0 is ideal)");
    CHECK(in.column_labels.at("calibration_slope") == "calibration slope (1 is ideal)");
    CHECK(std::get<double>(calibration->rows[1][6]) ==
          doctest::Approx(e.stay_calibration->recalibration.calibration_in_the_large));

    // Drift: every row says which outcome its AUC uses and why.
    REQUIRE(drift);
    REQUIRE_FALSE(drift->rows.empty());
    for (const auto& row : drift->rows) {
        CHECK(std::get<std::string>(row[1]) == "before discharge");
        CHECK(std::get<std::string>(row[2]) == drift_horizon_mapping);
    }

    const std::string page = render_report(in);
    CHECK(page.find("calibration-in-the-large (0 is ideal)") != std::string::npos);
    CHECK(page.find("calibration slope (1 is ideal)") != std::string::npos);
    CHECK(page.find("calibration intercept") == std::string::npos);
    // Each interval folds into its figure's cell rather than standing alone.
    CHECK(page.find("calibration_in_the_large_lower") == std::string::npos);
    CHECK(page.find("oe_ratio_lower") == std::string::npos);
}
