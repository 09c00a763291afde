#pragma once
// The drawing primitives every chart of the report shares: its colours, the
// scale from values to pixels, lines, text, axes and the <svg> opening. Used
// by report/svg.cpp and report/svg_box.cpp only.
#include <cstddef>
#include <string>

#include "report/svg.hpp"

namespace tocsin::drawing {

// Colours of the page (kept in step with the report's style sheet).
inline const char* const ink = "#1f2a33";
inline const char* const muted_ink = "#4a5560";
inline const char* const grid = "#dcd8ce";
inline const char* const frontier_colour = "#a23b2a";
inline const char* const limit_colour = "#8a5a00";
inline const char* const chart_font = "font-family=\"inherit\" font-size=\"13\"";

inline constexpr double chart_width = 960;

bool finite(double v);

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

std::string svg_open(const std::string& id, double height, const std::string& title, const std::string& description,
                     double width = chart_width);
std::string line(double x1, double y1, double x2, double y2, const std::string& stroke, double width = 1,
                 const std::string& extra = "");
std::string text(double x, double y, const std::string& content, const std::string& attributes = "");
// Grid lines, tick labels and axis titles of a plot area.
std::string x_axis(const Scale& x, double top, double bottom, const std::string& label);
std::string y_axis(const Scale& y, double left, double right, const std::string& label);
std::string nothing_to_draw(const std::string& id, const std::string& title, const std::string& message);
std::size_t character_count(const std::string& utf8);
std::string plural(std::size_t n, const std::string& one, const std::string& many);

}  // namespace tocsin::drawing
