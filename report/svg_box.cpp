#include <algorithm>
#include <cmath>
#include <map>
#include <set>

#include "analysis/quantiles.hpp"
#include "report/html.hpp"
#include "report/svg.hpp"
#include "report/svg_drawing.hpp"

namespace tocsin {

using namespace drawing;

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

}  // namespace tocsin
