// Outcomes averted under a stated effect (analysis/averted.hpp): the three
// shapes worked by hand, a tiny population whose expected outcomes averted are
// counted by hand and equal the sum of the per-case chances exactly, the
// figures carried across replications with paired differences, and the
// loader's refusals.
#include <doctest/doctest.h>

#include <string>
#include <vector>

#include "analysis/averted.hpp"
#include "analysis/comparison.hpp"
#include "analysis/plan_figures.hpp"
#include "report/averted_tables.hpp"
#include "report/comparison_tables.hpp"
#include "study/scenario.hpp"
#include "test_support.hpp"

using namespace tocsin;

namespace {

Instant at(int day, int hour, int minute = 0) {
    return days_from_civil(2026, 3, day) * 86400 + hour * 3600 + minute * 60;
}

const Seconds one_hour = hours(1);

}  // namespace

TEST_CASE("averted.shapes_by_hand") {
    // Linear: 0.3 from 6 h on, 0 at the 1 h minimum lead: at 3.5 h, 0.3 x 2.5 / 5 = 0.15.
    const AvertedEffect linear{.shape = AvertedShape::linear, .full_lead = hours(6), .probability = 0.3, .table = {}};
    CHECK(averted_probability(linear, hours(8), one_hour) == 0.3);
    CHECK(averted_probability(linear, hours(6), one_hour) == 0.3);
    CHECK(averted_probability(linear, hours(3) + 1800, one_hour) == doctest::Approx(0.15).epsilon(1e-15));
    CHECK(averted_probability(linear, one_hour, one_hour) == 0.0);
    CHECK(averted_probability(linear, 1800, one_hour) == 0.0);  // below the minimum lead: not a catch
    // Step: 0.3 from 6 h on, nothing before.
    const AvertedEffect step{.shape = AvertedShape::step, .full_lead = hours(6), .probability = 0.3, .table = {}};
    CHECK(averted_probability(step, hours(6), one_hour) == 0.3);
    CHECK(averted_probability(step, hours(6) - 1, one_hour) == 0.0);
    // Table: 0.1 from 2 h, 0.25 from 4 h, 0.4 from 12 h.
    const AvertedEffect table{.shape = AvertedShape::table,
                              .full_lead = 0,
                              .probability = 0,
                              .table = {{hours(2), 0.1}, {hours(4), 0.25}, {hours(12), 0.4}}};
    CHECK(averted_probability(table, hours(1) + 3599, one_hour) == 0.0);
    CHECK(averted_probability(table, hours(2), one_hour) == 0.1);
    CHECK(averted_probability(table, hours(11), one_hour) == 0.25);
    CHECK(averted_probability(table, hours(20), one_hour) == 0.4);
}

TEST_CASE("averted.tiny_population_counted_by_hand") {
    // Four patients on one unit, shifts 07:00 / 19:00; catch window 24 h, minimum lead 1 h;
    // effect linear, 0.3 from 6 h on, 0 at 1 h.
    //   P0 outcome 3 Mar 20:00, first notice 3 Mar 10:00 (10 h ahead)      -> 0.3
    //   P1 outcome 3 Mar 20:00, notices 16:30 (3.5 h) and 18:00            -> 0.3 x 2.5 / 5 = 0.15
    //   P2 outcome 3 Mar 20:00, notice 19:30 (30 min: under the minimum)   -> not caught, 0
    //   P3 no outcome, notices 12:00 and 13:00                             -> no case
    // Expected outcomes averted 0.45; evaluations (notices, no staff) 6, so 6 / 0.45 per outcome averted.
    Population pop;
    pop.units = {"A"};
    const Instant in = at(1, 12), out = at(5, 12);
    pop.encounters = {{"P0", 0, in, out, at(3, 20)}, {"P1", 0, in, out, at(3, 20)}, {"P2", 0, in, out, at(3, 20)},
                      {"P3", 0, in, out, std::nullopt}};
    pop.period_start = in;
    pop.period_end = out;
    const ShiftCalendar cal(ShiftPattern{{7 * 60, 19 * 60}, {"day", "night"}, {false, true}}, TimeZone::utc(), at(1, 0),
                            at(6, 0));
    AnalysisSettings settings;
    settings.min_lead = one_hour;
    settings.averted =
        AvertedEffect{.shape = AvertedShape::linear, .full_lead = hours(6), .probability = 0.3, .table = {}};
    PlanRecord record;
    for (const auto& [e, when] : std::vector<std::pair<std::uint32_t, Instant>>{
             {0, at(3, 10)}, {3, at(3, 12)}, {3, at(3, 13)}, {1, at(3, 16, 30)}, {1, at(3, 18)}, {2, at(3, 19, 30)}}) {
        Notice n;
        n.at = when;
        n.encounter = e;
        record.notices.push_back(n);
    }
    const PlanFigures f = plan_figures(settings, pop, cal, reporting_shifts(settings, pop, cal), record);
    REQUIRE(f.assumed_averted);
    CHECK(*f.assumed_averted == doctest::Approx(0.45).epsilon(1e-15));
    CHECK(f.evaluations == 6);
    CHECK(*f.evaluations_per_assumed_averted == doctest::Approx(6 / 0.45).epsilon(1e-14));
    // The expected value is the sum of the per-case chances, exactly (same additions, same order).
    const auto caught = first_catch(settings, pop, evaluation_requests(record));
    double sum = 0;
    for (std::size_t e = 0; e < caught.size(); ++e)
        if (caught[e]) sum += averted_probability(*settings.averted, *pop.encounters[e].outcome_at - *caught[e], one_hour);
    CHECK(*f.assumed_averted == sum);
    CHECK(expected_averted(*settings.averted, one_hour, pop, caught) == sum);
    // A step at 6 h keeps only P0.
    settings.averted->shape = AvertedShape::step;
    CHECK(*plan_figures(settings, pop, cal, reporting_shifts(settings, pop, cal), record).assumed_averted == 0.3);
    // Without a declared effect there is no figure.
    settings.averted.reset();
    CHECK_FALSE(plan_figures(settings, pop, cal, reporting_shifts(settings, pop, cal), record).assumed_averted);
}

