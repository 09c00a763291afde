#include "report/whatif.hpp"

#include <cmath>

#include "report/cautions.hpp"
#include "report/html.hpp"
#include "report/table.hpp"
#include "report/whatif_assets.hpp"

namespace tocsin {

namespace {

// JSON text that cannot end the script element holding it, nor open a
// comment or markup inside it: < > & only ever occur inside JSON strings
// here (the structure uses none of them), so escaping them everywhere keeps
// the JSON equal in meaning.
std::string script_safe(const std::string& json) {
    std::string out;
    out.reserve(json.size());
    for (char c : json) {
        if (c == '<') out += "\\u003c";
        else if (c == '>') out += "\\u003e";
        else if (c == '&') out += "\\u0026";
        else out += c;
    }
    return out;
}

std::string quoted(const std::string& text) { return json_escape(text); }

std::string shown(double v, int decimals) { return std::isfinite(v) ? format_real(v, decimals) : std::string(); }

// [shown mean, shown low, shown high, exact mean, exact low, exact high]; the
// exact texts are the CSV's (format_number), empty where the CSV cell is.
// A ward's values are shown only (the first three): with all their digits a
// hospital's twenty wards would take a 500-plan page past 2 MB.
std::string value_json(const WhatIfValue& v, int decimals, bool exact = true) {
    std::string out = "[" + quoted(shown(v.mean, decimals)) + "," + quoted(shown(v.low, decimals)) + "," +
                      quoted(shown(v.high, decimals));
    if (exact) out += "," + quoted(format_number(v.mean)) + "," + quoted(format_number(v.low)) + "," +
                      quoted(format_number(v.high));
    return out + "]";
}

std::string figure_json(const WhatIfFigure& f) {
    return "{\"name\":" + quoted(f.name) + ",\"label\":" + quoted(f.label) +
           ",\"decimals\":" + std::to_string(f.decimals) + "}";
}

template <typename T, typename F>
std::string list_json(const std::vector<T>& items, F&& one) {
    std::string out = "[";
    for (std::size_t i = 0; i < items.size(); ++i) out += (i ? "," : "") + one(items[i]);
    return out + "]";
}

std::string axis_json(const WhatIfAxis& a) {
    return "{\"key\":" + quoted(a.key) + ",\"label\":" + quoted(a.label) + ",\"values\":" +
           list_json(a.values, quoted) + "}";
}

std::string plan_json(const WhatIfInput& in, const WhatIfPlan& p) {
    std::string out = "{\"name\":" + quoted(p.name) + ",\"at\":" +
                      list_json(p.at, [](std::size_t i) { return std::to_string(i); }) +
                      ",\"channel\":" + quoted(p.channel) + ",\"unit\":" + quoted(p.burden_unit) +
                      ",\"group\":" + quoted(p.group) + ",\"frontier\":" + (p.on_frontier ? "true" : "false") +
                      ",\"budget\":" + (p.within_budget ? (*p.within_budget ? "true" : "false") : "null") +
                      ",\"x\":" + value_json(p.burden, in.burden.decimals) +
                      ",\"y\":" + value_json(p.benefit, in.benefit.decimals) + ",\"f\":[";
    for (std::size_t k = 0; k < p.figures.size() && k < in.figures.size(); ++k)
        out += (k ? "," : "") + value_json(p.figures[k], in.figures[k].decimals);
    out += "],\"w\":[";
    for (std::size_t u = 0; u < p.wards.size(); ++u) {
        out += u ? ",[" : "[";
        for (std::size_t k = 0; k < p.wards[u].size() && k < in.ward_figures.size(); ++k)
            out += (k ? "," : "") + value_json(p.wards[u][k], in.ward_figures[k].decimals, false);
        out += "]";
    }
    return out + "]}";
}

}  // namespace

std::string whatif_data_json(const WhatIfInput& in) {
    std::string out = "{\"title\":" + quoted(in.title) + ",\"axes\":" + list_json(in.axes, axis_json) +
                      ",\"figures\":" + list_json(in.figures, figure_json) + ",\"units\":" +
                      list_json(in.units, quoted) + ",\"ward_figures\":" + list_json(in.ward_figures, figure_json) +
                      ",\"burden\":" + figure_json(in.burden) + ",\"benefit\":" + figure_json(in.benefit) +
                      ",\"budget_asked\":" + (in.budget_answer.empty() ? "false" : "true") + ",\"plans\":[\n";
    for (std::size_t p = 0; p < in.plans.size(); ++p) out += (p ? ",\n" : "") + plan_json(in, in.plans[p]);
    return script_safe(out + "\n]}");
}

std::string render_whatif_page(const WhatIfInput& in) {
    const std::string cautions = in.cautions.empty() ? cautions_text() : in.cautions;
    std::string page = "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n"
                       "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n<title>What if: " +
                       html_escape(in.title) + "</title>\n<style>\n" + whatif_style() + "</style>\n</head>\n<body>\n";
    page += "<header>\n<h1>What if: " + html_escape(in.title) + "</h1>\n";
    if (!in.question.empty()) page += "<p class=\"question\">" + html_escape(in.question) + "</p>\n";
    page += "</header>\n<div class=\"layout\">\n<div class=\"side\">\n"
            "<section class=\"controls\" aria-labelledby=\"controls-heading\">\n"
            "<h2 id=\"controls-heading\">Choose a plan</h2>\n<p class=\"note\">Tab to a control; the arrow keys move "
            "it. Every position is a plan already run.</p>\n<div id=\"controls\"></div>\n"
            "<p class=\"control\"><label for=\"plan-choice\">Plan</label>\n<select id=\"plan-choice\"></select></p>\n"
            "<noscript><p>Moving between plans needs JavaScript; report.html and the CSV tables beside this page "
            "hold every figure.</p></noscript>\n</section>\n"
            "<aside class=\"cautions\" id=\"cautions\" aria-label=\"Cautions\">\n<p>" + html_escape(cautions) +
            "</p>\n</aside>\n</div>\n<main>\n";
    // Only the summary is a live region: a screen reader announces the new
    // plan, not every table cell, when a control moves.
    page += "<section id=\"selection\">\n<div aria-live=\"polite\">\n<h2>Selected: <span id=\"selected-name\"></span>"
            "</h2>\n<p id=\"selected-settings\"></p>\n<p id=\"selected-budget\" class=\"budget\"></p>\n</div>\n"
            "<table id=\"figures\">\n<caption>The selected plan's figures</caption>\n<thead><tr><th scope=\"col\">"
            "Figure</th><th scope=\"col\">Mean</th><th scope=\"col\">95% interval</th></tr></thead>\n"
            "<tbody></tbody>\n</table>\n<p class=\"note\">" + html_escape(in.interval_note) + "</p>\n"
            "</section>\n";
    page += "<section id=\"tradeoff\">\n<h2>Burden and benefit</h2>\n<p id=\"chart-caption\"></p>\n"
            "<div id=\"chart\"><svg id=\"chart-svg\" viewBox=\"0 0 720 420\" role=\"img\" "
            "aria-labelledby=\"chart-caption\"></svg></div>\n<p class=\"note\" id=\"chart-key\"></p>\n"
            "<table id=\"neighbours\">\n<caption>Its neighbours</caption>\n<thead><tr><th scope=\"col\">Neighbour</th>"
            "<th scope=\"col\">Plan</th><th scope=\"col\" id=\"neighbour-burden\"></th><th scope=\"col\" "
            "id=\"neighbour-benefit\"></th><th scope=\"col\">Budget</th></tr></thead>\n<tbody></tbody>\n</table>\n"
            "</section>\n<section id=\"per-ward\">\n<table id=\"wards\">\n<caption>The selected plan on each "
            "ward</caption>\n<thead></thead><tbody></tbody>\n</table>\n</section>\n";
    if (!in.budget_answer.empty())
        page += "<section id=\"budget\">\n<h2>The budget question</h2>\n<p>" + html_escape(in.budget_answer) +
                "</p>\n</section>\n";
    page += "</main>\n</div>\n<script type=\"application/json\" id=\"whatif-data\">\n" + whatif_data_json(in) +
            "\n</script>\n<script>\n" + whatif_script() + "</script>\n</body>\n</html>\n";
    return page;
}

}  // namespace tocsin
