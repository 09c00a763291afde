#pragma once
// Charts for the report, drawn as inline SVG by hand so the page needs no
// script, no font and no network. Each chart is a pure function of its input:
// the same input gives the same bytes. Non-finite values are left out and
// counted in the chart's description; a chart with nothing to draw says so.
#include <cstddef>
#include <optional>
#include <string>
#include <vector>

namespace tocsin {

// The categorical colours of plans, in order; chosen for contrast on the
// report's paper colour and to stay apart in greyscale print.
const std::vector<std::string>& plan_colours();

// An axis range with "nice" tick marks (steps of 1, 2 or 5 x 10^k). A range of
// identical values is widened around the value; no finite value -> [0, 1].
struct ChartAxis {
    double lo = 0, hi = 1;
    std::vector<double> ticks;
};
ChartAxis nice_axis(double lo, double hi, bool include_zero = false, int target_ticks = 5);

// A coordinate written into SVG: one decimal, never NaN or infinity (those
// become 0 so a bad value cannot break the picture; callers drop them first).
std::string svg_number(double value);

// Burden against benefit, one point per plan with interval bars in both
// directions; points marked `on_frontier` are joined by the frontier line.
struct ScatterPoint {
    std::string label;
    double x = 0, x_lo = 0, x_hi = 0;
    double y = 0, y_lo = 0, y_hi = 0;
    bool on_frontier = false;
    std::size_t series = 0;  // index into ScatterChart::series_names
};
struct ScatterChart {
    std::string id;  // unique in the page, plain [a-z0-9-]
    std::string title, description, x_label, y_label;
    std::vector<ScatterPoint> points;
    std::optional<double> x_limit;  // a budget drawn as a vertical line
    std::string x_limit_label;
    std::size_t max_labels = 12;    // more points than this: only frontier points are named
    // Plans of several kinds (e.g. the score each reads): series 0 keeps the
    // usual round mark; series 1 is a diamond in its own colour, named in a
    // legend row, so shape carries the meaning as well as colour. Empty: one kind.
    std::vector<std::string> series_names{};
};
std::string scatter_svg(const ScatterChart& chart);
// Indices of the drawn frontier points from lightest to heaviest (ties: less
// benefit first); a numbered frontier (see frontier_numbered) uses 1, 2, ... in this order.
std::vector<std::size_t> frontier_order(const std::vector<ScatterPoint>& points);
// With more than max_labels points, beaten plans lose their names and bars; when
// more than max_labels / 2 frontier points remain, they are numbered instead of named.
bool frontier_numbered(const ScatterChart& chart);

// One row per group: box from the 25th to the 75th percentile, median line,
// whiskers to the furthest values within 1.5 box lengths (Tukey), a diamond
// at the mean, a tick at the 90th percentile, and the values themselves as
// faint points (at most `max_points` per group, evenly spaced order statistics).
struct BoxGroup {
    std::string label;
    std::vector<double> values;
};
struct BoxChart {
    std::string id, title, description, value_label;
    std::vector<BoxGroup> groups;
    bool include_zero = true;
    std::optional<double> limit;
    std::string limit_label;
    std::size_t max_points = 400;
};
std::string box_svg(const BoxChart& chart);

// One row per group: a dot at the value and a line across its interval (the
// dot and the line carry the meaning, not colour). A row without a value says
// why in words (e.g. "suppressed: fewer than 11 encounters").
struct IntervalRow {
    std::string label;
    std::optional<double> value;
    double lo = 0, hi = 0;
    std::string no_value;  // shown instead of a dot when there is no value
};
struct IntervalChart {
    std::string id, title, description, value_label;
    std::vector<IntervalRow> rows;
    double x_min = 0, x_max = 1;
};
std::string interval_svg(const IntervalChart& chart);

// Lines through (x, y) points, e.g. ROC, calibration or decision curves.
struct CurvePoint {
    double x = 0, y = 0;
};
struct Curve {
    std::string name;
    std::vector<CurvePoint> points;
    bool dashed = false;
};
struct LineChart {
    std::string title, description, x_label, y_label;
    std::vector<Curve> curves;
    std::optional<double> x_min, x_max, y_min, y_max;  // fixed axis ends; otherwise from the data
    bool diagonal = false;                              // the line y = x, e.g. chance or perfect calibration
    bool square = false;                                // a narrower, square plot (ROC, calibration)
};
std::string line_svg(const LineChart& chart, const std::string& id);

}  // namespace tocsin
