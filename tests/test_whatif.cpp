// The what-if page as text: names stay text in the page and in its embedded
// data, nothing is fetched from outside, the sweep's grid reaches the page,
// and a 500-plan sweep fits in 2 MB. The page in a real browser is
// tests/browser/whatif_page.py.
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <regex>

#include "report/cautions.hpp"
#include "report/html.hpp"
#include "report/whatif.hpp"
#include "study/sweep.hpp"
#include "test_support.hpp"

using namespace tocsin;

namespace {

// Every character that could end a script element, open markup or end a
// JavaScript line, and a byte that is not UTF-8.
const std::string hostile = "</script><script>window.x=1</script><img src=x onerror=alert(1)>&amp;\"'\xE2\x80\xA8\xE2\x80\xA9\xFF";

WhatIfInput sample(std::size_t plans, std::size_t wards, const std::string& name) {
    WhatIfInput in;
    in.title = "Sweep " + name;
    in.question = "Which threshold? " + name;
    in.interval_note = "Brackets: 95% interval.";
    in.axes = {{"plan.rule.threshold", "threshold", {}}, {"plan.rule.snooze_minutes", "snooze minutes", {}},
               {"plan.rule.persistence", "persistence", {}}};
    const std::size_t sizes[3] = {20, 5, 5};
    for (std::size_t a = 0; a < 3; ++a)
        for (std::size_t v = 0; v < sizes[a]; ++v) in.axes[a].values.push_back(std::to_string(40 + 5 * v));
    for (const char* metric : {"per_unit_night_mean", "per_unit_night_p90", "worst_unit_night_p90",
                               "patients_per_unit_night_mean", "caught", "sensitivity", "lead_median_h",
                               "channel_burden_mean", "staff_minutes_per_unit_shift", "wait_median_min", "wait_p90_min"})
        in.figures.push_back({metric, std::string(metric) + " for people", 2});
    in.ward_figures = {{"per_unit_night_mean", "notices per night on the unit", 2},
                       {"per_unit_night_p90", "notices per night on the unit, 90th percentile", 1}};
    for (std::size_t w = 0; w < wards; ++w) in.units.push_back("Ward " + std::to_string(w) + " " + name);
    in.burden = in.figures[0];
    in.benefit = in.figures[4];
    in.budget_answer = "Best within the budget: " + name;
    // Values with every significant digit, as a mean over replications has.
    auto value = [](std::size_t seed) {
        const double m = 1.0 / 3.0 + static_cast<double>(seed) / 7.0;
        return WhatIfValue{m, m - 0.123456789012345, m + 0.123456789012345};
    };
    for (std::size_t p = 0; p < plans; ++p) {
        WhatIfPlan plan;
        plan.name = name + " t" + std::to_string(p);
        plan.at = {p / 25 % 20, p / 5 % 5, p % 5};
        plan.channel = "page";
        plan.burden_unit = "notices per unit per shift";
        plan.group = "all plans";
        plan.on_frontier = p % 7 == 0;
        plan.within_budget = p % 3 == 0;
        plan.burden = value(p);
        plan.benefit = value(p + 1);
        for (std::size_t k = 0; k < in.figures.size(); ++k) plan.figures.push_back(value(p * 31 + k));
        for (std::size_t w = 0; w < wards; ++w) plan.wards.push_back({value(p + w), value(p * 3 + w)});
        in.plans.push_back(plan);
    }
    return in;
}

// The text between <script type="application/json" ...> and its end tag.
std::string embedded_data(const std::string& page) {
    const std::size_t open = page.find("<script type=\"application/json\"");
    REQUIRE(open != std::string::npos);
    const std::size_t start = page.find('>', open) + 1;
    return page.substr(start, page.find("</script>", start) - start);
}

}  // namespace

TEST_CASE("whatif.names_stay_text_in_page_and_data") {
    const std::string page = render_whatif_page(sample(3, 2, hostile));
    // Two script elements, so exactly two end tags: no name closed one early.
    std::size_t ends = 0;
    for (std::size_t at = page.find("</script"); at != std::string::npos; at = page.find("</script", at + 1)) ++ends;
    CHECK(ends == 2);
    CHECK(page.find("<script>window.x") == std::string::npos);
    CHECK(page.find("<img") == std::string::npos);
    const std::string data = embedded_data(page);
    for (const char* raw : {"<", ">", "&", "\xE2\x80\xA8", "\xE2\x80\xA9", "\xFF"}) CHECK(data.find(raw) == std::string::npos);
    CHECK(data.find("\\u003c/script\\u003e\\u003cscript\\u003ewindow.x=1") != std::string::npos);
    CHECK(data.find("\\u2028\\u2029") != std::string::npos);
    // In the markup, the title and question are escaped.
    CHECK(page.find("What if: Sweep &lt;/script&gt;") != std::string::npos);
    // The script puts names in the page as text only.
    for (const char* sink : {"innerHTML", "outerHTML", "insertAdjacentHTML", "document.write", "eval("})
        CHECK(page.find(sink) == std::string::npos);
}

