#include "report/svg.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <map>

#include "report/html.hpp"
#include "report/svg_drawing.hpp"
#include "report/table.hpp"

namespace tocsin {

using namespace drawing;

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

// A plan of series k > 0: a diamond in the series' colour, filled when on the frontier.
std::string series_mark(double px, double py, std::size_t series, bool on_frontier, bool crowded) {
    const std::string& colour = plan_colours()[(4 + series) % plan_colours().size()];
    const double r = on_frontier ? 7.5 : (crowded ? 4.5 : 6.5);
    return "<polygon points=\"" + svg_number(px) + "," + svg_number(py - r) + " " + svg_number(px + r) + "," +
           svg_number(py) + " " + svg_number(px) + "," + svg_number(py + r) + " " + svg_number(px - r) + "," +
           svg_number(py) + "\" fill=\"" + (on_frontier ? colour : std::string("#ffffff")) + "\" stroke=\"" + colour +
           "\" stroke-width=\"1.5\"/>";
}

// A legend row naming each series by its mark.
std::string series_legend(const ScatterChart& chart, double left, double y) {
    std::string out;
    double at = left;
    for (std::size_t k = 0; k < chart.series_names.size(); ++k) {
        out += k == 0 ? "<circle cx=\"" + svg_number(at + 8) + "\" cy=\"" + svg_number(y - 4) + "\" r=\"5.5\" fill=\"" +
                            frontier_colour + "\"/>"
                      : series_mark(at + 8, y - 4, k, true, false);
        const std::string name = shorten(chart.series_names[k], 48);
        out += text(at + 20, y, name, "fill=\"" + std::string(ink) + "\"");
        at += 40 + 7.0 * static_cast<double>(name.size());
    }
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
    if (p.series > 0)
        out += series_mark(px, py, p.series, p.on_frontier, style.crowded);
    else if (p.on_frontier)
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

    const bool series = chart.series_names.size() > 1;
    const double height = 520, left = 78, right = chart_width - 28, top = series ? 64 : 48, bottom = height - 64;
    const auto [x_axis_ends, y_axis_ends] = scatter_axes(chart, drawn);
    const Scale x{x_axis_ends, left, right};
    const Scale y{y_axis_ends, bottom, top};

    std::string out = svg_open(chart.id, height, chart.title, description);
    out += "<rect x=\"" + svg_number(left) + "\" y=\"" + svg_number(top) + "\" width=\"" + svg_number(right - left) +
           "\" height=\"" + svg_number(bottom - top) + "\" fill=\"#ffffff\"/>";
    out += y_axis(y, left, right, chart.y_label);
    out += x_axis(x, top, bottom, chart.x_label);
    out += scatter_legend(left);
    if (series) out += series_legend(chart, left, 46);
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
