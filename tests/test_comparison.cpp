// Comparing plans across replications: intervals, paired differences, the
// frontier and the budget question, on small hand-built figures.
#include <doctest/doctest.h>

#include <algorithm>

#include <cmath>
#include <limits>

#include "analysis/comparison.hpp"
#include "report/comparison_tables.hpp"
#include "report/report.hpp"
#include "study/run.hpp"

using namespace tocsin;

namespace {

constexpr double missing = std::numeric_limits<double>::quiet_NaN();

// Figures for plans with given (burden, benefit) per replication.
ReplicatedFigures figures(const std::vector<std::string>& plans,
                          const std::vector<std::vector<std::pair<double, double>>>& per_plan) {
    const std::size_t burden = metric_index(*find_metric("per_unit_night_mean"));
    const std::size_t benefit = metric_index(*find_metric("caught"));
    ReplicatedFigures f;
    f.plans = plans;
    f.replications = per_plan.front().size();
    f.values.assign(plans.size(), std::vector<std::vector<double>>(plan_metrics().size(),
                                                                   std::vector<double>(f.replications, missing)));
    for (std::size_t p = 0; p < plans.size(); ++p)
        for (std::size_t r = 0; r < f.replications; ++r) {
            f.values[p][burden][r] = per_plan[p][r].first;
            f.values[p][benefit][r] = per_plan[p][r].second;
        }
    return f;
}

std::size_t burden() { return metric_index(*find_metric("per_unit_night_mean")); }
std::size_t benefit() { return metric_index(*find_metric("caught")); }

}  // namespace

TEST_CASE("comparison.t_interval") {
    // 1..5: mean 3, s = sqrt(2.5), s/sqrt(5) = 0.707107; t(0.975, 4) = 2.776445
    // (Student's t table, e.g. Fisher & Yates, Statistical Tables, Table III;
    // value from memory, cross-checked against scipy in test_reference_comparison).
    const std::vector<double> v = {1, 2, 3, 4, 5};
    const MeanInterval m = mean_interval(v);
    CHECK(m.mean == doctest::Approx(3));
    CHECK(m.low == doctest::Approx(3 - 2.776445 * 0.707107).epsilon(1e-6));
    CHECK(m.high == doctest::Approx(3 + 2.776445 * 0.707107).epsilon(1e-6));
    CHECK(m.n == 5);
    // Undefined replications are left out and counted out.
    const std::vector<double> w = {1, missing, 3};
    const MeanInterval k = mean_interval(w);
    CHECK(k.n == 2);
    CHECK(k.mean == doctest::Approx(2));
    // One value: a mean, no interval.
    const std::vector<double> one = {4};
    CHECK(std::isnan(mean_interval(one).low));
    CHECK(with_interval(mean_interval(one), 1) == "4");
    CHECK(with_interval(m, 1) == "3 (1 to 5)");
}

TEST_CASE("comparison.paired_differences_are_narrower") {
    // Plan B pages exactly 1.3 more than plan A in every replication, while the
    // replications themselves vary a lot: the paired difference is 1.3 with no
    // spread; the figures themselves have wide intervals.
    std::vector<std::pair<double, double>> a, b;
    const double level[] = {1.0, 4.0, 2.5, 6.0, 3.0};
    for (double x : level) {
        a.push_back({x, 10});
        b.push_back({x + 1.3, 12});
    }
    const ReplicatedFigures f = figures({"A", "B"}, {a, b});
    const ComparisonTables t = comparison_tables(f);
    bool found = false;
    for (const auto& row : t.differences.rows) {
        if (std::get<std::string>(row[2]) != "per_unit_night_mean") continue;
        found = true;
        CHECK(std::get<std::string>(row[0]) == "B");
        CHECK(std::get<double>(row[3]) == doctest::Approx(1.3));
        CHECK(std::get<double>(row[4]) == doctest::Approx(1.3));
        CHECK(std::get<double>(row[5]) == doctest::Approx(1.3));
    }
    CHECK(found);
    const MeanInterval unpaired = mean_interval(f.of(1, burden()));
    CHECK(unpaired.high - unpaired.low > 3.0);
    CHECK(comparison_text(f).find("B: 1.3 (1.3 to 1.3) notices per unit per night, 2 (2 to 2) cases caught") != std::string::npos);
    // Tidy per-replication rows: plans x replications x metrics, but for the
    // two that need a declared averted effect (none here: all NaN).
    const auto declared_only = std::count_if(plan_metrics().begin(), plan_metrics().end(),
                                             [](const Metric& m) { return m.declared_only; });
    CHECK(declared_only == 2);
    CHECK(t.replication_figures.rows.size() == 2 * 5 * (plan_metrics().size() - 2));
}

