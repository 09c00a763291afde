// The report of a real run: the demo scenario through run_scenario, filled in
// by report_input_for_run and rendered. Checks the wiring (which figures land
// where), not the figures themselves, which the comparison tests own.
#include <doctest/doctest.h>

#include "report/report_run.hpp"
#include "models/population_source.hpp"
#include "study/review_size.hpp"

using namespace tocsin;

namespace {

const std::string demo = std::string(TOCSIN_SOURCE_DIR) + "/scenarios/demo.yaml";

std::string demo_report(unsigned threads, std::optional<double> budget) {
    Scenario sc = load_scenario(demo);
    sc.replications = 3;
    RunSettings settings;
    settings.threads = threads;
    settings.budget_limit = budget;
    const RunOutput out = run_scenario(sc, population_factory(sc.population), settings);
    return render_report(report_input_for_run(sc, out, settings));
}

}  // namespace

TEST_CASE("report_run.demo") {
    const std::string page = demo_report(1, 4.0);
    for (const char* id : {"question", "assumptions", "comparison", "per-ward", "frontier", "burden", "lead-times", "staff", "run"}) {
        CAPTURE(id);
        CHECK(page.find("<section id=\"" + std::string(id) + "\"") != std::string::npos);
    }
    // The demo declares roles: lead time counts from the evaluation, and the
    // staff table names the demo's roles.
    CHECK(page.find("id=\"fig-lead-evaluation\"") != std::string::npos);
    CHECK(page.find("rapid response nurse") != std::string::npos);
    CHECK(page.find(">median wait, minutes</th>") != std::string::npos);
    // No model-evaluation measures in a run yet.
    CHECK(page.find("<section id=\"evaluation\"") == std::string::npos);
    CHECK(page.find("Fernhollow District Hospital") != std::string::npos);
    // The wards by name: with their beds among the assumptions, and heading the per-ward section, where
    // the worst ward decides the budget question.
    CHECK(page.find("3 units (4 North medicine, 26 beds; 5 South surgery, 22 beds; 6 East older adults, 20 beds)") !=
          std::string::npos);
    CHECK(page.find("The wards: 4 North medicine, 5 South surgery and 6 East older adults.") != std::string::npos);
    CHECK(page.find("decided by the worst ward") != std::string::npos);
    CHECK(page.find(">Ward</th>") != std::string::npos);
    CHECK(page.find("Time zone: America/Chicago") != std::string::npos);
    // Items of the scenario's lists carry their kind; indented details join their item.
    CHECK(page.find("<li>Plan page-70: page to rapid response nurse when deterioration score &gt;= 70; snooze 4 h. "
                    "Page at 70, at most every 4 hours per patient. Escalation: ") != std::string::npos);
    CHECK(page.find("<li>Role house physician (one team for the hospital)") != std::string::npos);
    CHECK(page.find("<li>Plans (") == std::string::npos);
    for (const char* plan : {"page-70", "page-55-rise", "page-55-twice", "page-45-noisy"}) CHECK(page.find(plan) != std::string::npos);
    // Three wards over the 56 nights of the generated period (5 October to
    // 30 November): 168 unit-nights per plan in the burden chart's n column.
    CHECK(page.find(" \xC2\xB7 168</text>") != std::string::npos);
    // The budget question is answered in words and drawn on the per-night chart
    // (the budget limits worst_unit_night_p90, unit-nights too; the frontier's axis is the pooled mean).
    // The demo's plans use four channels and the budget counts notices, so it is
    // answered within each channel, and the report says why.
    CHECK(page.find("Best within the budget among the page plans: page-55-twice") != std::string::npos);
    CHECK(page.find("Compared within each channel: per_unit_night_mean") != std::string::npos);
    // One frontier chart per channel (page, chart_interruption, handoff_list, ranked_review).
    CHECK(page.find("id=\"fig-frontier\"") != std::string::npos);
    CHECK(page.find("id=\"fig-frontier-4\"") != std::string::npos);
    CHECK(page.find("id=\"fig-frontier-5\"") == std::string::npos);
    // The channel-unit table, with each channel's own unit.
    CHECK(page.find("<section id=\"channels\"") != std::string::npos);
    CHECK(page.find("patients reviewed per unit per review round") != std::string::npos);
    CHECK(page.find("interruptions per clinician per shift") != std::string::npos);
    CHECK(page.find("marks the budget of 4.") != std::string::npos);
    CHECK(page.find("Paired differences from page-70") != std::string::npos);
    CHECK(page.find("Replications</dt><dd>3</dd>") != std::string::npos);
    CHECK(page.find("http") == std::string::npos);
    CHECK(page.find("<script") == std::string::npos);
}

TEST_CASE("report_run.same_bytes_whatever_the_threads") {
    CHECK(demo_report(1, std::nullopt) == demo_report(2, std::nullopt));
}

TEST_CASE("report_run.replay_names_its_wards") {
    // A replayed log's wards are known only once it is read: the assumptions
    // name them, and the per-ward section shows each plan on each.
    Scenario sc = load_scenario(std::string(TOCSIN_SOURCE_DIR) + "/scenarios/fernhollow-replay.yaml");
    RunSettings settings;
    settings.evaluate = false;
    const RunOutput out = run_scenario(sc, population_factory(sc.population), settings);
    const std::string page = render_report(report_input_for_run(sc, out, settings));
    CHECK(page.find("<li>Wards in the log: 4 North medicine, 5 South surgery and 6 East older adults.</li>") !=
          std::string::npos);
    CHECK(page.find("<section id=\"per-ward\"") != std::string::npos);
    CHECK(page.find("<th scope=\"row\">6 East older adults</th>") != std::string::npos);
}

TEST_CASE("report_run.review_size_agrees_with_run") {
    // One capacity model: `run` and `review-size` cost and count a review alike,
    // so sizing the demo's review plan at its own list length (4 per ward)
    // gives, replication by replication, the run's catches and reviews.
    Scenario sc = load_scenario(demo);
    sc.replications = 3;
    RunSettings settings;
    settings.threads = 1;
    settings.evaluate = false;
    const PopulationFactory factory = population_factory(sc.population);
    const RunOutput out = run_scenario(sc, factory, settings);
    std::size_t p = 0;
    while (sc.simulation.plans[p].name != "review-top4") ++p;
    REQUIRE(sc.simulation.plans[p].review.top_n == 4);
    const ReviewSizing s = size_review_list(sc, factory, p, 4, 4, 0.8, 1);
    REQUIRE(s.summary.size() == 1);
    const MeanInterval caught = mean_interval(out.figures.of(p, metric_index(*find_metric("caught"))));
    const MeanInterval notices = mean_interval(out.figures.of(p, metric_index(*find_metric("notices"))));
    CHECK(s.summary[0].caught.mean == caught.mean);
    CHECK(s.summary[0].caught.low == caught.low);
    CHECK(s.summary[0].reviews.mean == notices.mean);
    CHECK(s.summary[0].catch_rate.n == 3);
}
