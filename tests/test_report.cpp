// The committee report: escaping of every user-given string, sections present
// exactly when their input is, byte-identical output, nothing that reaches the
// network or runs code, and charts that stay well-formed on odd input.
#include <doctest/doctest.h>

#include <cctype>
#include <cmath>
#include <cstdlib>
#include <functional>
#include <limits>
#include <regex>

#include "report/cautions.hpp"
#include "report/html.hpp"
#include "report/report.hpp"
#include "report/svg.hpp"
#include "report_sample.hpp"

using namespace tocsin;
using tocsin::testing::sample_report_input;

namespace {

const double nan_value = std::numeric_limits<double>::quiet_NaN();
const double inf_value = std::numeric_limits<double>::infinity();
const std::string hostile = "<script>alert(1)</script>\"&'";

std::size_t count(const std::string& haystack, const std::string& needle) {
    std::size_t n = 0;
    for (std::size_t at = haystack.find(needle); at != std::string::npos; at = haystack.find(needle, at + 1)) ++n;
    return n;
}

bool has_section(const std::string& page, const std::string& id) {
    return page.find("<section id=\"" + id + "\"") != std::string::npos;
}

// Every '&' must start one of the five entities html_escape writes (the page
// itself writes no other), so no raw user '&' and no entity cut in half.
void check_ampersands(const std::string& page) {
    static const std::vector<std::string> entities = {"&amp;", "&lt;", "&gt;", "&quot;", "&#39;"};
    for (std::size_t at = page.find('&'); at != std::string::npos; at = page.find('&', at + 1)) {
        bool known = false;
        for (const std::string& e : entities) known = known || page.compare(at, e.size(), e) == 0;
        CAPTURE(page.substr(at, 24));
        CHECK(known);
    }
}

// Problems with the numbers of an SVG (or a page holding SVG): inside every
// tag no attribute holds NaN or infinity and every number in a geometric
// attribute parses as a finite value; no "NaN"/"Inf" label (format_real's
// spelling) anywhere. Empty when all is well.
std::vector<std::string> svg_number_problems(const std::string& svg) {
    static const std::regex attribute(R"re(\s(x|y|x1|x2|y1|y2|cx|cy|r|width|height|points|d|viewBox|transform)="([^"]*)")re");
    std::vector<std::string> problems;
    std::size_t numbers = 0;
    for (std::size_t open = svg.find('<'); open != std::string::npos; open = svg.find('<', open + 1)) {
        const std::string tag = svg.substr(open, svg.find('>', open) - open);
        std::string lower = tag;
        for (char& c : lower) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
        if (lower.find("nan") != std::string::npos || lower.find("inf") != std::string::npos) problems.push_back(tag);
        for (std::sregex_iterator m(tag.begin(), tag.end(), attribute), end; m != end; ++m) {
            const std::string value = (*m)[2];
            const char* p = value.c_str();
            while (*p) {
                if (std::isdigit(static_cast<unsigned char>(*p)) || *p == '-' || *p == '.') {
                    char* after = nullptr;
                    const double v = std::strtod(p, &after);
                    if (!std::isfinite(v)) problems.push_back(tag);
                    ++numbers;
                    p = after > p ? after : p + 1;
                } else {
                    ++p;
                }
            }
        }
    }
    if (svg.find("NaN") != std::string::npos || svg.find("Inf") != std::string::npos) problems.push_back("a NaN or Inf label");
    if (numbers == 0) problems.push_back("no coordinates at all");
    return problems;
}

void check_svg_numbers(const std::string& svg) {
    const auto problems = svg_number_problems(svg);
    CAPTURE(svg.substr(0, 300));
    CHECK(problems.empty());
    for (const std::string& p : problems) MESSAGE("bad number in: " << p);
}

}  // namespace

TEST_CASE("report.svg_checker_catches_bad_numbers") {
    // The checker used below must be able to fail.
    CHECK(svg_number_problems("<svg viewBox=\"0 0 10 10\"><line x1=\"0\" y1=\"1e999\"/></svg>").size() == 1);
    CHECK(svg_number_problems("<svg viewBox=\"0 0 10 10\"><circle cx=\"nan\" cy=\"1\"/></svg>").size() == 1);
    CHECK(svg_number_problems("<svg viewBox=\"0 0 10 10\"><text x=\"1\" y=\"1\">NaN</text></svg>").size() == 1);
    CHECK(svg_number_problems("<svg viewBox=\"0 0 10 10\"><line x1=\"0\" y1=\"-2.5\"/></svg>").empty());
}

TEST_CASE("report.html_escape") {
    CHECK(html_escape("<a href=\"x\">&'</a>") == "&lt;a href=&quot;x&quot;&gt;&amp;&#39;&lt;/a&gt;");
    // Valid UTF-8 passes through untouched: "Zürich – 東京".
    CHECK(html_escape("Z\xC3\xBCrich \xE2\x80\x93 \xE6\x9D\xB1\xE4\xBA\xAC") == "Z\xC3\xBCrich \xE2\x80\x93 \xE6\x9D\xB1\xE4\xBA\xAC");
    // A lone continuation byte, a truncated sequence, an overlong '<' (C0 BC),
    // a surrogate (ED A0 80) and a NUL each become U+FFFD.
    const std::string replacement = "\xEF\xBF\xBD";
    CHECK(html_escape("a\x80z") == "a" + replacement + "z");
    CHECK(html_escape("a\xE2\x80") == "a" + replacement + replacement);
    CHECK(html_escape("\xC0\xBC") == replacement + replacement);
    CHECK(html_escape("\xED\xA0\x80") == replacement + replacement + replacement);
    CHECK(html_escape(std::string("a\0b", 3)) == "a" + replacement + "b");
    CHECK(html_escape("tab\tand\nnewline") == "tab\tand\nnewline");
}

TEST_CASE("report.shorten_counts_characters") {
    CHECK(shorten("page-70", 10) == "page-70");
    // Five characters: 4 kept, 1 (2/5 of 4, rounded down) before the ellipsis and 3 after it.
    CHECK(shorten("abcdefghij", 5) == "a\xE2\x80\xA6hij");
    // Five two-byte characters "ééééé" cut to three characters: 0 + ellipsis + 2.
    CHECK(shorten("\xC3\xA9\xC3\xA9\xC3\xA9\xC3\xA9\xC3\xA9", 3) == "\xE2\x80\xA6\xC3\xA9\xC3\xA9");
    // 45 characters to 30: the first 11 and the last 18, which keep the value that sets the plan apart.
    CHECK(shorten("page-55-rise threshold=50, snooze_minutes=120", 30) ==
          "page-55-ris\xE2\x80\xA6snooze_minutes=120");
    CHECK(shorten("\xC3\xA9\xC3\xA9\xC3\xA9", 3) == "\xC3\xA9\xC3\xA9\xC3\xA9");
}

TEST_CASE("report.format_for_people") {
    CHECK(format_for_people(3) == "3");
    CHECK(format_for_people(2.456) == "2.46");
    CHECK(format_for_people(0.01234) == "0.0123");
    CHECK(format_for_people(-1.25) == "-1.25");
    CHECK(format_for_people(nan_value) == "\xE2\x80\x93");
    CHECK(format_for_people(inf_value) == "\xE2\x80\x93");
}

TEST_CASE("report.nice_axis") {
    // 0 to 9.3 in about 5 steps: 1.86 rounds to a step of 2, ends 0 and 10.
    ChartAxis a = nice_axis(0, 9.3);
    CHECK(a.lo == 0);
    CHECK(a.hi == 10);
    CHECK(a.ticks.size() == 6);
    // Identical values 3: widened by 10% to 2.7..3.3, step 0.1, 7 ticks.
    a = nice_axis(3, 3);
    CHECK(a.lo == doctest::Approx(2.7));
    CHECK(a.hi == doctest::Approx(3.3));
    CHECK(a.ticks.size() == 7);
    // The same with zero included: 0..3, step 1 (3/5 = 0.6 rounds to 1 at 0.5 x 10^0 -> 0.5).
    a = nice_axis(3, 3, true);
    CHECK(a.lo == 0);
    CHECK(a.hi == 3);
    // A decision-curve range -0.04..0.07: step 0.022 rounds to 0.02, ends -0.04 and 0.08.
    a = nice_axis(-0.04, 0.07);
    CHECK(a.lo == doctest::Approx(-0.04));
    CHECK(a.hi == doctest::Approx(0.08));
    CHECK(a.ticks[2] == 0);  // exactly zero, not 6.9e-18, so the label reads "0"
    // Nothing finite: the unit interval.
    a = nice_axis(nan_value, inf_value);
    CHECK(a.lo == 0);
    CHECK(a.hi == 1);
}

TEST_CASE("report.html_table_folds_intervals") {
    Table t;
    t.title = "Pages & catches";
    t.columns = {"plan", "night_mean", "night_mean_lo", "night_mean_hi", "caught"};
    t.add_row({std::string("A<1>"), 1.3, 1.1, 1.5, std::int64_t{30}});
    t.add_row({std::string("B"), Cell{}, Cell{}, Cell{}, std::int64_t{31}});
    HtmlTableOptions options;
    options.column_labels = {{"night_mean", "Pages per ward per night"}};
    const std::string html = html_table(t, options);
    CHECK(html.find("<caption>Pages &amp; catches</caption>") != std::string::npos);
    CHECK(html.find(">Pages per ward per night</th>") != std::string::npos);
    CHECK(html.find("title=\"night_mean\"") != std::string::npos);  // the CSV name stays findable
    CHECK(html.find("night_mean_lo") == std::string::npos);          // folded into the value's cell
    CHECK(html.find("<th scope=\"row\">A&lt;1&gt;</th>") != std::string::npos);
    CHECK(html.find("1.3 <span class=\"interval\">(1.1 to 1.5)</span>") != std::string::npos);
    CHECK(html.find("<td class=\"num\">30</td>") != std::string::npos);
    // A missing value shows a dash and no empty interval.
    CHECK(html.find("<td class=\"num\">\xE2\x80\x93</td>") != std::string::npos);
    CHECK(count(html, "class=\"interval\"") == 1);
    // The evaluation tables' spelling, `x_lower` / `x_upper`, folds the same way.
    Table auc;
    auc.columns = {"auc", "auc_lower", "auc_upper"};
    auc.add_row({0.81, 0.75, 0.87});
    CHECK(html_table(auc).find("0.81 <span class=\"interval\">(0.75 to 0.87)</span>") != std::string::npos);
    // Without folding, all five columns show.
    options.combine_intervals = false;
    CHECK(count(html_table(t, options), "<th scope=\"col\"") == 5);
}

TEST_CASE("report.escapes_every_user_string") {
    ReportInput in = sample_report_input(hostile);
    in.title += hostile;
    in.question += hostile;
    in.assumptions.push_back("Units: " + hostile);
    in.key_findings.push_back(hostile);
    in.burden_label += hostile;
    in.burden_per_night_label += hostile;
    in.benefit_label += hostile;
    in.lead_time_note = hostile;
    in.budget_answer += hostile;
    in.evaluation_tables[0].columns[0] = hostile;
    in.column_labels["caught"] = "Caught " + hostile;
    in.run.scenario_name = hostile;
    in.run.other.emplace_back(hostile, hostile);
    in.evaluation_charts[0].curves[0].name = hostile;
    const std::string page = render_report(in);
    CHECK(page.find(hostile) == std::string::npos);
    CHECK(page.find("<script") == std::string::npos);
    CHECK(page.find("alert(1)</") == std::string::npos);
    const std::string escaped = "&lt;script&gt;alert(1)&lt;/script&gt;&quot;&amp;&#39;";
    // Whole: title (2), question, assumption, finding, column label, run record
    // (3), tables (comparison, differences, staff), frontier list, tooltips...
    CHECK(count(page, escaped) >= 15);
    // Cut in chart labels (32 characters: the first 12, an ellipsis, the last
    // 19) before escaping, so no half entity: "page-55-rise" + ellipsis +
    // "lert(1)</script>\"&'".
    CHECK(page.find(">page-55-rise\xE2\x80\xA6lert(1)&lt;/script&gt;&quot;&amp;&#39;</text>") != std::string::npos);
    check_ampersands(page);
}

TEST_CASE("report.sections_present_exactly_when_given") {
    const std::vector<std::string> optional_sections = {"assumptions", "comparison", "frontier", "burden",
                                                        "lead-times", "staff", "evaluation"};
    SUBCASE("everything given") {
        const std::string page = render_report(sample_report_input());
        for (const std::string& id : optional_sections) {
            CAPTURE(id);
            CHECK(has_section(page, id));
            CHECK(page.find("href=\"#" + id + "\"") != std::string::npos);
        }
        CHECK(page.find("Differences between plans") != std::string::npos);
        CHECK(page.find("id=\"fig-lead-evaluation\"") != std::string::npos);
        for (const char* id : {"id=\"fig-evaluation-1\"", "id=\"fig-evaluation-2\"", "id=\"fig-evaluation-3\""})
            CHECK(page.find(id) != std::string::npos);
        CHECK(page.find("id=\"fig-evaluation-4\"") == std::string::npos);
        // Numbered in order 1..9.
        CHECK(page.find("<span class=\"number\">9</span>How this report was made") != std::string::npos);
    }
    SUBCASE("nothing given") {
        ReportInput in;
        const std::string page = render_report(in);
        for (const std::string& id : optional_sections) {
            CAPTURE(id);
            CHECK_FALSE(has_section(page, id));
            CHECK(page.find("href=\"#" + id + "\"") == std::string::npos);
        }
        CHECK(has_section(page, "question"));
        CHECK(has_section(page, "run"));
        CHECK(page.find("<span class=\"number\">2</span>How this report was made") != std::string::npos);
        CHECK(page.find("<svg") == std::string::npos);
    }
    SUBCASE("each one left out alone") {
        const std::vector<std::pair<std::string, std::function<void(ReportInput&)>>> leave_out = {
            {"assumptions", [](ReportInput& in) { in.assumptions.clear(); }},
            {"comparison", [](ReportInput& in) { in.comparison = Table{}; in.differences.reset(); }},
            {"frontier", [](ReportInput& in) { in.frontier.clear(); }},
            {"burden", [](ReportInput& in) { in.burden_per_night.clear(); }},
            {"lead-times", [](ReportInput& in) { in.lead_times_hours.clear(); in.lead_times_from_evaluation_hours.clear(); }},
            {"staff", [](ReportInput& in) { in.staff_and_waits.reset(); }},
            {"evaluation", [](ReportInput& in) { in.evaluation_tables.clear(); in.evaluation_charts.clear(); }},
        };
        for (const auto& [id, clear] : leave_out) {
            ReportInput in = sample_report_input();
            clear(in);
            const std::string page = render_report(in);
            for (const std::string& other : optional_sections) {
                CAPTURE(id);
                CAPTURE(other);
                CHECK(has_section(page, other) == (other != id));
            }
        }
    }
    SUBCASE("parts of a section") {
        ReportInput in = sample_report_input();
        in.differences.reset();
        in.lead_times_from_evaluation_hours.clear();
        in.budget_answer.clear();
        const std::string page = render_report(in);
        CHECK(page.find("Differences between plans") == std::string::npos);
        CHECK(page.find("id=\"fig-lead-evaluation\"") == std::string::npos);
        CHECK(page.find("id=\"fig-lead-notice\"") != std::string::npos);
        // Only evaluation lead times: no talk of a gap to a chart that is not there.
        in = sample_report_input();
        in.lead_times_hours.clear();
        const std::string evaluation_only = render_report(in);
        CHECK(evaluation_only.find("id=\"fig-lead-evaluation\"") != std::string::npos);
        CHECK(evaluation_only.find("The gap to the chart above") == std::string::npos);
        CHECK(render_report(sample_report_input()).find("The gap to the chart above") != std::string::npos);
        CHECK(page.find("class=\"answer\"") == std::string::npos);
    }
}

TEST_CASE("report.cautions_always_carried") {
    ReportInput in;
    std::string page = render_report(in);
    CHECK(page.find(html_escape(cautions_text())) != std::string::npos);
    CHECK(page.find("not a medical device") != std::string::npos);
    CHECK(page.find("id=\"cautions\"") < page.find("<section id=\"question\""));  // before any figure
    in.cautions = "Local wording of the cautions.";
    page = render_report(in);
    CHECK(count(page, "Local wording of the cautions.") == 2);  // top box and footer
}

TEST_CASE("report.same_input_same_bytes") {
    const ReportInput in = sample_report_input(hostile);
    const ReportInput copy = in;
    const std::string first = render_report(in);
    CHECK(first == render_report(copy));
    CHECK(first == render_report(sample_report_input(hostile)));
    // Another input gives another page (the comparison is not vacuous).
    ReportInput changed = in;
    changed.burden_per_night[0].values[0] += 1;
    CHECK(first != render_report(changed));
}

TEST_CASE("report.self_contained") {
    const std::string page = render_report(sample_report_input());
    CHECK(page.rfind("<!DOCTYPE html>", 0) == 0);
    CHECK(page.find("<meta charset=\"utf-8\">") != std::string::npos);
    for (const char* outward : {"http", "<script", "<link", "<img", "<iframe", "src=", "@import", "@font-face", "javascript:", " on"}) {
        CAPTURE(outward);
        if (std::string(outward) == " on") {
            // No event handler attributes such as onload= anywhere.
            CHECK_FALSE(std::regex_search(page, std::regex(R"(<[^>]*\son[a-z]+\s*=)")));
        } else {
            CHECK(page.find(outward) == std::string::npos);
        }
    }
    // The only url() is a reference to a clip path inside the page.
    for (std::size_t at = page.find("url("); at != std::string::npos; at = page.find("url(", at + 1))
        CHECK(page.compare(at, 5, "url(#") == 0);
    check_svg_numbers(page);
    check_ampersands(page);
}

TEST_CASE("report.frontier_named_in_order") {
    // Sample: frontier page-70 (0.4), page-60-snooze-4h (1.6), page-55-rise (3.0); beaten: the other two.
    const std::string page = render_report(sample_report_input());
    CHECK(page.find("On the frontier, from lightest to heaviest burden: page-70, page-60-snooze-4h and page-55-rise.") !=
          std::string::npos);
    CHECK(page.find("Beaten on both counts: page-60-no-snooze and review-top-8 at 07:00.") != std::string::npos);
}

TEST_CASE("report.box_chart_figures") {
    // Values 1, 2, 3, 4, 100: median 3; 90th percentile (type 7) at h = 4 x 0.9 = 3.6,
    // 4 + 0.6 x (100 - 4) = 61.6; n = 5. The 100 lies beyond 3 + 1.5 x 2 = 6, so the
    // upper whisker stops at 4.
    BoxChart chart;
    chart.id = "t";
    chart.value_label = "hours";
    chart.groups = {{"plan A", {4, 100, 1, 3, 2}}};
    const std::string svg = box_svg(chart);
    CHECK(svg.find(">3 \xC2\xB7 61.6 \xC2\xB7 5</text>") != std::string::npos);
    check_svg_numbers(svg);
    // Whole numbers get bars (one per distinct value), reals get dots.
    CHECK(count(svg, "<title>plan A: ") == 5);  // each bar's tooltip, e.g. "plan A: 3 in 1 of 5"
    chart.groups[0].values = {1.5, 2.5, 3.5};
    CHECK(count(box_svg(chart), "<circle") == 3 + 1);  // three values and the legend's dot
}

TEST_CASE("report.charts_survive_odd_input") {
    SUBCASE("box charts") {
        const std::vector<std::vector<BoxGroup>> cases = {
            {},                                              // no plan
            {{"only plan", {}}},                             // one plan, no values
            {{"only plan", {nan_value, nan_value}}},         // only missing values
            {{"one value", {7}}},                            // a single value
            {{"same", {2, 2, 2, 2}}, {"zeros", {0, 0, 0}}},  // identical values
            {{"mixed", {1, nan_value, inf_value, -inf_value, 3}}},
            {{"negative", {-5, -1, -3}}},
            {{"huge", {1e308, -1e308}}},
            {{"tiny", {1e-12, 2e-12}}},
        };
        for (const auto& groups : cases) {
            BoxChart chart;
            chart.id = "odd";
            chart.value_label = "x";
            chart.groups = groups;
            chart.limit = 4;
            const std::string svg = box_svg(chart);
            CAPTURE(svg.substr(0, 400));
            check_svg_numbers(svg);
            CHECK(svg.find("<title id=\"odd-title\">") != std::string::npos);
        }
    }
    SUBCASE("scatter charts") {
        const std::vector<std::vector<ScatterPoint>> cases = {
            {},
            {{"single", 1, 1, 1, 5, 5, 5, true}},
            {{"no interval", 1, nan_value, nan_value, 5, nan_value, nan_value, true}},
            {{"missing", nan_value, 0, 0, 5, 4, 6, false}, {"kept", 2, 1, 3, 5, 4, 6, true}},
            {{"all missing", nan_value, nan_value, nan_value, nan_value, nan_value, nan_value, false}},
            {{"tie a", 2, 2, 2, 3, 3, 3, true}, {"tie b", 2, 2, 2, 3, 3, 3, true}},
        };
        for (const auto& points : cases) {
            ScatterChart chart;
            chart.id = "odd";
            chart.points = points;
            chart.x_limit = nan_value;
            check_svg_numbers(scatter_svg(chart));
        }
    }
    SUBCASE("line charts") {
        const std::vector<std::vector<Curve>> cases = {
            {},
            {{"empty", {}, false}},
            {{"one point", {{0.5, 0.5}}, false}},
            {{"gap", {{0, 0}, {nan_value, 0.2}, {0.5, inf_value}, {1, 1}}, true}},
            {{"flat", {{0, 0.3}, {1, 0.3}}, false}},
        };
        for (const auto& curves : cases) {
            LineChart chart;
            chart.curves = curves;
            chart.diagonal = true;
            const std::string svg = line_svg(chart, "odd");
            check_svg_numbers(svg);
        }
        // The ready-made charts with nothing in them.
        check_svg_numbers(line_svg(roc_chart({}), "a"));
        check_svg_numbers(line_svg(decision_curve_chart({}, {}), "b"));
        check_svg_numbers(line_svg(decision_curve_chart({{0.1, nan_value}}, {{0.1, 0.05}}), "c"));
    }
    SUBCASE("a whole report of odd series") {
        ReportInput in = sample_report_input();
        in.burden_per_night = {{"empty", {}}, {"missing", {nan_value}}, {"flat", {3, 3, 3}}};
        in.lead_times_hours = {{"one", {2.5}}};
        in.frontier = {{"alone", 1, nan_value, nan_value, 1, nan_value, nan_value, true, ""}};
        const std::string page = render_report(in);
        check_svg_numbers(page);
        CHECK(page.find("no values") != std::string::npos);
    }
}

TEST_CASE("report.many_plans_name_only_the_frontier") {
    ScatterChart chart;
    chart.id = "many";
    for (int i = 0; i < 20; ++i)
        chart.points.push_back({"plan-" + std::to_string(i), double(i), nan_value, nan_value, double(i % 7), nan_value,
                                nan_value, i == 0 || i == 6});
    const std::string svg = scatter_svg(chart);
    CHECK(svg.find(">plan-6</text>") != std::string::npos);
    CHECK(svg.find(">plan-5</text>") == std::string::npos);
    CHECK(svg.find("<title>plan-5: ") != std::string::npos);  // still named on hover
}

TEST_CASE("report.crowded_frontier_is_numbered") {
    // 30 plans; every third one is on the frontier (10 > 12 / 2), given in
    // reverse burden order so the list must be sorted: plan-27 is the lightest.
    ReportInput in;
    for (int i = 0; i < 30; ++i)
        in.frontier.push_back({"plan-" + std::to_string(i), double(30 - i), nan_value, nan_value, double(30 - i) * 2,
                               nan_value, nan_value, i % 3 == 0, ""});
    ScatterChart chart;
    for (const ReportFrontierPoint& p : in.frontier)
        chart.points.push_back({p.plan, p.burden, p.burden_lo, p.burden_hi, p.benefit, p.benefit_lo, p.benefit_hi, p.on_frontier});
    CHECK(frontier_numbered(chart));
    const std::vector<std::size_t> order = frontier_order(chart.points);
    REQUIRE(order.size() == 10);
    CHECK(order.front() == 27);
    CHECK(order.back() == 0);
    const std::string page = render_report(in);
    CHECK(page.find("<ol class=\"frontier-list\"><li>plan-27</li><li>plan-24</li>") != std::string::npos);
    CHECK(page.find(">1</text>") != std::string::npos);
    CHECK(page.find(">plan-27</text>") == std::string::npos);
    CHECK(page.find("20 other plans are beaten on both counts.") != std::string::npos);
    // With few frontier plans, names stay on the chart and no numbered list is printed.
    for (ReportFrontierPoint& p : in.frontier) p.on_frontier = p.plan == "plan-0" || p.plan == "plan-3";
    const std::string named = render_report(in);
    CHECK(named.find("<ol class=\"frontier-list\">") == std::string::npos);
    CHECK(named.find(">plan-3</text>") != std::string::npos);
    CHECK(named.find("On the frontier, from lightest to heaviest burden: plan-3 and plan-0.") != std::string::npos);
}

TEST_CASE("report.interval_columns") {
    // Columns `x`, `x_lo`, `x_hi` are shown as "x (lo to hi)".
    Table wide;
    wide.name = "plan_comparison";
    wide.columns = {"plan", "night_mean", "night_mean_lo", "night_mean_hi"};
    wide.add_row({std::string("A"), 0.4, 0.3, 0.5});
    wide.add_row({std::string("B"), 3.0, Cell{}, Cell{}});
    const std::string html = html_table(wide);
    CHECK(html.find("0.4 <span class=\"interval\">(0.3 to 0.5)</span>") != std::string::npos);
    CHECK(html.find("<th scope=\"row\">B</th><td class=\"num\">3</td>") != std::string::npos);  // no interval from one replication
}