TEST_CASE("averted.across_replications_with_the_caution_beside_every_figure") {
    // Two plans, three replications; outcomes averted 1, 2, 3 and 2, 4, 3:
    // means 2 and 3, paired differences 1, 2, 0 (mean 1).
    std::vector<std::vector<PlanFigures>> by_replication(3, std::vector<PlanFigures>(2));
    const double a[3] = {1, 2, 3}, b[3] = {2, 4, 3};
    for (int r = 0; r < 3; ++r) {
        by_replication[r][0].assumed_averted = a[r];
        by_replication[r][1].assumed_averted = b[r];
        by_replication[r][0].evaluations_per_assumed_averted = 10.0;
        by_replication[r][1].evaluations_per_assumed_averted = 20.0;
    }
    const ReplicatedFigures f = collect_figures({"one", "two"}, by_replication);
    const std::size_t m = metric_index(*find_metric("assumed_averted"));
    CHECK(shown_metric(f, m));
    CHECK(mean_interval(f.of(1, m)).mean == doctest::Approx(3));
    CHECK(paired_difference(f, 1, 0, m).mean == doctest::Approx(1));
    const auto table = outcomes_averted_table(f);
    REQUIRE(table);
    REQUIRE(table->rows.size() == 2);
    for (const auto& row : table->rows) CHECK(std::get<std::string>(row.back()) == std::string(averted_caution));
    CHECK(std::get<double>(table->rows[1][8]) == doctest::Approx(1));  // difference from "one"
    const std::string text = outcomes_averted_text(f);
    CHECK(text.find(std::string(averted_caution)) != std::string::npos);
    // plan_comparison lists the metrics only when the effect is declared.
    const ComparisonTables shown = comparison_tables(f);
    bool listed = false;
    for (const auto& row : shown.comparison.rows) listed = listed || std::get<std::string>(row[1]) == "assumed_averted";
    CHECK(listed);
    std::vector<std::vector<PlanFigures>> none(3, std::vector<PlanFigures>(2));
    const ReplicatedFigures g = collect_figures({"one", "two"}, none);
    CHECK_FALSE(shown_metric(g, m));
    CHECK_FALSE(outcomes_averted_table(g));
    CHECK(outcomes_averted_text(g).empty());
    for (const auto& row : comparison_tables(g).comparison.rows)
        CHECK(std::get<std::string>(row[1]).find("averted") == std::string::npos);
}

TEST_CASE("averted.the_loader_reads_and_refuses") {
    const std::string dir = std::string(TOCSIN_SOURCE_DIR) + "/scenarios";
    const std::string demo = tocsin::testing::read_file(dir + "/demo.yaml");
    const std::string line = "  averted: {shape: linear, probability: 0.3, full_lead_hours: 6}\n";
    REQUIRE(demo.find(line) != std::string::npos);
    auto with = [&](const std::string& replacement) {
        std::string text = demo;
        return text.replace(text.find(line), line.size(), replacement);
    };
    auto error_of = [](const std::string& text) { return std::string(tocsin::testing::scenario_error(text).what()); };
    const Scenario sc = parse_scenario(demo, "demo.yaml", dir);
    REQUIRE(sc.analysis.averted);
    CHECK(sc.analysis.averted->full_lead == hours(6));
    CHECK(sc.analysis.averted->probability == 0.3);
    const Scenario table = parse_scenario(
        with("  averted:\n    shape: table\n    table:\n      - {lead_hours: 2, probability: 0.1}\n"
             "      - {lead_hours: 6, probability: 0.3}\n"),
        "demo.yaml", dir);
    REQUIRE(table.analysis.averted);
    CHECK(table.analysis.averted->table.size() == 2);
    // The demo's minimum lead is 1 h: a linear effect must reach its full probability later.
    CHECK(error_of(with("  averted: {shape: linear, probability: 0.3, full_lead_hours: 0.5}\n"))
              .find("longer than the minimum lead") != std::string::npos);
    CHECK(error_of(with("  averted: {shape: step, full_lead_hours: 6}\n")).find("probability") != std::string::npos);
    CHECK(error_of(with("  averted: {shape: curve, probability: 0.3, full_lead_hours: 6}\n")).find("unknown shape") !=
          std::string::npos);
    CHECK(error_of(with("  averted:\n    shape: table\n    table:\n      - {lead_hours: 6, probability: 0.3}\n"
                        "      - {lead_hours: 2, probability: 0.1}\n"))
              .find("ascending") != std::string::npos);
    CHECK(error_of(with("  averted: {shape: linear, probability: 1.5, full_lead_hours: 6}\n")).find("s.yaml:") !=
          std::string::npos);
}
