#include "report/svg.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <map>
#include <set>

#include "report/html.hpp"
#include "models/text.hpp"
#include "analysis/quantiles.hpp"
#include "analysis/table.hpp"

namespace tocsin {

namespace {

// Colours of the page (kept in step with the report's style sheet).
const char* const ink = "#1f2a33";
const char* const muted_ink = "#4a5560";
const char* const grid = "#dcd8ce";
const char* const frontier_colour = "#a23b2a";
const char* const limit_colour = "#8a5a00";
const char* const chart_font = "font-family=\"inherit\" font-size=\"13\"";

constexpr double chart_width = 960;

bool finite(double v) { return std::isfinite(v); }

// Maps a value on an axis to a pixel position between two ends.
struct Scale {
    ChartAxis axis;
    double from_px = 0, to_px = 1;
    double operator()(double v) const {
        const double span = axis.hi - axis.lo;
        const double t = span > 0 ? (v - axis.lo) / span : 0.5;
        return from_px + t * (to_px - from_px);
    }
};

std::string tick_label(double v, const ChartAxis& axis) {
    const double step = axis.ticks.size() > 1 ? axis.ticks[1] - axis.ticks[0] : std::fabs(axis.hi - axis.lo);
    int decimals = 0;
    if (step > 0 && finite(step)) decimals = std::clamp(static_cast<int>(-std::floor(std::log10(step) + 1e-9)), 0, 10);
    return format_real(v, decimals);
}

std::string svg_open(const std::string& id, double height, const std::string& title, const std::string& description,
                     double width = chart_width) {
    const std::string w = svg_number(width), h = svg_number(height);
    return std::string("<svg class=\"chart") + (width < chart_width ? " narrow" : "") + "\" id=\"" + id + "\" viewBox=\"0 0 " + w + " " + h + "\" width=\"" + w + "\" height=\"" + h +
           "\" role=\"img\" aria-labelledby=\"" + id + "-title " + id + "-desc\" " + chart_font + ">" +
           "<title id=\"" + id + "-title\">" + html_escape(title) + "</title><desc id=\"" + id + "-desc\">" +
           html_escape(description) + "</desc>";
}

std::string line(double x1, double y1, double x2, double y2, const std::string& stroke, double width = 1,
                 const std::string& extra = "") {
    return "<line x1=\"" + svg_number(x1) + "\" y1=\"" + svg_number(y1) + "\" x2=\"" + svg_number(x2) + "\" y2=\"" +
           svg_number(y2) + "\" stroke=\"" + stroke + "\" stroke-width=\"" + svg_number(width) + "\"" +
           (extra.empty() ? "" : " " + extra) + "/>";
}

std::string text(double x, double y, const std::string& content, const std::string& attributes = "") {
    return "<text x=\"" + svg_number(x) + "\" y=\"" + svg_number(y) + "\"" +
           (attributes.empty() ? "" : " " + attributes) + ">" + html_escape(content) + "</text>";
}

// Grid lines, tick labels and axis titles of a plot area.
std::string x_axis(const Scale& x, double top, double bottom, const std::string& label) {
    std::string out;
    for (double t : x.axis.ticks) {
        out += line(x(t), top, x(t), bottom, grid);
        out += text(x(t), bottom + 18, tick_label(t, x.axis), "text-anchor=\"middle\" fill=\"" + std::string(muted_ink) + "\"");
    }
    out += line(x.from_px, bottom, x.to_px, bottom, muted_ink);
    out += text((x.from_px + x.to_px) / 2, bottom + 42, label, "text-anchor=\"middle\" fill=\"" + std::string(ink) + "\"");
    return out;
}

std::string y_axis(const Scale& y, double left, double right, const std::string& label) {
    std::string out;
    for (double t : y.axis.ticks) {
        out += line(left, y(t), right, y(t), grid);
        out += text(left - 8, y(t) + 4, tick_label(t, y.axis), "text-anchor=\"end\" fill=\"" + std::string(muted_ink) + "\"");
    }
    out += line(left, y.from_px, left, y.to_px, muted_ink);
    const double mid = (y.from_px + y.to_px) / 2;
    out += "<text x=\"18\" y=\"" + svg_number(mid) + "\" transform=\"rotate(-90 18 " + svg_number(mid) +
           ")\" text-anchor=\"middle\" fill=\"" + ink + "\">" + html_escape(label) + "</text>";
    return out;
}

std::string nothing_to_draw(const std::string& id, const std::string& title, const std::string& message) {
    return svg_open(id, 80, title, message) + "<rect x=\"0.5\" y=\"0.5\" width=\"959\" height=\"79\" fill=\"none\" stroke=\"" +
           grid + "\"/>" + text(480, 45, message, "text-anchor=\"middle\" fill=\"" + std::string(muted_ink) + "\"") +
           "</svg>\n";
}

std::size_t character_count(const std::string& utf8) {
    std::size_t n = 0;
    for (std::size_t i = 0; i < utf8.size(); ++n) i += std::max<std::size_t>(1, utf8_sequence_length(utf8, i));
    return n;
}

std::string plural(std::size_t n, const std::string& one, const std::string& many) {
    return std::to_string(n) + " " + (n == 1 ? one : many);
}

}  // namespace

const std::vector<std::string>& plan_colours() {
    static const std::vector<std::string> colours = {"#1d5c63", "#b5651d", "#5b4b8a", "#3d7a2a",
                                                     "#a23b2a", "#2f6690", "#7a4e2d", "#6b6b2f"};
    return colours;
}

std::string svg_number(double v) {
    if (!finite(v)) v = 0;
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.1f", v);
    std::string s = buf;
    if (s == "-0.0") s = "0.0";
    return s;
}

ChartAxis nice_axis(double lo, double hi, bool include_zero, int target_ticks) {
    ChartAxis a;
    if (!finite(lo) || !finite(hi)) {
        lo = 0;
        hi = 1;
    }
    if (lo > hi) std::swap(lo, hi);
    // Keep the span representable: beyond this a chart tells nobody anything anyway.
    lo = std::clamp(lo, -1e300, 1e300);
    hi = std::clamp(hi, -1e300, 1e300);
    if (include_zero) {
        lo = std::min(lo, 0.0);
        hi = std::max(hi, 0.0);
    }
    if (hi == lo) {
        if (lo == 0) hi = 1;
        else {
            const double pad = std::fabs(lo) * 0.1;
            lo = (include_zero && lo > 0) ? 0 : lo - pad;
            hi = hi + pad;
        }
    }
    const double raw = (hi - lo) / std::max(1, target_ticks);
    const double magnitude = std::pow(10.0, std::floor(std::log10(raw)));
    const double normalised = raw / magnitude;
    const double step = (normalised < 1.5 ? 1 : normalised < 3 ? 2 : normalised < 7 ? 5 : 10) * magnitude;
    if (!(step > 0) || !finite(step)) {
        a.lo = lo;
        a.hi = hi;
        a.ticks = {lo, hi};
        return a;
    }
    a.lo = std::floor(lo / step + 1e-9) * step;
    a.hi = std::ceil(hi / step - 1e-9) * step;
    const long count = std::lround((a.hi - a.lo) / step);
    for (long k = 0; k <= count && k <= 60; ++k) {
        double t = a.lo + static_cast<double>(k) * step;
        if (std::fabs(t) < step * 1e-9) t = 0;  // no "-0" or 1e-17 labels
        a.ticks.push_back(t);
    }
    return a;
}

namespace {

// The plans a scatter chart can draw (both figures present) and the sentence
// that describes the chart to a screen reader.
std::string scatter_description(const ScatterChart& chart, const std::vector<const ScatterPoint*>& drawn) {
    const std::size_t left_out = chart.points.size() - drawn.size();
    std::size_t on_frontier = 0;
    for (const ScatterPoint* p : drawn) on_frontier += p->on_frontier;
    std::string description = chart.description + (chart.description.empty() ? "" : " ") + plural(drawn.size(), "plan", "plans") +
                              " drawn, " + std::to_string(on_frontier) + " on the frontier.";
    if (left_out) description += " " + plural(left_out, "plan", "plans") + " left out for a missing value.";
    return description;
}

// Axes wide enough for every point, its interval and the budget line.
std::pair<ChartAxis, ChartAxis> scatter_axes(const ScatterChart& chart, const std::vector<const ScatterPoint*>& drawn) {
    double x_lo = INFINITY, x_hi = -INFINITY, y_lo = INFINITY, y_hi = -INFINITY;
    auto widen = [](double v, double& lo, double& hi) {
        if (!finite(v)) return;
        lo = std::min(lo, v);
        hi = std::max(hi, v);
    };
    for (const ScatterPoint* p : drawn) {
        for (double v : {p->x, p->x_lo, p->x_hi}) widen(v, x_lo, x_hi);
        for (double v : {p->y, p->y_lo, p->y_hi}) widen(v, y_lo, y_hi);
    }
    if (chart.x_limit) widen(*chart.x_limit, x_lo, x_hi);
    return {nice_axis(x_lo, x_hi, true), nice_axis(y_lo, y_hi, false)};
}

std::string scatter_legend(double left) {
    std::string out;
    out += "<circle cx=\"" + svg_number(left + 8) + "\" cy=\"22\" r=\"5.5\" fill=\"" + frontier_colour + "\"/>";
    out += text(left + 20, 26, "on the frontier: no other plan is both lighter and better", "fill=\"" + std::string(ink) + "\"");
    out += "<circle cx=\"" + svg_number(left + 430) + "\" cy=\"22\" r=\"5.5\" fill=\"#ffffff\" stroke=\"" + muted_ink +
           "\" stroke-width=\"1.5\"/>";
    out += text(left + 442, 26, "beaten on both by another plan", "fill=\"" + std::string(ink) + "\"");
    out += line(left + 680, 22, left + 704, 22, muted_ink, 1.2);
    out += text(left + 712, 26, "interval", "fill=\"" + std::string(ink) + "\"");
    return out;
}

// The line through the frontier's plans, left to right.
std::string frontier_polyline(const ScatterChart& chart, const Scale& x, const Scale& y) {
    const std::vector<std::size_t> order = frontier_order(chart.points);
    if (order.size() <= 1) return "";
    std::string points;
    for (std::size_t i : order)
        points += (points.empty() ? "" : " ") + svg_number(x(chart.points[i].x)) + "," + svg_number(y(chart.points[i].y));
    return "<polyline points=\"" + points + "\" fill=\"none\" stroke=\"" + frontier_colour +
           "\" stroke-width=\"2\" stroke-linejoin=\"round\"/>";
}

std::string interval_bars(const ScatterPoint& p, const Scale& x, const Scale& y) {
    const double px = x(p.x), py = y(p.y);
    std::string out;
    if (finite(p.x_lo) && finite(p.x_hi)) {
        out += line(x(p.x_lo), py, x(p.x_hi), py, muted_ink, 1.2);
        out += line(x(p.x_lo), py - 4, x(p.x_lo), py + 4, muted_ink, 1.2);
        out += line(x(p.x_hi), py - 4, x(p.x_hi), py + 4, muted_ink, 1.2);
    }
    if (finite(p.y_lo) && finite(p.y_hi)) {
        out += line(px, y(p.y_lo), px, y(p.y_hi), muted_ink, 1.2);
        out += line(px - 4, y(p.y_lo), px + 4, y(p.y_lo), muted_ink, 1.2);
        out += line(px - 4, y(p.y_hi), px + 4, y(p.y_hi), muted_ink, 1.2);
    }
    return out;
}

// How one plan is shown on the frontier chart.
struct PointStyle {
    bool crowded = false;          // only frontier plans get bars and names
    bool number_frontier = false;  // frontier names become their numbers
    std::size_t number = 0;        // the plan's number on the frontier (1-based), when it is on it
};

std::string scatter_point(const ScatterChart& chart, const ScatterPoint& p, const Scale& x, const Scale& y, double right,
                          const PointStyle& style) {
    const double px = x(p.x), py = y(p.y);
    std::string out = "<g><title>" +
                      html_escape(p.label + ": " + chart.x_label + " " + format_for_people(p.x) + " (" +
                                  format_for_people(p.x_lo) + " to " + format_for_people(p.x_hi) + "), " + chart.y_label +
                                  " " + format_for_people(p.y) + " (" + format_for_people(p.y_lo) + " to " +
                                  format_for_people(p.y_hi) + ")") +
                      "</title>";
    if (!style.crowded || p.on_frontier) out += interval_bars(p, x, y);
    if (p.on_frontier)
        out += "<circle cx=\"" + svg_number(px) + "\" cy=\"" + svg_number(py) + "\" r=\"6\" fill=\"" + frontier_colour + "\"/>";
    else
        out += "<circle cx=\"" + svg_number(px) + "\" cy=\"" + svg_number(py) + "\" r=\"" + (style.crowded ? "3.5" : "5.5") +
               "\" fill=\"#ffffff\" stroke=\"" + muted_ink + "\" stroke-width=\"1.5\"/>";
    if (!style.crowded || p.on_frontier) {
        // Frontier labels sit below-right, clear of the rising frontier line.
        const bool flip = px > right - 220;
        const std::string label = style.number_frontier ? std::to_string(style.number) : shorten(p.label, 32);
        out += text(flip ? px - 10 : px + 10, p.on_frontier ? py + 20 : py - 9, label,
                    std::string(style.number_frontier ? "font-weight=\"bold\" " : "") + "text-anchor=\"" +
                        (flip ? "end" : "start") + "\" fill=\"" + ink +
                        "\" stroke=\"#ffffff\" stroke-width=\"3\" paint-order=\"stroke\"");
    }
    return out + "</g>";
}

}  // namespace

std::string scatter_svg(const ScatterChart& chart) {
    std::vector<const ScatterPoint*> drawn;
    for (const ScatterPoint& p : chart.points)
        if (finite(p.x) && finite(p.y)) drawn.push_back(&p);
    const std::string description = scatter_description(chart, drawn);
    if (drawn.empty()) return nothing_to_draw(chart.id, chart.title, "No plan has both figures to draw. " + description);

    const double height = 520, left = 78, right = chart_width - 28, top = 48, bottom = height - 64;
    const auto [x_axis_ends, y_axis_ends] = scatter_axes(chart, drawn);
    const Scale x{x_axis_ends, left, right};
    const Scale y{y_axis_ends, bottom, top};

    std::string out = svg_open(chart.id, height, chart.title, description);
    out += "<rect x=\"" + svg_number(left) + "\" y=\"" + svg_number(top) + "\" width=\"" + svg_number(right - left) +
           "\" height=\"" + svg_number(bottom - top) + "\" fill=\"#ffffff\"/>";
    out += y_axis(y, left, right, chart.y_label);
    out += x_axis(x, top, bottom, chart.x_label);
    out += scatter_legend(left);
    if (chart.x_limit && finite(*chart.x_limit)) {
        const double px = x(*chart.x_limit);
        out += line(px, top, px, bottom, limit_colour, 1.5, "stroke-dasharray=\"6 4\"");
        out += text(px - 6, top + 16, chart.x_limit_label, "text-anchor=\"end\" fill=\"" + std::string(limit_colour) + "\"");
    }
    out += frontier_polyline(chart, x, y);

    // A crowded chart keeps bars and names for the frontier; other plans are
    // small dots, named on hover. Frontier names become numbers when even they
    // would crowd, matching the numbered list the report prints below.
    std::map<const ScatterPoint*, std::size_t> frontier_number;  // 1-based, in frontier_order
    std::size_t next_number = 1;
    for (std::size_t i : frontier_order(chart.points)) frontier_number[&chart.points[i]] = next_number++;
    PointStyle style;
    style.crowded = drawn.size() > chart.max_labels;
    style.number_frontier = frontier_numbered(chart);
    // Beaten plans first, so frontier points are drawn on top.
    std::stable_partition(drawn.begin(), drawn.end(), [](const ScatterPoint* p) { return !p->on_frontier; });
    for (const ScatterPoint* p : drawn) {
        const auto number = frontier_number.find(p);
        style.number = number == frontier_number.end() ? 0 : number->second;
        out += scatter_point(chart, *p, x, y, right, style);
    }
    return out + "</svg>\n";
}

std::vector<std::size_t> frontier_order(const std::vector<ScatterPoint>& points) {
    std::vector<std::size_t> order;
    for (std::size_t i = 0; i < points.size(); ++i)
        if (points[i].on_frontier && finite(points[i].x) && finite(points[i].y)) order.push_back(i);
    std::stable_sort(order.begin(), order.end(), [&](std::size_t a, std::size_t b) {
        return points[a].x != points[b].x ? points[a].x < points[b].x : points[a].y < points[b].y;
    });
    return order;
}

bool frontier_numbered(const ScatterChart& chart) {
    std::size_t drawn = 0;
    for (const ScatterPoint& p : chart.points) drawn += finite(p.x) && finite(p.y);
    return drawn > chart.max_labels && frontier_order(chart.points).size() > chart.max_labels / 2;
}

namespace {

// One group's values, sorted, with the count of those left out (not finite).
struct BoxRow {
    std::vector<double> sorted;
    std::size_t left_out = 0;
};

std::vector<BoxRow> box_rows(const BoxChart& chart) {
    std::vector<BoxRow> rows;
    for (const BoxGroup& g : chart.groups) {
        BoxRow r;
        for (double v : g.values) {
            if (finite(v)) r.sorted.push_back(v);
            else ++r.left_out;
        }
        std::sort(r.sorted.begin(), r.sorted.end());
        rows.push_back(std::move(r));
    }
    return rows;
}

// Counts (pages per night) take few whole values; dots would pile into
// columns, so each value gets a bar as tall as its share instead.
bool few_whole_values(const std::vector<BoxRow>& rows) {
    std::set<double> distinct;
    bool whole_numbers = true;
    for (const BoxRow& r : rows)
        for (double v : r.sorted) {
            whole_numbers = whole_numbers && v == std::round(v);
            if (whole_numbers && distinct.size() <= 40) distinct.insert(v);
        }
    return whole_numbers && !distinct.empty() && distinct.size() <= 40;
}

std::string box_legend(double legend_left, double right, bool whole_numbers) {
    const std::string legend_colour = "fill=\"" + std::string(ink) + "\"";
    std::string out;
    out += "<rect x=\"" + svg_number(legend_left) + "\" y=\"14\" width=\"26\" height=\"14\" fill=\"#1d5c63\" fill-opacity=\"0.18\" stroke=\"#1d5c63\"/>";
    out += line(legend_left + 13, 14, legend_left + 13, 28, ink, 2.5);
    out += text(legend_left + 34, 26, "middle half, median", legend_colour);
    out += "<path d=\"M" + svg_number(legend_left + 190) + " 15 l6 6 l-6 6 l-6 -6 z\" fill=\"" + std::string(ink) + "\"/>";
    out += text(legend_left + 202, 26, "mean", legend_colour);
    out += line(legend_left + 254, 13, legend_left + 254, 29, frontier_colour, 2.5);
    out += text(legend_left + 262, 26, "90th percentile", legend_colour);
    if (whole_numbers) {
        out += "<rect x=\"" + svg_number(legend_left + 380) + "\" y=\"16\" width=\"5\" height=\"12\" fill=\"" + std::string(muted_ink) +
               "\" fill-opacity=\"0.45\"/><rect x=\"" + svg_number(legend_left + 387) + "\" y=\"21\" width=\"5\" height=\"7\" fill=\"" +
               std::string(muted_ink) + "\" fill-opacity=\"0.45\"/>";
        out += text(legend_left + 400, 26, "how often each value occurs", legend_colour);
    } else {
        out += "<circle cx=\"" + svg_number(legend_left + 384) + "\" cy=\"21\" r=\"3\" fill=\"" + std::string(muted_ink) + "\"/>";
        out += text(legend_left + 393, 26, "values", legend_colour);
    }
    out += text(right + 14, 26, "median · 90th pct · n", "fill=\"" + std::string(muted_ink) + "\"");
    return out;
}

// Where one group's row sits and how it is drawn.
struct BoxRowPlace {
    double row_top = 0, row_height = 0, mid = 0, right = 0;
    bool whole_numbers = false;
    std::string colour;
};

// A bar per distinct value, as tall as its share of the row's values.
std::string value_count_bars(const std::string& label, const std::vector<double>& v, const Scale& x, const BoxRowPlace& at) {
    std::map<double, std::size_t> counts;
    for (double value : v) ++counts[value];
    std::size_t most = 0;
    for (const auto& [value, n] : counts) most = std::max(most, n);
    const double bar_width = std::clamp(0.6 * (x(1) - x(0)), 2.0, 18.0);
    const double row_bottom = at.row_top + at.row_height - 3;
    std::string out;
    for (const auto& [value, n] : counts) {
        const double bar_height = 30 * static_cast<double>(n) / static_cast<double>(most);
        out += "<rect x=\"" + svg_number(x(value) - bar_width / 2) + "\" y=\"" + svg_number(row_bottom - bar_height) +
               "\" width=\"" + svg_number(bar_width) + "\" height=\"" + svg_number(bar_height) + "\" fill=\"" + at.colour +
               "\" fill-opacity=\"0.3\"><title>" +
               html_escape(label + ": " + format_for_people(value) + " in " + std::to_string(n) + " of " +
                           std::to_string(v.size())) +
               "</title></rect>";
    }
    return out;
}

// The values themselves, thinned to evenly spaced order statistics, spread
// vertically by a fixed low-discrepancy sequence (same input, same picture).
std::string value_dots(const std::vector<double>& v, std::size_t max_points, const Scale& x, const BoxRowPlace& at) {
    const std::size_t shown = std::min(v.size(), std::max<std::size_t>(max_points, 1));
    std::string out;
    for (std::size_t k = 0; k < shown; ++k) {
        const std::size_t index = shown == 1 ? 0 : (k * (v.size() - 1)) / (shown - 1);
        const double spread = std::fmod(static_cast<double>(k) * 0.6180339887498949, 1.0) - 0.5;
        out += "<circle cx=\"" + svg_number(x(v[index])) + "\" cy=\"" + svg_number(at.mid + spread * at.row_height * 0.6) +
               "\" r=\"2.4\" fill=\"" + at.colour + "\" fill-opacity=\"0.35\"/>";
    }
    return out;
}

// Whiskers (Tukey's 1.5 IQR), the middle half, median, 90th percentile and mean.
std::string box_glyph(const std::vector<double>& v, const Scale& x, const BoxRowPlace& at) {
    const double q1 = quantile_sorted(v, 0.25), median = quantile_sorted(v, 0.5), q3 = quantile_sorted(v, 0.75);
    const double p90 = quantile_sorted(v, 0.9), average = mean(v);
    const double reach = 1.5 * (q3 - q1);
    const double whisker_lo = *std::lower_bound(v.begin(), v.end(), q1 - reach);
    const double whisker_hi = *(std::upper_bound(v.begin(), v.end(), q3 + reach) - 1);
    const double mid = at.mid;
    std::string out;
    out += line(x(whisker_lo), mid, x(q1), mid, ink, 1.2);
    out += line(x(q3), mid, x(whisker_hi), mid, ink, 1.2);
    out += line(x(whisker_lo), mid - 6, x(whisker_lo), mid + 6, ink, 1.2);
    out += line(x(whisker_hi), mid - 6, x(whisker_hi), mid + 6, ink, 1.2);
    const double box_left = x(q1), box_width = std::max(x(q3) - x(q1), 1.0);
    out += "<rect x=\"" + svg_number(box_left) + "\" y=\"" + svg_number(mid - 11) + "\" width=\"" + svg_number(box_width) +
           "\" height=\"22\" fill=\"" + at.colour + "\" fill-opacity=\"0.18\" stroke=\"" + at.colour + "\" stroke-width=\"1.5\"/>";
    out += line(x(median), mid - 11, x(median), mid + 11, ink, 2.5);
    out += line(x(p90), mid - 15, x(p90), mid + 15, frontier_colour, 2.5);
    out += "<path d=\"M" + svg_number(x(average)) + " " + svg_number(mid - 6) + " l6 6 l-6 6 l-6 -6 z\" fill=\"" + ink +
           "\" stroke=\"#ffffff\" stroke-width=\"1\"/>";
    out += text(at.right + 14, mid + 4,
                format_for_people(median) + " · " + format_for_people(p90) + " · " + std::to_string(v.size()),
                "fill=\"" + std::string(ink) + "\"");
    return out;
}

std::string box_row(const BoxChart& chart, const BoxGroup& g, const std::vector<double>& v, const Scale& x,
                    const BoxRowPlace& at) {
    std::string out = "<g><title>" + html_escape(g.label) + "</title>";
    out += text(x.from_px - 12, at.mid + 4, shorten(g.label, 30), "text-anchor=\"end\" fill=\"" + std::string(ink) + "\"");
    if (v.empty())
        return out + text(x.from_px + 8, at.mid + 4, "no values", "fill=\"" + std::string(muted_ink) + "\" font-style=\"italic\"") +
               "</g>";
    if (at.whole_numbers) out += value_count_bars(g.label, v, x, at);
    else out += value_dots(v, chart.max_points, x, at);
    return out + box_glyph(v, x, at) + "</g>";
}

}  // namespace

std::string box_svg(const BoxChart& chart) {
    const std::vector<BoxRow> rows = box_rows(chart);
    double lo = INFINITY, hi = -INFINITY;
    std::size_t longest_label = 4, left_out = 0;
    for (std::size_t i = 0; i < rows.size(); ++i) {
        if (!rows[i].sorted.empty()) {
            lo = std::min(lo, rows[i].sorted.front());
            hi = std::max(hi, rows[i].sorted.back());
        }
        left_out += rows[i].left_out;
        longest_label = std::max(longest_label, std::min<std::size_t>(character_count(chart.groups[i].label), 30));
    }
    std::string description = chart.description + (chart.description.empty() ? "" : " ") +
                              plural(chart.groups.size(), "group", "groups") + ".";
    if (left_out) description += " " + plural(left_out, "missing value", "missing values") + " left out.";
    if (chart.groups.empty()) return nothing_to_draw(chart.id, chart.title, "Nothing to draw. " + description);
    if (chart.limit && finite(*chart.limit)) {
        lo = std::min(lo, *chart.limit);
        hi = std::max(hi, *chart.limit);
    }
    const bool whole_numbers = few_whole_values(rows);

    // With bars, each row holds the box above and the bars below it.
    const double row_height = whole_numbers ? 66 : 46, top = 42;
    const double label_width = std::clamp(7.4 * static_cast<double>(longest_label) + 20, 90.0, 250.0);
    const double left = label_width, right = chart_width - 200;
    const double bottom = top + row_height * static_cast<double>(rows.size());
    const double height = bottom + 56;
    const Scale x{nice_axis(lo, hi, chart.include_zero), left, right};

    std::string out = svg_open(chart.id, height, chart.title, description);
    // Legend above the plot, aligned with it when it fits beside the right-hand column.
    out += box_legend(left + 600 <= right + 10 ? left : 12, right, whole_numbers);
    for (std::size_t i = 0; i < rows.size(); i += 2)
        out += "<rect x=\"0\" y=\"" + svg_number(top + row_height * static_cast<double>(i)) + "\" width=\"" +
               svg_number(chart_width) + "\" height=\"" + svg_number(row_height) + "\" fill=\"#f1eee6\"/>";
    for (double t : x.axis.ticks) out += line(x(t), top, x(t), bottom, grid);
    if (chart.limit && finite(*chart.limit)) {
        const double px = x(*chart.limit);
        out += line(px, top - 6, px, bottom, limit_colour, 1.5, "stroke-dasharray=\"6 4\"");
    }
    for (std::size_t i = 0; i < rows.size(); ++i) {
        BoxRowPlace at;
        at.row_top = top + row_height * static_cast<double>(i);
        at.row_height = row_height;
        at.mid = whole_numbers ? at.row_top + 20 : at.row_top + row_height / 2;
        at.right = right;
        at.whole_numbers = whole_numbers;
        at.colour = plan_colours()[i % plan_colours().size()];
        out += box_row(chart, chart.groups[i], rows[i].sorted, x, at);
    }
    out += x_axis(x, bottom, bottom, chart.value_label);
    return out + "</svg>\n";
}

namespace {

// One entry of a line chart's legend and where it sits.
struct LegendEntry {
    std::string name, colour;
    bool dashed;
    double x = 0, y = 0;
};

// One entry per line (and the diagonal), wrapped into rows above the plot.
std::vector<LegendEntry> line_legend_entries(const LineChart& chart, double left, double right) {
    std::vector<LegendEntry> entries;
    for (std::size_t i = 0; i < chart.curves.size(); ++i)
        entries.push_back({shorten(chart.curves[i].name, 36), plan_colours()[i % plan_colours().size()], chart.curves[i].dashed});
    if (chart.diagonal) entries.push_back({"y = x", muted_ink, true});
    double legend_x = left, legend_y = 22;
    for (LegendEntry& e : entries) {
        const double entry_width = 48 + 7.4 * static_cast<double>(character_count(e.name));
        if (legend_x > left && legend_x + entry_width > right) {
            legend_x = left;
            legend_y += 22;
        }
        e.x = legend_x;
        e.y = legend_y;
        legend_x += entry_width;
    }
    return entries;
}

std::string line_legend(const LineChart& chart, const std::vector<LegendEntry>& entries) {
    std::string legend;
    for (const LegendEntry& e : entries) {
        const bool diagonal_entry = chart.diagonal && &e == &entries.back();
        legend += line(e.x, e.y, e.x + 26, e.y, e.colour, diagonal_entry ? 1.2 : 2.5,
                       e.dashed ? (diagonal_entry ? "stroke-dasharray=\"3 4\"" : "stroke-dasharray=\"7 5\"") : "");
        legend += text(e.x + 32, e.y + 4, e.name, "fill=\"" + std::string(ink) + "\"");
    }
    return legend;
}

std::string curve_svg(const Curve& c, const std::string& colour, const Scale& x, const Scale& y) {
    const std::string dash = c.dashed ? " stroke-dasharray=\"7 5\"" : "";
    // A missing value breaks the line rather than joining across it.
    std::vector<std::string> segments(1);
    for (const CurvePoint& p : c.points) {
        if (!finite(p.x) || !finite(p.y)) {
            if (!segments.back().empty()) segments.emplace_back();
            continue;
        }
        segments.back() += (segments.back().empty() ? "" : " ") + svg_number(x(p.x)) + "," + svg_number(y(p.y));
    }
    std::string out = "<g><title>" + html_escape(c.name) + "</title>";
    for (const std::string& s : segments)
        if (!s.empty())
            out += "<polyline points=\"" + s + "\" fill=\"none\" stroke=\"" + colour + "\" stroke-width=\"2.2\"" + dash +
                   " stroke-linejoin=\"round\"/>";
    if (c.points.size() <= 30 && !c.dashed)
        for (const CurvePoint& p : c.points)
            if (finite(p.x) && finite(p.y))
                out += "<circle cx=\"" + svg_number(x(p.x)) + "\" cy=\"" + svg_number(y(p.y)) + "\" r=\"3.2\" fill=\"" +
                       colour + "\"/>";
    return out + "</g>";
}

// The data's extent and how many points can be drawn.
struct CurveExtent {
    double x_lo = INFINITY, x_hi = -INFINITY, y_lo = INFINITY, y_hi = -INFINITY;
    std::size_t drawn = 0, left_out = 0;
};

CurveExtent curve_extent(const LineChart& chart) {
    CurveExtent e;
    for (const Curve& c : chart.curves)
        for (const CurvePoint& p : c.points) {
            if (!finite(p.x) || !finite(p.y)) {
                ++e.left_out;
                continue;
            }
            ++e.drawn;
            e.x_lo = std::min(e.x_lo, p.x);
            e.x_hi = std::max(e.x_hi, p.x);
            e.y_lo = std::min(e.y_lo, p.y);
            e.y_hi = std::max(e.y_hi, p.y);
        }
    return e;
}

}  // namespace

std::string line_svg(const LineChart& chart, const std::string& id) {
    const CurveExtent extent = curve_extent(chart);
    std::string description = chart.description + (chart.description.empty() ? "" : " ") +
                              plural(chart.curves.size(), "line", "lines") + ", " + plural(extent.drawn, "point", "points") + ".";
    if (extent.left_out) description += " " + plural(extent.left_out, "point", "points") + " left out for a missing value.";
    if (extent.drawn == 0) return nothing_to_draw(id, chart.title, "No points to draw. " + description);

    const double width = chart.square ? 620 : chart_width;
    const double left = 78, right = width - 28;
    const std::vector<LegendEntry> entries = line_legend_entries(chart, left, right);
    const double top = (entries.empty() ? 22 : entries.back().y) + 26;
    const double height = (chart.square ? 552 : 392) + top, bottom = height - 64;
    const Scale x{nice_axis(chart.x_min.value_or(extent.x_lo), chart.x_max.value_or(extent.x_hi)), left, right};
    const Scale y{nice_axis(chart.y_min.value_or(extent.y_lo), chart.y_max.value_or(extent.y_hi)), bottom, top};

    std::string out = svg_open(id, height, chart.title, description, width);
    out += "<defs><clipPath id=\"" + id + "-plot\"><rect x=\"" + svg_number(left) + "\" y=\"" + svg_number(top) +
           "\" width=\"" + svg_number(right - left) + "\" height=\"" + svg_number(bottom - top) + "\"/></clipPath></defs>";
    out += "<rect x=\"" + svg_number(left) + "\" y=\"" + svg_number(top) + "\" width=\"" + svg_number(right - left) +
           "\" height=\"" + svg_number(bottom - top) + "\" fill=\"#ffffff\"/>";
    out += y_axis(y, left, right, chart.y_label);
    out += x_axis(x, top, bottom, chart.x_label);
    out += "<g clip-path=\"url(#" + id + "-plot)\">";
    if (chart.diagonal) {
        const double a = std::max(x.axis.lo, y.axis.lo), b = std::min(x.axis.hi, y.axis.hi);
        if (a < b) out += line(x(a), y(a), x(b), y(b), muted_ink, 1.2, "stroke-dasharray=\"3 4\"");
    }
    for (std::size_t i = 0; i < chart.curves.size(); ++i)
        out += curve_svg(chart.curves[i], plan_colours()[i % plan_colours().size()], x, y);
    out += "</g>";
    return out + line_legend(chart, entries) + "</svg>\n";
}

}  // namespace tocsin
