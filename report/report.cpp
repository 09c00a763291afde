#include "report/report.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <map>
#include <set>
#include <stdexcept>

#include "report/cautions.hpp"
#include "report/html.hpp"

namespace tocsin {

namespace {

// The page's look: warm paper, dark slate ink, a deep teal for structure, an
// amber box for the cautions. Only local font families; nothing is fetched.
const char* const style_sheet = R"(
:root{--paper:#fbfaf7;--ink:#1f2a33;--muted:#4a5560;--rule:#dcd8ce;--teal:#1d5c63;--band:#f1eee6;--amber:#8a5a00}
*{box-sizing:border-box}
html{background:#e9e5db}
body{margin:0;color:var(--ink);font:16px/1.55 "Liberation Sans","DejaVu Sans",Arial,sans-serif}
main{max-width:1040px;margin:0 auto;background:var(--paper);padding:0 48px 48px;border-top:10px solid var(--teal)}
header{padding:28px 0 8px}
.kicker{margin:0;color:var(--teal);font-size:.8rem;font-weight:bold;letter-spacing:.14em;text-transform:uppercase}
h1{font-size:2rem;line-height:1.2;margin:.25em 0 .2em}
.standfirst{font-size:1.12rem;color:var(--muted);margin:.2em 0 0}
h2{font-size:1.35rem;margin:2em 0 .6em;padding-bottom:.25em;border-bottom:2px solid var(--rule)}
h2 .number{color:var(--teal);margin-right:.45em}
h3{font-size:1.05rem;margin:1.5em 0 .4em}
p,li{max-width:46em}
.cautions{background:#fff3d6;border:1px solid #e2c27a;border-left:8px solid #b7791f;padding:14px 20px;margin:18px 0 8px}
.cautions h2{border:0;margin:0 0 .3em;padding:0;font-size:1.1rem;color:#6b4500}
.cautions p{margin:.3em 0}
nav.contents{margin:18px 0 0;padding:10px 20px;background:var(--band)}
nav.contents h2{border:0;margin:.2em 0;padding:0;font-size:1rem}
nav.contents ol{columns:2;margin:.2em 0 .4em;padding-left:1.4em}
nav.contents a{color:var(--teal)}
.findings{border-left:4px solid var(--teal);padding:.2em 0 .2em 1.2em;margin:1em 0}
.findings li{margin:.25em 0;font-weight:bold}
ol.frontier-list{columns:2;font-size:.92rem}
ul.assumptions li{margin:.3em 0}
.table-wrap{overflow-x:auto;margin:.8em 0 .4em}
table{border-collapse:collapse;font-size:.9rem;font-variant-numeric:tabular-nums;min-width:50%}
caption{text-align:left;font-weight:bold;padding:0 0 .4em}
caption .basis{display:block;font-weight:normal;color:var(--muted);font-size:.9rem}
th,td{padding:.38em .7em;border-bottom:1px solid var(--rule);vertical-align:top}
thead th{background:#e3ecec;border-bottom:2px solid var(--teal);text-align:left}
tbody tr:nth-child(even){background:#f4f2ec}
tbody th{text-align:left;font-weight:bold;white-space:nowrap}
.num{text-align:right}
.interval{display:block;color:var(--muted);white-space:nowrap;font-size:.86em}
.note{color:var(--muted);font-size:.92rem}
.answer{background:#e3ecec;border-left:6px solid var(--teal);padding:10px 16px;font-weight:bold}
figure{margin:1.2em 0;padding:0}
.figure-title{font-weight:bold;margin:0 0 .3em}
figcaption{color:var(--muted);font-size:.92rem;margin-top:.4em;max-width:46em}
svg.chart{display:block;width:100%;height:auto;font-family:inherit}
svg.chart.narrow{max-width:620px}
dl.record{display:grid;grid-template-columns:max-content 1fr;gap:.25em 1.4em;margin:.6em 0}
dl.record dt{font-weight:bold}
dl.record dd{margin:0;font-family:"Liberation Mono","DejaVu Sans Mono",monospace;font-size:.92rem;overflow-wrap:anywhere}
footer{margin-top:2.5em;padding-top:.8em;border-top:2px solid var(--rule);color:var(--muted);font-size:.88rem}
@page{margin:14mm}
@media print{
html{background:#fff}
body{font-size:11pt}
main{max-width:none;padding:0;border-top:6px solid var(--teal)}
nav.contents{display:none}
.table-wrap{overflow:visible}
table{width:100%;font-size:8pt}
th,td{padding:.25em .35em;overflow-wrap:anywhere}
tbody th{white-space:normal}
.interval{white-space:normal}
figure,table,.cautions,dl.record{break-inside:avoid}
h2,h3{break-after:avoid}
.cautions,thead th,tbody tr,.answer{-webkit-print-color-adjust:exact;print-color-adjust:exact}
}
)";

bool given(const Table& t) { return !t.columns.empty(); }
bool given(const std::optional<Table>& t) { return t && given(*t); }

struct Section {
    std::string id, heading, body;
};

std::string paragraph(const std::string& text, const std::string& css_class = "") {
    if (text.empty()) return "";
    return "<p" + (css_class.empty() ? "" : " class=\"" + css_class + "\"") + ">" + html_escape(text) + "</p>\n";
}

// Plain text with line breaks -> one paragraph per non-empty line.
std::string paragraphs(const std::string& text, const std::string& css_class = "") {
    std::string out;
    std::size_t start = 0;
    while (start <= text.size()) {
        std::size_t end = text.find('\n', start);
        if (end == std::string::npos) end = text.size();
        out += paragraph(text.substr(start, end - start), css_class);
        start = end + 1;
    }
    return out;
}

// The chart's title shown above it (the SVG's own <title> is for screen readers and tooltips).
std::string figure_title(const std::string& title) {
    return "<p class=\"figure-title\" aria-hidden=\"true\">" + html_escape(title) + "</p>";
}

std::string list(const std::vector<std::string>& items, const std::string& css_class) {
    std::string out = "<ul class=\"" + css_class + "\">";
    for (const std::string& item : items) out += "<li>" + html_escape(item) + "</li>";
    return out + "</ul>\n";
}

std::vector<BoxGroup> groups_of(const std::vector<PlanSeries>& series) {
    std::vector<BoxGroup> groups;
    for (const PlanSeries& s : series) groups.push_back({s.plan, s.values});
    return groups;
}

const std::string box_reading =
    "The box holds the middle half of the values and the thick line inside it is the median; the diamond "
    "is the mean; the red tick is the 90th percentile (9 values in 10 are at or below it); whiskers reach "
    "the furthest values within one and a half box lengths. Faint dots show the values themselves; whole "
    "numbers such as pages are shown instead as bars under the box, as tall as the share of values they "
    "hold. The column on the right gives the median, the 90th percentile and the number of values.";

std::string join_names(const std::vector<std::string>& names) {
    std::string out;
    for (std::size_t i = 0; i < names.size(); ++i) {
        if (i) out += i + 1 == names.size() ? " and " : ", ";
        out += names[i];
    }
    return out;
}

// One frontier chart with its lists: the plans of one comparison group.
std::string frontier_figure(const ReportInput& in, const std::vector<const ReportFrontierPoint*>& points,
                            const std::string& id, const std::string& group) {
    ScatterChart chart;
    chart.id = id;
    chart.title = "Burden against benefit, one point per plan" + (group.empty() ? "" : ": " + group);
    chart.description = "Horizontal: " + in.burden_label + ". Vertical: " + in.benefit_label + ".";
    chart.x_label = in.burden_label;
    chart.y_label = in.benefit_label;
    if (in.burden_limit) {
        chart.x_limit = in.burden_limit;
        chart.x_limit_label = "budget " + format_for_people(*in.burden_limit);
    }
    for (const ReportFrontierPoint* p : points)
        chart.points.push_back({p->plan, p->burden, p->burden_lo, p->burden_hi, p->benefit, p->benefit_lo, p->benefit_hi,
                                p->on_frontier, p->series});
    chart.series_names = in.frontier_series;
    const bool crowded = chart.points.size() > chart.max_labels;
    const bool numbered = frontier_numbered(chart);
    std::string caption = "Bars show the interval of each figure.";
    if (crowded)
        caption = "With " + std::to_string(chart.points.size()) +
                  " plans, only those on the frontier carry interval bars and " +
                  (numbered ? "numbers (see the list below)" : "names") +
                  "; the other plans are small circles, named when the pointer rests on them.";
    if (in.frontier_series.size() > 1)
        caption += " Plans on the first score (" + in.frontier_series.front() +
                   ") are round; plans on another score are diamonds in that score's colour, named in the legend.";
    if (in.burden_limit)
        caption += " The dashed line marks the budget of " + format_for_people(*in.burden_limit) + " " + in.burden_label + ".";
    std::string body = "<figure>" + figure_title(chart.title) + scatter_svg(chart) + "<figcaption>" + html_escape(caption) + "</figcaption></figure>\n";

    std::vector<std::string> frontier, beaten;
    for (std::size_t i : frontier_order(chart.points)) frontier.push_back(points[i]->plan);
    for (const ReportFrontierPoint* p : points)
        if (!p->on_frontier) beaten.push_back(p->plan);
    if (numbered) {
        body += paragraph("On the frontier, from lightest to heaviest burden (numbers as on the chart):");
        body += "<ol class=\"frontier-list\">";
        for (const std::string& name : frontier) body += "<li>" + html_escape(name) + "</li>";
        body += "</ol>\n";
    } else if (!frontier.empty()) {
        body += paragraph("On the frontier, from lightest to heaviest burden: " + join_names(frontier) + ".");
    }
    if (crowded && !beaten.empty())
        body += paragraph(std::to_string(beaten.size()) + " other plans are beaten on both counts.", "note");
    else if (!beaten.empty())
        body += paragraph("Beaten on both counts: " + join_names(beaten) + ".", "note");
    return body;
}

Section frontier_section(const ReportInput& in) {
    std::string body = paragraph(
        "A plan is on the frontier when no other plan gives at least as much benefit for no more burden. "
        "Choosing between frontier plans is a judgement about how much burden one more case is worth; a plan "
        "off the frontier is beaten on both counts by some other plan.");
    if (!in.comparison_basis.empty()) body += paragraph(in.comparison_basis, "note");
    if (!in.budget_answer.empty()) body += paragraph(in.budget_answer, "answer");
    std::vector<std::string> groups;
    for (const ReportFrontierPoint& p : in.frontier)
        if (std::find(groups.begin(), groups.end(), p.group) == groups.end()) groups.push_back(p.group);
    for (std::size_t g = 0; g < groups.size(); ++g) {
        std::vector<const ReportFrontierPoint*> points;
        for (const ReportFrontierPoint& p : in.frontier)
            if (p.group == groups[g]) points.push_back(&p);
        body += frontier_figure(in, points, g == 0 ? "fig-frontier" : "fig-frontier-" + std::to_string(g + 1), groups[g]);
    }
    return {"frontier", "Burden against benefit", body};
}

Section distribution_section(const std::string& id, const std::string& heading, const std::string& intro,
                             const std::vector<std::pair<BoxChart, std::string>>& charts) {
    std::string body = paragraph(intro);
    for (const auto& [chart, caption] : charts)
        body += "<figure>" + figure_title(chart.title) + box_svg(chart) + "<figcaption>" + html_escape(caption) + "</figcaption></figure>\n";
    return {id, heading, body};
}

std::string run_record_body(const RunRecord& r) {
    std::vector<std::pair<std::string, std::string>> lines = {
        {"Tool", "tocsin " + r.tool_version},
        {"Scenario", r.scenario_name},
        {"Scenario hash", r.scenario_hash},
        {"Seed", std::to_string(r.seed)},
        {"Replications", std::to_string(r.replications)},
    };
    if (r.threads) lines.emplace_back("Threads", std::to_string(*r.threads));
    if (r.seconds_taken) lines.emplace_back("Time taken", format_real(*r.seconds_taken, 1) + " s");
    for (const auto& line : r.other) lines.push_back(line);
    std::string out = "<dl class=\"record\">";
    for (const auto& [label, value] : lines)
        out += "<dt>" + html_escape(label) + "</dt><dd>" + (value.empty() ? "\xE2\x80\x93" : html_escape(value)) + "</dd>";
    out += "</dl>\n";
    out += paragraph(
        "The same scenario, seed and number of replications give the same figures, whatever the number of "
        "threads.",
        "note");
    return out;
}

}  // namespace

LineChart roc_chart(std::vector<CurvePoint> points, const std::string& curve_name) {
    LineChart c;
    c.title = "How well the score separates cases from the rest (ROC curve)";
    c.description = "Sensitivity against false-positive rate over every threshold; the diagonal is a score no better than chance.";
    c.x_label = "false-positive rate (1 - specificity)";
    c.y_label = "sensitivity";
    c.curves = {{curve_name, std::move(points), false}};
    c.x_min = 0, c.x_max = 1, c.y_min = 0, c.y_max = 1;
    c.diagonal = true;
    c.square = true;
    return c;
}

LineChart calibration_chart(std::vector<CurvePoint> points, const std::string& curve_name) {
    LineChart c;
    c.title = "Predicted against observed risk (calibration)";
    c.description = "Observed share with the outcome against the predicted probability; on the diagonal, predictions match what happened.";
    c.x_label = "predicted probability";
    c.y_label = "observed share with the outcome";
    c.curves = {{curve_name, std::move(points), false}};
    c.x_min = 0, c.x_max = 1, c.y_min = 0, c.y_max = 1;
    c.diagonal = true;
    c.square = true;
    return c;
}

LineChart decision_curve_chart(std::vector<CurvePoint> score, std::vector<CurvePoint> treat_all, const std::string& curve_name) {
    LineChart c;
    c.title = "Net benefit by threshold probability (decision curve)";
    c.description = "Net benefit of acting on the score, of evaluating everyone and of evaluating no one.";
    c.x_label = "threshold probability";
    c.y_label = "net benefit";
    double x_lo = 0, x_hi = 1, top = 0;
    for (const auto* series : {&score, &treat_all})
        for (const CurvePoint& p : *series)
            if (std::isfinite(p.y)) top = std::max(top, p.y);
    if (!score.empty()) {
        x_lo = INFINITY, x_hi = -INFINITY;
        for (const CurvePoint& p : score)
            if (std::isfinite(p.x)) x_lo = std::min(x_lo, p.x), x_hi = std::max(x_hi, p.x);
        if (!(x_lo < x_hi)) x_lo = 0, x_hi = 1;
    }
    std::vector<CurvePoint> none = {{x_lo, 0}, {x_hi, 0}};
    c.curves = {{curve_name, std::move(score), false}, {"evaluate everyone", std::move(treat_all), true},
                {"evaluate no one", std::move(none), true}};
    // "Evaluate everyone" falls steeply at high thresholds; showing it down to
    // minus the best net benefit keeps the region that matters readable.
    c.y_max = top > 0 ? top : 0.1;
    c.y_min = -(top > 0 ? top : 0.1) * 0.5;
    return c;
}

namespace {

Section question_section(const ReportInput& in) {
    std::string body = paragraphs(in.question.empty() ? "(The scenario states no question.)" : in.question);
    if (!in.key_findings.empty()) body += "<div class=\"findings\">" + list(in.key_findings, "findings-list") + "</div>\n";
    return {"question", "The question", body};
}

Section comparison_section(const ReportInput& in, const HtmlTableOptions& table_options) {
    std::string body;
    if (given(in.comparison)) body += html_table(in.comparison, table_options) + paragraph(in.interval_note, "note");
    if (given(in.differences)) {
        body += "<h3>Differences between plans, paired within each replication</h3>\n";
        body += paragraph("Each replication runs every plan on the same patients, so a difference is measured "
                          "patient for patient and its interval is narrower than the two plans' intervals suggest.");
        body += html_table(*in.differences, table_options) + paragraph(in.differences_note, "note");
    }
    return {"comparison", "Plans side by side", body};
}

Section burden_section(const ReportInput& in) {
    BoxChart chart;
    chart.id = "fig-burden";
    chart.title = "Distribution of " + in.burden_per_night_label + ", by plan";
    chart.value_label = in.burden_per_night_label;
    chart.groups = groups_of(in.burden_per_night);
    chart.limit = in.per_night_limit;
    std::string caption = (in.burden_note.empty() ? "" : "One value is " + in.burden_note + ". ") + box_reading;
    if (in.per_night_limit) caption += " The dashed line marks the budget of " + format_for_people(*in.per_night_limit) + ".";
    return distribution_section("burden", "Burden per night, by plan",
                                "How the burden spreads over nights: the average hides the bad nights a ward remembers.",
                                {{chart, caption}});
}

Section lead_time_section(const ReportInput& in) {
    std::vector<std::pair<BoxChart, std::string>> charts;
    const std::string each = (in.lead_time_note.empty() ? "One value is one caught case. " : in.lead_time_note + " ");
    if (!in.lead_times_hours.empty()) {
        BoxChart chart;
        chart.id = "fig-lead-notice";
        chart.title = "Hours from the first notice to the outcome, caught cases, by plan";
        chart.value_label = "hours before the outcome (from the first notice)";
        chart.groups = groups_of(in.lead_times_hours);
        charts.emplace_back(chart, each + box_reading);
    }
    if (!in.lead_times_from_evaluation_hours.empty()) {
        BoxChart chart;
        chart.id = "fig-lead-evaluation";
        chart.title = "Hours from the start of the first evaluation to the outcome, caught cases, by plan";
        chart.value_label = "hours before the outcome (from the first evaluation)";
        chart.groups = groups_of(in.lead_times_from_evaluation_hours);
        const std::string gap =
            in.lead_times_hours.empty() ? "" : "The gap to the chart above is the time spent waiting for staff. ";
        charts.emplace_back(chart, each + gap + box_reading);
    }
    return distribution_section("lead-times", "How early cases were reached",
                                "More hours before the outcome leave more room to act.", charts);
}

Section evaluation_section(const ReportInput& in, const HtmlTableOptions& table_options) {
    std::string body = paragraph("How the score itself performs on the same data and exclusions, apart from any workflow.");
    for (const Table& t : in.evaluation_tables)
        if (given(t)) body += html_table(t, table_options);
    for (std::size_t i = 0; i < in.evaluation_charts.size(); ++i) {
        const LineChart& chart = in.evaluation_charts[i];
        body += "<figure>" + figure_title(chart.title) + line_svg(chart, "fig-evaluation-" + std::to_string(i + 1)) +
                "<figcaption>" + html_escape(chart.description) + "</figcaption></figure>\n";
    }
    body += paragraph(in.evaluation_note, "note");
    return {"evaluation", "How well the score performs", body};
}

Section score_comparison_section(const ReportInput& in, const HtmlTableOptions& table_options) {
    std::string body = paragraph(in.score_comparison_intro);
    if (in.score_comparison_roc)
        body += "<figure>" + figure_title(in.score_comparison_roc->title) +
                line_svg(*in.score_comparison_roc, "fig-two-scores-roc") + "<figcaption>" +
                html_escape(in.score_comparison_roc->description) + "</figcaption></figure>\n";
    if (in.score_comparison_curves)
        body += "<figure>" + figure_title(in.score_comparison_curves->title) +
                line_svg(*in.score_comparison_curves, "fig-two-scores-decision") + "<figcaption>" +
                html_escape(in.score_comparison_curves->description) + "</figcaption></figure>\n";
    for (const Table& t : in.score_comparison_tables) body += html_table(t, table_options);
    body += paragraph(in.score_comparison_note, "note");
    return {"two-scores", "Two scores on the same stays", body};
}

Section groups_section(const ReportInput& in, const HtmlTableOptions& table_options) {
    std::string body = paragraph(in.group_intro);
    if (!in.group_lines.empty()) body += "<div class=\"findings\">" + list(in.group_lines, "findings-list") + "</div>\n";
    for (const IntervalChart& chart : in.group_charts)
        body += "<figure>" + figure_title(chart.title) + interval_svg(chart) + "<figcaption>" +
                html_escape(chart.description) + "</figcaption></figure>\n";
    for (const Table& t : in.group_tables) body += html_table(t, table_options);
    body += paragraph(in.group_note, "note");
    return {"who-is-reached", "Who is reached", body};
}

// The sections the input gives, in reading order; empty inputs are left out.
std::vector<Section> report_sections(const ReportInput& in) {
    std::vector<Section> sections{question_section(in)};
    if (!in.assumptions.empty())
        sections.push_back({"assumptions", "What the scenario assumes",
                            paragraph("Every figure below rests on these assumptions and changes when they change.") +
                                list(in.assumptions, "assumptions")});
    HtmlTableOptions table_options;
    table_options.column_labels = in.column_labels;
    if (given(in.comparison) || given(in.differences)) sections.push_back(comparison_section(in, table_options));
    if (given(in.per_ward))
        sections.push_back({"per-ward", "Per ward",
                            paragraph(in.per_ward_intro) + html_table(*in.per_ward, table_options) +
                                paragraph(in.per_ward_note, "note")});
    if (!in.group_tables.empty()) sections.push_back(groups_section(in, table_options));
    if (!in.frontier.empty()) sections.push_back(frontier_section(in));
    if (given(in.channel_units))
        sections.push_back({"channels", "Each channel in its own unit",
                            html_table(*in.channel_units, table_options) + paragraph(in.channel_units_note, "note")});
    if (!in.burden_per_night.empty()) sections.push_back(burden_section(in));
    if (!in.lead_times_hours.empty() || !in.lead_times_from_evaluation_hours.empty())
        sections.push_back(lead_time_section(in));
    if (given(in.staff_and_waits))
        sections.push_back({"staff", "Staff time and waiting, by role",
                            html_table(*in.staff_and_waits, table_options) + paragraph(in.staff_note, "note")});
    if (given(in.outcomes_averted))
        sections.push_back({"averted", "Outcomes averted, under a stated effect",
                            paragraph(in.outcomes_averted_note, "note") + html_table(*in.outcomes_averted, table_options)});
    if (given(in.acceptance_by_load))
        sections.push_back({"fatigue", "Response that falls with load",
                            html_table(*in.acceptance_by_load, table_options) + paragraph(in.acceptance_note, "note")});
    if (!in.score_comparison_tables.empty()) sections.push_back(score_comparison_section(in, table_options));
    if (!in.evaluation_tables.empty() || !in.evaluation_charts.empty())
        sections.push_back(evaluation_section(in, table_options));
    sections.push_back({"run", "How this report was made", run_record_body(in.run)});
    return sections;
}

}  // namespace

std::string render_report(const ReportInput& in) {
    const std::vector<Section> sections = report_sections(in);
    const std::string cautions = in.cautions.empty() ? cautions_text() : in.cautions;
    const std::string title = in.title.empty() ? "Untitled scenario" : in.title;

    std::string page = "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n";
    page += "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n";
    page += "<title>" + html_escape(title) + " \xE2\x80\x94 plan comparison</title>\n";
    page += "<style>" + std::string(style_sheet) + "</style>\n</head>\n<body>\n<main>\n";
    page += "<header>\n<p class=\"kicker\">tocsin \xC2\xB7 comparison of alerting plans</p>\n<h1>" + html_escape(title) + "</h1>\n";
    page += "<p class=\"standfirst\">For discussion by the committee that chooses among these plans. The figures come "
            "from a simulation of the scenario below, not from observed practice.</p>\n</header>\n";
    page += "<aside class=\"cautions\" id=\"cautions\" role=\"note\" aria-labelledby=\"cautions-heading\">\n"
            "<h2 id=\"cautions-heading\">Read this first</h2>\n" + paragraphs(cautions) + "</aside>\n";
    page += "<nav class=\"contents\" aria-label=\"Contents\"><h2>Contents</h2><ol>";
    for (const Section& s : sections) page += "<li><a href=\"#" + s.id + "\">" + html_escape(s.heading) + "</a></li>";
    page += "</ol></nav>\n";
    for (std::size_t i = 0; i < sections.size(); ++i) {
        const Section& s = sections[i];
        page += "<section id=\"" + s.id + "\" aria-labelledby=\"" + s.id + "-heading\">\n<h2 id=\"" + s.id +
                "-heading\"><span class=\"number\">" + std::to_string(i + 1) + "</span>" + html_escape(s.heading) +
                "</h2>\n" + s.body + "</section>\n";
    }
    page += "<footer>\n" + paragraphs(cautions) + "</footer>\n</main>\n</body>\n</html>\n";
    return page;
}

}  // namespace tocsin