TEST_CASE("whatif.self_contained_with_cautions") {
    const std::string page = render_whatif_page(sample(4, 3, "a"));
    CHECK(page.find("http:") == std::string::npos);
    CHECK(page.find("https:") == std::string::npos);
    CHECK_FALSE(std::regex_search(page, std::regex(R"(\b(src|href|srcset|action)\s*=)", std::regex::icase)));
    CHECK_FALSE(std::regex_search(page, std::regex(R"(@import|url\(|<link|<iframe|<object|<embed)", std::regex::icase)));
    CHECK(page.find(html_escape(cautions_text())) != std::string::npos);
    CHECK(page.find("@media print") != std::string::npos);
    // The control case: the checks above do see an outside resource.
    const std::string bad = page + "<img src=\"https://example.invalid/x.png\">";
    CHECK(bad.find("https:") != std::string::npos);
    CHECK(std::regex_search(bad, std::regex(R"(\b(src|href|srcset|action)\s*=)", std::regex::icase)));
}

TEST_CASE("whatif.figures_shown_and_exact") {
    WhatIfInput in = sample(1, 1, "a");
    in.figures[0].decimals = 1;
    in.plans[0].figures[0] = {2.0 / 3.0, std::nan(""), std::nan("")};
    const std::string data = whatif_data_json(in);
    // Shown with the figure's decimals (format_real), exact as the CSV prints
    // it (format_number); no interval: empty texts, as the CSV's empty cells.
    CHECK(data.find("\"f\":[[\"0.7\",\"\",\"\",\"0.6666666666666666\",\"\",\"\"]") != std::string::npos);
    // A ward's figure is carried as shown only (the page's size).
    in.plans[0].wards[0][0] = {2.0 / 3.0, 0.5, 0.75};
    CHECK(whatif_data_json(in).find("\"w\":[[[\"0.67\",\"0.5\",\"0.75\"],") != std::string::npos);
}

TEST_CASE("whatif.same_input_same_bytes") {
    CHECK(render_whatif_page(sample(5, 2, "a")) == render_whatif_page(sample(5, 2, "a")));
}

TEST_CASE("whatif.five_hundred_plan_sweep_fits_in_two_megabytes") {
    // The issue's limit: 500 plans on three axes, twenty wards, every figure
    // with its interval and every number with all its digits.
    const std::string page = render_whatif_page(sample(500, 20, "page-55"));
    MESSAGE("what-if page for 500 plans and 20 wards: " << page.size() << " bytes");
    CHECK(page.size() <= 2u * 1024 * 1024);
}

TEST_CASE("whatif.sweep_grid_places_every_plan") {
    testing::ScratchDir dir;
    const std::string path = dir.file(
        "s.yaml", "scenario_schema: 1\nname: t\ntime_zone: UTC\nshifts: [{name: day, starts: \"07:00\"}]\n"
                  "outcome: {window_hours: 12}\npopulation: {replay: {encounters: e.csv, scores: s.csv}}\n"
                  "plans:\n  - {name: a, rule: {threshold: 60}}\n  - {name: b, rule: {threshold: 70}}\n");
    SweepRequest req;
    req.base_plan = "b";
    req.axes = {parse_sweep_axis("plan.rule.threshold=50,60"), parse_sweep_axis("plan.rule.snooze_minutes=60:180:60")};
    req.keep_other_plans = true;
    const SweptScenario swept = sweep_with_grid(path, req);
    REQUIRE(swept.grid.positions.size() == swept.scenario.simulation.plans.size());
    REQUIRE(swept.grid.axes.size() == 2);
    // The two plans kept as written are on no grid point; then the last axis varies fastest.
    CHECK(swept.grid.positions[0].empty());
    CHECK(swept.grid.positions[1].empty());
    for (std::size_t p = 2; p < swept.grid.positions.size(); ++p) {
        const auto& at = swept.grid.positions[p];
        REQUIRE(at.size() == 2);
        CHECK(swept.scenario.simulation.plans[p].name ==
              "b t" + swept.grid.axes[0].values[at[0]] + " s" + swept.grid.axes[1].values[at[1]]);
    }
    CHECK(swept.grid.positions[3] == std::vector<std::size_t>{0, 1});
}
