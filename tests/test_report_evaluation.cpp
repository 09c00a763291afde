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
    // Encounter AUC, prediction AUC and the threshold table; the demo score is on
    // a 0-100 scale with no probability mapping, so no calibration table.
    REQUIRE(in.evaluation_tables.size() == 3);
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