TEST_CASE("comparison.frontier") {
    // (burden, benefit): A (1, 10); B (2, 9) is beaten by A; C (3, 20);
    // D (3, 15) is beaten by C; E (4, 20) is beaten by C (same benefit, more
    // burden); F has no figures.
    const ReplicatedFigures f = figures({"A", "B", "C", "D", "E", "F"},
                                        {{{1, 10}}, {{2, 9}}, {{3, 20}}, {{3, 15}}, {{4, 20}}, {{missing, missing}}});
    const auto points = frontier(f, burden(), benefit());
    std::vector<bool> on;
    for (const auto& p : points) on.push_back(p.on_frontier);
    CHECK(on == std::vector<bool>{true, false, true, false, false, false});
    CHECK(frontier_text(f, burden(), benefit()).find("2 of 6 plans") != std::string::npos);
}

TEST_CASE("comparison.budget") {
    // Limit 3 on the burden. Over four replications:
    //   A: burden 1,1,1,1 (within), caught 10, 12, 10, 10
    //   B: burden 2,4,2,3 (mean 2.75, within; within in 3 of 4), caught 11, 11, 11, 11
    //   C: burden 5,5,5,5 (over), caught 30 each.
    // Best within: B (mean 11 > A's 10.5); B beats A in replications 1, 3, 4: 75%.
    const ReplicatedFigures f = figures({"A", "B", "C"}, {{{1, 10}, {1, 12}, {1, 10}, {1, 10}},
                                                          {{2, 11}, {4, 11}, {2, 11}, {3, 11}},
                                                          {{5, 30}, {5, 30}, {5, 30}, {5, 30}}});
    const BudgetAnswer a = best_within_budget(f, burden(), 3.0, benefit());
    REQUIRE(a.best);
    CHECK(*a.best == 1);
    CHECK(a.within == std::vector<std::size_t>{0, 1});
    CHECK(a.share_within[1] == doctest::Approx(0.75));
    CHECK(a.share_best == doctest::Approx(0.75));
    const BudgetAnswer none = best_within_budget(f, burden(), 0.5, benefit());
    CHECK_FALSE(none.best);
    CHECK(budget_text(f, {none}, burden(), 0.5, benefit()).find("No plan keeps") != std::string::npos);
}

