#include "report/table.hpp"

#include <algorithm>
#include <cassert>
#include <charconv>
#include <cmath>
#include <cstdio>

#include "models/text.hpp"

namespace tocsin {

void Table::add_row(std::vector<Cell> row) {
    assert(row.size() == columns.size());
    rows.push_back(std::move(row));
}

std::string valid_utf8(std::string_view text) {
    std::string out;
    out.reserve(text.size());
    for (std::size_t i = 0; i < text.size();) {
        append_utf8_or_replacement(out, text, i);
    }
    return out;
}

Table make_table(std::string name, std::string title, std::vector<std::string> columns) {
    Table t;
    t.name = std::move(name);
    t.title = std::move(title);
    t.columns = std::move(columns);
    return t;
}

std::string format_number(double v) {
    if (!std::isfinite(v)) return "";
    if (v == 0) return "0";  // -0 too: a zero difference is not negative
    return round_trip_text(v);
}

std::string csv_field(std::string_view raw) {
    std::string t = valid_utf8(raw);
    if (t.find_first_of(",\"\r\n") == std::string::npos) return t;
    std::string out = "\"";
    for (char c : t) {
        if (c == '"') out += '"';
        out += c;
    }
    return out + "\"";
}

std::string json_escape(std::string_view text) {
    std::string out = "\"";
    out.reserve(text.size() + 2);
    for (std::size_t i = 0; i < text.size();) {
        const auto c = static_cast<unsigned char>(text[i]);
        const std::size_t length = utf8_sequence_length(text, i);
        if (length == 0) {
            out += replacement_character;
            ++i;
            continue;
        }
        if (length > 1) {
            const std::string_view sequence = text.substr(i, length);
            // U+2028 and U+2029 are valid JSON but end a line in JavaScript
            // before ES2019, so a table pasted into a script stays one string.
            if (sequence == "\xE2\x80\xA8") out += "\\u2028";
            else if (sequence == "\xE2\x80\xA9") out += "\\u2029";
            else out.append(sequence);
            i += length;
            continue;
        }
        switch (c) {
            case '"': out += "\\\""; break;
            case '\\': out += "\\\\"; break;
            case '\n': out += "\\n"; break;
            case '\r': out += "\\r"; break;
            case '\t': out += "\\t"; break;
            default:
                if (c < 0x20 || c == 0x7F) {
                    char buf[8];
                    std::snprintf(buf, sizeof buf, "\\u%04x", c);
                    out += buf;
                } else {
                    out += static_cast<char>(c);
                }
        }
        ++i;
    }
    return out + "\"";
}

namespace {

std::string cell_text(const Cell& c, int digits) {
    if (std::holds_alternative<std::string>(c)) return valid_utf8(std::get<std::string>(c));
    if (std::holds_alternative<std::int64_t>(c)) return std::to_string(std::get<std::int64_t>(c));
    if (std::holds_alternative<double>(c)) return format_real(std::get<double>(c), digits);
    return "";
}

}  // namespace

std::string to_csv(const Table& t) {
    std::string out;
    for (std::size_t i = 0; i < t.columns.size(); ++i) out += (i ? "," : "") + csv_field(t.columns[i]);
    out += "\n";
    for (const auto& row : t.rows) {
        for (std::size_t i = 0; i < row.size(); ++i) {
            if (i) out += ",";
            const Cell& c = row[i];
            if (std::holds_alternative<double>(c)) out += format_number(std::get<double>(c));
            else out += csv_field(cell_text(c, 0));
        }
        out += "\n";
    }
    return out;
}

std::string to_json(const Table& t) {
    std::string out = "[";
    for (std::size_t r = 0; r < t.rows.size(); ++r) {
        out += r ? ",\n {" : "\n {";
        for (std::size_t i = 0; i < t.columns.size(); ++i) {
            if (i) out += ", ";
            out += json_escape(t.columns[i]) + ": ";
            const Cell& c = t.rows[r][i];
            if (std::holds_alternative<std::string>(c)) out += json_escape(std::get<std::string>(c));
            else if (std::holds_alternative<std::int64_t>(c)) out += std::to_string(std::get<std::int64_t>(c));
            else if (std::holds_alternative<double>(c) && std::isfinite(std::get<double>(c)))
                out += format_number(std::get<double>(c));
            else out += "null";
        }
        out += "}";
    }
    return out + (t.rows.empty() ? "]\n" : "\n]\n");
}

namespace {

// A column name over as many lines as it takes to be no wider than `width`,
// broken after an underscore ("per_unit_" over "night_mean"); a part longer
// than `width` widens the column instead.
std::vector<std::string> header_lines(const std::string& name, std::size_t width) {
    std::vector<std::string> parts;
    for (std::size_t from = 0; from < name.size();) {
        const std::size_t cut = name.find('_', from);
        const std::size_t to = cut == std::string::npos ? name.size() : cut + 1;
        parts.push_back(name.substr(from, to - from));
        from = to;
    }
    std::vector<std::string> lines;
    for (const std::string& part : parts) {
        if (!lines.empty() && lines.back().size() + part.size() <= width) lines.back() += part;
        else lines.push_back(part);
    }
    if (lines.empty()) lines.emplace_back();
    return lines;
}

}  // namespace

std::string to_text(const Table& t, int digits) {
    // Columns are as wide as their widest cell; a longer name wraps over
    // several header lines, so that a wide name does not make a wide table.
    std::vector<std::size_t> width(t.columns.size(), 1);
    std::vector<std::vector<std::string>> cells;
    for (const auto& row : t.rows) {
        std::vector<std::string> r;
        for (std::size_t i = 0; i < row.size(); ++i) {
            r.push_back(std::holds_alternative<std::monostate>(row[i]) ? "-" : cell_text(row[i], digits));
            width[i] = std::max(width[i], r.back().size());
        }
        cells.push_back(std::move(r));
    }
    std::vector<std::vector<std::string>> headers;
    std::size_t header_height = 1;
    for (std::size_t i = 0; i < t.columns.size(); ++i) {
        // Ten characters keep most parts of a name together ("shift_mean").
        headers.push_back(header_lines(t.columns[i], std::max<std::size_t>(width[i], 10)));
        for (const std::string& line : headers.back()) width[i] = std::max(width[i], line.size());
        header_height = std::max(header_height, headers.back().size());
    }
    auto pad = [](const std::string& s, std::size_t w, bool left) {
        std::string fill(w > s.size() ? w - s.size() : 0, ' ');
        return left ? s + fill : fill + s;
    };
    // A column is left-aligned when it holds text.
    std::vector<bool> text_column(t.columns.size(), false);
    for (const auto& row : t.rows)
        for (std::size_t i = 0; i < row.size(); ++i)
            if (std::holds_alternative<std::string>(row[i])) text_column[i] = true;
    std::string out;
    if (!t.title.empty()) out += valid_utf8(t.title) + "\n";
    // Header lines sit at the bottom of the header, next to the rows.
    for (std::size_t line = 0; line < header_height; ++line) {
        std::string text;
        for (std::size_t i = 0; i < t.columns.size(); ++i) {
            const std::size_t blank = header_height - headers[i].size();
            text += (i ? "  " : "") + pad(line < blank ? "" : headers[i][line - blank], width[i], text_column[i]);
        }
        while (!text.empty() && text.back() == ' ') text.pop_back();
        out += text + "\n";
    }
    for (std::size_t r = 0; r < cells.size(); ++r) {
        for (std::size_t i = 0; i < cells[r].size(); ++i) {
            out += (i ? "  " : "") + pad(cells[r][i], width[i], text_column[i]);
        }
        out += "\n";
    }
    return out;
}

}  // namespace tocsin
