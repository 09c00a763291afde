#include "analysis/table.hpp"

#include <algorithm>
#include <cassert>
#include <cmath>
#include <cstdio>

namespace tocsin {

void Table::add_row(std::vector<Cell> row) {
    assert(row.size() == columns.size());
    rows.push_back(std::move(row));
}

std::string format_real(double v, int max_decimals) {
    if (!std::isfinite(v)) return std::isnan(v) ? "NaN" : (v > 0 ? "Inf" : "-Inf");
    char buf[64];
    std::snprintf(buf, sizeof buf, "%.*f", max_decimals, v);
    std::string s = buf;
    if (s.find('.') != std::string::npos) {
        while (!s.empty() && s.back() == '0') s.pop_back();
        if (!s.empty() && s.back() == '.') s.pop_back();
    }
    if (s == "-0") s = "0";
    return s;
}

std::string csv_field(const std::string& t) {
    if (t.find_first_of(",\"\r\n") == std::string::npos) return t;
    std::string out = "\"";
    for (char c : t) {
        if (c == '"') out += '"';
        out += c;
    }
    return out + "\"";
}

std::string json_escape(const std::string& t) {
    std::string out = "\"";
    for (unsigned char c : t) {
        switch (c) {
            case '"': out += "\\\""; break;
            case '\\': out += "\\\\"; break;
            case '\n': out += "\\n"; break;
            case '\r': out += "\\r"; break;
            case '\t': out += "\\t"; break;
            default:
                if (c < 0x20) {
                    char buf[8];
                    std::snprintf(buf, sizeof buf, "\\u%04x", c);
                    out += buf;
                } else {
                    out += static_cast<char>(c);
                }
        }
    }
    return out + "\"";
}

namespace {

std::string cell_text(const Cell& c, int digits) {
    if (std::holds_alternative<std::string>(c)) return std::get<std::string>(c);
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
            if (std::holds_alternative<double>(c) && !std::isfinite(std::get<double>(c))) continue;
            out += csv_field(cell_text(c, 6));
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
                out += format_real(std::get<double>(c), 6);
            else out += "null";
        }
        out += "}";
    }
    return out + (t.rows.empty() ? "]\n" : "\n]\n");
}

std::string to_text(const Table& t, int digits) {
    std::vector<std::size_t> width(t.columns.size());
    std::vector<std::vector<std::string>> cells;
    for (std::size_t i = 0; i < t.columns.size(); ++i) width[i] = t.columns[i].size();
    for (const auto& row : t.rows) {
        std::vector<std::string> r;
        for (std::size_t i = 0; i < row.size(); ++i) {
            r.push_back(std::holds_alternative<std::monostate>(row[i]) ? "-" : cell_text(row[i], digits));
            width[i] = std::max(width[i], r.back().size());
        }
        cells.push_back(std::move(r));
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
    if (!t.title.empty()) out += t.title + "\n";
    for (std::size_t i = 0; i < t.columns.size(); ++i) out += (i ? "  " : "") + pad(t.columns[i], width[i], text_column[i]);
    out += "\n";
    for (std::size_t r = 0; r < cells.size(); ++r) {
        for (std::size_t i = 0; i < cells[r].size(); ++i) {
            out += (i ? "  " : "") + pad(cells[r][i], width[i], text_column[i]);
        }
        out += "\n";
    }
    return out;
}

}  // namespace tocsin