TEST_CASE("comparison.within_channel") {
    // Four plans, one replication, (notices per unit per night, caught):
    //   P1 page (2, 10), P2 page (4, 12), R1 ranked_review (0, 8), R2 ranked_review (0, 11).
    // A review at 08:00 counts 0 per night, so ranked across channels R2 (0, 11)
    // would beat P1 (2, 10), and only R2 and P2 would be on the one frontier.
    // Within each channel: pages P1 (2, 10) and P2 (4, 12) are both on the page
    // frontier; among reviews R2 beats R1 (same burden, more caught).
    ReplicatedFigures f = figures({"P1", "P2", "R1", "R2"}, {{{2, 10}}, {{4, 12}}, {{0, 8}}, {{0, 11}}});
    f.channels = {Channel::page, Channel::page, Channel::ranked_review, Channel::ranked_review};
    const auto groups = comparison_groups(f, burden());
    REQUIRE(groups.size() == 2);
    CHECK(groups[0].channel == Channel::page);
    CHECK(groups[0].plans == std::vector<std::size_t>{0, 1});
    CHECK(groups[1].channel == Channel::ranked_review);
    CHECK(groups[1].plans == std::vector<std::size_t>{2, 3});
    std::vector<bool> on;
    for (const auto& p : frontier(f, burden(), benefit())) on.push_back(p.on_frontier);
    CHECK(on == std::vector<bool>{true, true, false, true});
    const std::string text = frontier_text(f, burden(), benefit());
    CHECK(text.find("Compared within each channel") != std::string::npos);
    CHECK(text.find("frontier of the page plans (2 of 2 plans") != std::string::npos);
    CHECK(text.find("frontier of the ranked_review plans (1 of 2 plans") != std::string::npos);
    const Table t = frontier_table(f, burden(), benefit());
    CHECK(std::get<std::string>(t.rows[0][1]) == "page plans");
    CHECK(std::get<std::string>(t.rows[3][1]) == "ranked_review plans");

    SUBCASE("the budget is answered within each channel") {
        // Limit 3 per night: among pages only P1 (10 caught) is within; among
        // reviews both are, and R2 (11) is best. Across channels R2 would have
        // been "the" answer and P1 would never be named.
        const auto answers = budget_by_group(f, burden(), 3.0, benefit());
        REQUIRE(answers.size() == 2);
        CHECK(answers[0].channel == Channel::page);
        CHECK(answers[0].best == std::optional<std::size_t>{0});
        CHECK(answers[1].best == std::optional<std::size_t>{3});
        const std::string b = budget_text(f, answers, burden(), 3.0, benefit());
        CHECK(b.find("Best within the budget among the page plans: P1") != std::string::npos);
        CHECK(b.find("Best within the budget among the ranked_review plans: R2") != std::string::npos);
    }
    SUBCASE("a channel-neutral burden ranks every plan together, and says so") {
        // Evaluations per unit per shift, (burden, caught): P1 (1, 10), P2 (2, 12),
        // R1 (1.5, 8), R2 (1, 11). One frontier: R2 beats P1 (same burden, more
        // caught) and R1; P2 has the most caught.
        const std::size_t evals = metric_index(*find_metric("evaluations_per_unit_shift"));
        const double per_shift[] = {1, 2, 1.5, 1};
        for (std::size_t p = 0; p < 4; ++p) f.values[p][evals] = {per_shift[p]};
        REQUIRE(comparison_groups(f, evals).size() == 1);
        CHECK_FALSE(comparison_groups(f, evals)[0].channel.has_value());
        on.clear();
        for (const auto& p : frontier(f, evals, benefit())) on.push_back(p.on_frontier);
        CHECK(on == std::vector<bool>{false, true, false, true});
        CHECK(comparison_basis_text(f, evals).find("Compared across channels on evaluations_per_unit_shift") == 0);
        CHECK(budget_by_group(f, evals, 1.5, benefit()).size() == 1);
    }
    SUBCASE("paired differences in notices are left out across channels") {
        // Two replications: P1 (2, 10), (2, 12); R2 (0, 11), (0, 13). R2 minus P1:
        // caught +1 in both; its notices per night are not pages, so no difference.
        ReplicatedFigures g = figures({"P1", "R2"}, {{{2, 10}, {2, 12}}, {{0, 11}, {0, 13}}});
        g.channels = {Channel::page, Channel::ranked_review};
        const std::string text = comparison_text(g);
        CHECK(text.find("R2: 1 (1 to 1) cases caught (a ranked_review plan: its notices are not comparable with page "
                        "notices)") != std::string::npos);
        const Table d = differences_by_plan(g, {burden(), benefit()});
        REQUIRE(d.rows.size() == 1);
        CHECK(std::holds_alternative<std::monostate>(d.rows[0][1]));  // per_unit_night_mean: empty
        CHECK(std::get<double>(d.rows[0][4]) == doctest::Approx(1));   // caught
        for (const auto& row : comparison_tables(g).differences.rows)
            if (std::get<std::string>(row[2]) == "per_unit_night_mean") CHECK(std::holds_alternative<std::monostate>(row[3]));
    }
    SUBCASE("plans of one channel need no grouping") {
        f.channels = {Channel::page, Channel::page, Channel::page, Channel::page};
        REQUIRE(comparison_groups(f, burden()).size() == 1);
        CHECK(comparison_basis_text(f, burden()).empty());
    }
}

