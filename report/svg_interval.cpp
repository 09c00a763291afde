// The dot-and-interval chart: one group per row.
#include <algorithm>

#include "report/svg_drawing.hpp"

namespace tocsin {

using namespace drawing;

std::string interval_svg(const IntervalChart& chart) {
    std::size_t longest_label = 4, shown = 0;
    for (const IntervalRow& r : chart.rows) {
        longest_label = std::max(longest_label, std::min<std::size_t>(character_count(r.label), 34));
        shown += r.value.has_value();
    }
    const std::string description = chart.description + (chart.description.empty() ? "" : " ") +
                                    plural(chart.rows.size(), "group", "groups") + ", " +
                                    plural(shown, "with a value", "with a value") + ".";
    if (chart.rows.empty()) return nothing_to_draw(chart.id, chart.title, "Nothing to draw. " + description);
    const double row_height = 26, top = 16;
    const double left = std::clamp(7.4 * static_cast<double>(longest_label) + 20, 90.0, 270.0);
    const double right = chart_width - 40;
    const double bottom = top + row_height * static_cast<double>(chart.rows.size());
    const Scale x{nice_axis(chart.x_min, chart.x_max, true), left, right};
    const std::string& colour = plan_colours().front();

    std::string out = svg_open(chart.id, bottom + 52, chart.title, description);
    for (std::size_t i = 0; i < chart.rows.size(); i += 2)
        out += "<rect x=\"0\" y=\"" + svg_number(top + row_height * static_cast<double>(i)) + "\" width=\"" +
               svg_number(chart_width) + "\" height=\"" + svg_number(row_height) + "\" fill=\"#f1eee6\"/>";
    out += x_axis(x, top, bottom, chart.value_label);
    for (std::size_t i = 0; i < chart.rows.size(); ++i) {
        const IntervalRow& r = chart.rows[i];
        const double mid = top + row_height * (static_cast<double>(i) + 0.5);
        out += text(left - 10, mid + 4, r.label, "text-anchor=\"end\" fill=\"" + std::string(ink) + "\"");
        if (!r.value || !finite(*r.value)) {
            out += text(left + 8, mid + 4, r.no_value, "font-style=\"italic\" fill=\"" + std::string(muted_ink) + "\"");
            continue;
        }
        const double lo = x(std::clamp(r.lo, x.axis.lo, x.axis.hi)), hi = x(std::clamp(r.hi, x.axis.lo, x.axis.hi));
        out += line(lo, mid, hi, mid, ink, 2);
        out += line(lo, mid - 5, lo, mid + 5, ink, 1.5) + line(hi, mid - 5, hi, mid + 5, ink, 1.5);
        out += "<circle cx=\"" + svg_number(x(*r.value)) + "\" cy=\"" + svg_number(mid) + "\" r=\"5\" fill=\"" + colour +
               "\" stroke=\"" + ink + "\"/>";
    }
    return out + "</svg>\n";
}

}  // namespace tocsin
