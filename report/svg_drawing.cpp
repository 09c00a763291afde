#include "report/svg_drawing.hpp"

#include <algorithm>
#include <cmath>

#include "analysis/table.hpp"
#include "models/text.hpp"
#include "report/html.hpp"

namespace tocsin::drawing {

bool finite(double v) { return std::isfinite(v); }

namespace {

std::string tick_label(double v, const ChartAxis& axis) {
    const double step = axis.ticks.size() > 1 ? axis.ticks[1] - axis.ticks[0] : std::fabs(axis.hi - axis.lo);
    int decimals = 0;
    if (step > 0 && finite(step)) decimals = std::clamp(static_cast<int>(-std::floor(std::log10(step) + 1e-9)), 0, 10);
    return format_real(v, decimals);
}

}  // namespace

std::string svg_open(const std::string& id, double height, const std::string& title, const std::string& description,
                     double width) {
    const std::string w = svg_number(width), h = svg_number(height);
    return std::string("<svg class=\"chart") + (width < chart_width ? " narrow" : "") + "\" id=\"" + id + "\" viewBox=\"0 0 " + w + " " + h + "\" width=\"" + w + "\" height=\"" + h +
           "\" role=\"img\" aria-labelledby=\"" + id + "-title " + id + "-desc\" " + chart_font + ">" +
           "<title id=\"" + id + "-title\">" + html_escape(title) + "</title><desc id=\"" + id + "-desc\">" +
           html_escape(description) + "</desc>";
}

std::string line(double x1, double y1, double x2, double y2, const std::string& stroke, double width,
                 const std::string& extra) {
    return "<line x1=\"" + svg_number(x1) + "\" y1=\"" + svg_number(y1) + "\" x2=\"" + svg_number(x2) + "\" y2=\"" +
           svg_number(y2) + "\" stroke=\"" + stroke + "\" stroke-width=\"" + svg_number(width) + "\"" +
           (extra.empty() ? "" : " " + extra) + "/>";
}

std::string text(double x, double y, const std::string& content, const std::string& attributes) {
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

}  // namespace tocsin::drawing