TEST_CASE("comparison.plan_net_benefit") {
    // Vickers & Elkin (2006): NB = TP/n - FP/n x pt/(1 - pt). A plan that caught
    // 3 of 5 cases and evaluated 4 of the 15 patients without the outcome, n = 20.
    // At N = 5 evaluations per case found, pt = 0.2 and pt/(1-pt) = 0.25:
    // NB = 3/20 - 4/20 x 0.25 = 0.15 - 0.05 = 0.10; treat all: 5/20 - 15/20 x 0.25 = 0.0625.
    // At N = 2, pt = 0.5 and the odds are 1: NB = 0.15 - 0.20 = -0.05.
    PlanFigures f;
    f.cases = 5;
    f.caught = 3;
    f.evaluated_non_cases = 4;
    const Table t = plan_net_benefit_table(plan_net_benefit({"p"}, {f}, 20, {5, 2}));
    REQUIRE(t.rows.size() == 2);
    CHECK(std::get<double>(t.rows[0][2]) == doctest::Approx(0.2));
    CHECK(std::get<double>(t.rows[0][6]) == doctest::Approx(0.10));
    CHECK(std::get<double>(t.rows[0][7]) == doctest::Approx(0.0625));
    CHECK(std::get<double>(t.rows[1][6]) == doctest::Approx(-0.05));
}

namespace {

// The long tables widened by metric, one row per plan with `<metric>`,
// `<metric>_lo`, `<metric>_hi`: how the report's view was once derived, kept
// here as an independent check of comparison_by_plan and differences_by_plan.
Table wide_intervals(const Table& long_table, const std::string& value_column, const std::vector<std::string>& metrics) {
    const std::string row_key = "plan";
    auto column = [&](const std::string& name) {
        const auto found = std::find(long_table.columns.begin(), long_table.columns.end(), name);
        if (found == long_table.columns.end())
            throw std::invalid_argument("table '" + long_table.name + "' has no column '" + name + "'");
        return static_cast<std::size_t>(found - long_table.columns.begin());
    };
    const std::size_t key = column(row_key), metric = column("metric"), value = column(value_column),
                      low = column("ci_low"), high = column("ci_high");
    auto text_of = [](const Cell& c) {
        if (std::holds_alternative<std::string>(c)) return std::get<std::string>(c);
        if (std::holds_alternative<std::int64_t>(c)) return std::to_string(std::get<std::int64_t>(c));
        return std::string();
    };
    std::vector<std::string> keys, order = metrics;
    std::map<std::string, std::size_t> key_row, metric_position;
    for (const std::string& m : order) metric_position.emplace(m, metric_position.size());
    const bool all_metrics = metrics.empty();
    for (const auto& row : long_table.rows) {
        const std::string k = text_of(row[key]), m = text_of(row[metric]);
        if (key_row.emplace(k, keys.size()).second) keys.push_back(k);
        if (all_metrics && metric_position.emplace(m, order.size()).second) order.push_back(m);
    }
    std::set<std::string> seen;
    for (const auto& row : long_table.rows) seen.insert(text_of(row[metric]));
    for (const std::string& m : metrics)
        if (!seen.count(m)) throw std::invalid_argument("table '" + long_table.name + "' has no metric '" + m + "'");

    Table wide;
    wide.name = long_table.name;
    wide.title = long_table.title;
    wide.columns = {row_key};
    for (const std::string& m : order) {
        wide.columns.push_back(m);
        wide.columns.push_back(m + "_lo");
        wide.columns.push_back(m + "_hi");
    }
    std::vector<std::vector<Cell>> rows(keys.size(), std::vector<Cell>(wide.columns.size()));
    for (std::size_t r = 0; r < keys.size(); ++r) rows[r][0] = keys[r];
    for (const auto& row : long_table.rows) {
        const auto m = metric_position.find(text_of(row[metric]));
        if (m == metric_position.end()) continue;  // a metric not asked for
        auto& out = rows[key_row.at(text_of(row[key]))];
        out[1 + 3 * m->second] = row[value];
        out[2 + 3 * m->second] = row[low];
        out[3 + 3 * m->second] = row[high];
    }
    for (auto& row : rows) wide.add_row(std::move(row));
    return wide;
}

}  // namespace

