#include "report/html.hpp"

#include <cmath>
#include <cstdio>
#include <optional>
#include <set>
#include <vector>

#include "models/text.hpp"

namespace tocsin {

std::string html_escape(std::string_view text) {
    std::string out;
    out.reserve(text.size() + 16);
    for (std::size_t i = 0; i < text.size();) {
        const char c = text[i];
        const auto u = static_cast<unsigned char>(c);
        if (u < 0x80) {
            switch (c) {
                case '&': out += "&amp;"; break;
                case '<': out += "&lt;"; break;
                case '>': out += "&gt;"; break;
                case '"': out += "&quot;"; break;
                case '\'': out += "&#39;"; break;
                default:
                    if ((u < 0x20 && c != '\n' && c != '\t') || u == 0x7F) out += replacement_character;
                    else out += c;
            }
            ++i;
            continue;
        }
        append_utf8_or_replacement(out, text, i);
    }
    return out;
}

std::string shorten(std::string_view text, std::size_t max_characters) {
    // Byte offset where each character starts, and the end.
    std::vector<std::size_t> starts;
    for (std::size_t i = 0; i < text.size(); i += std::max<std::size_t>(1, utf8_sequence_length(text, i)))
        starts.push_back(i);
    const std::size_t characters = starts.size();
    starts.push_back(text.size());
    if (characters <= max_characters || max_characters == 0) return std::string(text);
    // A plan's distinguishing part is at its end (a sweep's values), so the
    // cut falls in the middle: two fifths of what is kept before it.
    const std::size_t kept = max_characters - 1;
    const std::size_t head = kept * 2 / 5, tail = kept - head;
    return std::string(text.substr(0, starts[head])) + "\xE2\x80\xA6" +
           std::string(text.substr(starts[characters - tail]));
}

std::string format_for_people(double v) {
    if (!std::isfinite(v)) return "\xE2\x80\x93";
    if (v == std::round(v) && std::fabs(v) < 1e15) return format_real(v, 0);
    const double magnitude = std::fabs(v);
    if (magnitude >= 0.1) return format_real(v, 2);
    // Three significant figures, e.g. 0.0123, without exponent notation.
    int decimals = 3;  // one more decimal per leading zero: 0.0123 needs 4
    for (double m = magnitude; m < 0.1 && decimals < 12; m *= 10) ++decimals;
    return format_real(v, decimals);
}

namespace {

std::string column_header(const std::string& name, const HtmlTableOptions& options) {
    const auto found = options.column_labels.find(name);
    if (found != options.column_labels.end()) return found->second;
    std::string label = name;
    for (char& c : label)
        if (c == '_') c = ' ';
    return label;
}

bool is_number(const Cell& c) {
    return std::holds_alternative<std::int64_t>(c) || std::holds_alternative<double>(c);
}

std::string cell_for_people(const Cell& c) {
    if (std::holds_alternative<std::string>(c)) return html_escape(std::get<std::string>(c));
    if (std::holds_alternative<std::int64_t>(c)) return std::to_string(std::get<std::int64_t>(c));
    if (std::holds_alternative<double>(c)) return format_for_people(std::get<double>(c));
    return "\xE2\x80\x93";
}

struct ShownColumn {
    std::size_t value;
    std::optional<std::size_t> lo, hi;
};

}  // namespace

std::string html_table(const Table& table, const HtmlTableOptions& options) {
    std::map<std::string, std::size_t> index;
    for (std::size_t i = 0; i < table.columns.size(); ++i) index.emplace(table.columns[i], i);
    std::vector<ShownColumn> shown;
    // Interval ends of column i: `x_lo`/`x_hi` or `x_lower`/`x_upper`.
    auto interval_of = [&](std::size_t i) -> std::optional<std::pair<std::size_t, std::size_t>> {
        for (const auto& [lo_suffix, hi_suffix] : {std::pair{"_lo", "_hi"}, std::pair{"_lower", "_upper"}}) {
            const auto lo = index.find(table.columns[i] + lo_suffix);
            const auto hi = index.find(table.columns[i] + hi_suffix);
            if (lo != index.end() && hi != index.end()) return std::pair{lo->second, hi->second};
        }
        return std::nullopt;
    };
    std::set<std::size_t> folded;  // interval columns shown inside their value's cell
    if (options.combine_intervals)
        for (std::size_t i = 0; i < table.columns.size(); ++i)
            if (const auto ends = interval_of(i)) folded.insert({ends->first, ends->second});
    for (std::size_t i = 0; i < table.columns.size(); ++i) {
        if (folded.count(i)) continue;
        ShownColumn column{i, std::nullopt, std::nullopt};
        if (options.combine_intervals)
            if (const auto ends = interval_of(i)) {
                column.lo = ends->first;
                column.hi = ends->second;
            }
        shown.push_back(column);
    }
    // A column is numeric (right-aligned) when no row holds text in it.
    std::vector<bool> numeric(table.columns.size(), true);
    for (const auto& row : table.rows)
        for (std::size_t i = 0; i < row.size(); ++i)
            if (std::holds_alternative<std::string>(row[i])) numeric[i] = false;

    std::string out = "<div class=\"table-wrap\"><table>";
    if (!table.title.empty() || !table.basis.empty()) {
        out += "<caption>" + html_escape(table.title);
        if (!table.basis.empty()) out += "<span class=\"basis\">Basis: " + html_escape(table.basis) + "</span>";
        out += "</caption>";
    }
    out += "<thead><tr>";
    for (const ShownColumn& c : shown) {
        const std::string& name = table.columns[c.value];
        out += "<th scope=\"col\"" + std::string(numeric[c.value] ? " class=\"num\"" : "") + " title=\"" +
               html_escape(name) + "\">" + html_escape(column_header(name, options));
        out += "</th>";
    }
    out += "</tr></thead><tbody>";
    for (const auto& row : table.rows) {
        out += "<tr>";
        for (std::size_t k = 0; k < shown.size(); ++k) {
            const ShownColumn& c = shown[k];
            const Cell& value = row[c.value];
            const bool header_cell = k == 0 && !numeric[c.value];
            out += header_cell ? "<th scope=\"row\">" : (numeric[c.value] ? "<td class=\"num\">" : "<td>");
            out += cell_for_people(value);
            if (c.lo && is_number(value) && (is_number(row[*c.lo]) || is_number(row[*c.hi])))
                out += " <span class=\"interval\">(" + cell_for_people(row[*c.lo]) + " to " +
                       cell_for_people(row[*c.hi]) + ")</span>";
            out += header_cell ? "</th>" : "</td>";
        }
        out += "</tr>";
    }
    out += "</tbody></table></div>\n";
    return out;
}

}  // namespace tocsin