TEST_CASE("comparison.report_view_is_the_long_table_widened") {
    // The report's plan-per-row view holds the same cells as the long tables
    // widened by metric (wide_intervals): the figure, its low and high ends,
    // empty where undefined (plan C has no benefit; sensitivity is never set).
    const ReplicatedFigures f = figures({"A", "B", "C"}, {{{1, 10}, {2, 12}, {1.5, 9}},
                                                          {{2, 11}, {4, 11}, {2, 13}},
                                                          {{5, missing}, {5, missing}, {6, missing}}});
    const std::size_t sensitivity = metric_index(*find_metric("sensitivity"));
    const std::vector<std::size_t> metrics = {benefit(), burden(), sensitivity};
    const std::vector<std::string> names = {"caught", "per_unit_night_mean", "sensitivity"};
    const ComparisonTables t = comparison_tables(f, 1);
    const Table wide = wide_intervals(t.comparison, "mean", names);
    const Table view = comparison_by_plan(f, metrics);
    CHECK(view.columns == wide.columns);
    CHECK(view.rows == wide.rows);
    const Table wide_differences = wide_intervals(t.differences, "mean_difference", names);
    const Table differences = differences_by_plan(f, metrics, 1);
    CHECK(differences.title == wide_differences.title);
    CHECK(differences.columns == wide_differences.columns);
    CHECK(differences.rows == wide_differences.rows);
}

TEST_CASE("comparison.as_logged_beside_the_means") {
    // Replication 0 is the log (replay with a bootstrap): its figure stands
    // beside the mean over replications, in the long table and as a row of its
    // own under each plan in the terminal and report views. Generated
    // populations, and a single replication, have no such column.
    std::vector<std::pair<double, double>> a = {{0.5, 10}, {1.0, 12}, {1.5, 14}};
    std::vector<std::pair<double, double>> b = {{2.25, 20}, {3.0, 22}, {3.75, 24}};
    ReplicatedFigures f = figures({"A", "B"}, {a, b});
    auto logged_of = [](const Table& t, const std::string& plan, const std::string& metric) -> Cell {
        REQUIRE(t.columns.back() == "as_logged");
        for (const auto& row : t.rows)
            if (std::get<std::string>(row[0]) == plan && std::get<std::string>(row[1]) == metric) return row.back();
        FAIL("no row");
        return {};
    };
    CHECK(std::holds_alternative<std::monostate>(logged_of(comparison_tables(f).comparison, "B", "per_unit_night_mean")));
    CHECK(comparison_text(f).find("as logged") == std::string::npos);

    f.first_is_log = true;
    const ComparisonTables t = comparison_tables(f);
    CHECK(std::get<double>(logged_of(t.comparison, "A", "per_unit_night_mean")) == 0.5);
    CHECK(std::get<double>(logged_of(t.comparison, "B", "per_unit_night_mean")) == 2.25);
    CHECK(std::get<double>(logged_of(t.comparison, "B", "caught")) == 20);
    const std::string text = comparison_text(f);
    // The mean of B's nights is 3 (2.25, 3, 3.75); the row under it gives 2.25.
    const auto b_row = text.find("\nB ");
    REQUIRE(b_row != std::string::npos);
    const auto logged_row = text.find("\n  as logged", b_row);
    REQUIRE(logged_row != std::string::npos);
    CHECK(text.substr(logged_row, 40).find("2.25") != std::string::npos);
    const Table view = comparison_by_plan(f, {burden()});
    REQUIRE(view.rows.size() == 4);  // A, as logged, B, as logged
    CHECK(std::get<double>(view.rows[3][1]) == 2.25);
    CHECK(std::holds_alternative<std::monostate>(view.rows[3][2]));  // no interval on one figure

    // One replication: its figure is the mean; no column, no extra rows.
    ReplicatedFigures one = figures({"A"}, {{{0.5, 10}}});
    one.first_is_log = true;
    CHECK(std::holds_alternative<std::monostate>(logged_of(comparison_tables(one).comparison, "A", "caught")));
    CHECK(comparison_by_plan(one, {burden()}).rows.size() == 1);
}
