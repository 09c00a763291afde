#pragma once
// A tidy table: named columns, one row per observation. Every result tocsin
// reports is a Table, so the terminal view, CSV and JSON always agree.
#include <cstdint>
#include <string>
#include <variant>
#include <vector>

namespace tocsin {

// A cell is empty (missing / not applicable), text, a whole number or a real.
using Cell = std::variant<std::monostate, std::string, std::int64_t, double>;

struct Table {
    std::string name;                  // file stem, e.g. "plan_summary"
    std::string title;                 // heading for people
    std::vector<std::string> columns;  // stable, documented column names
    std::vector<std::vector<Cell>> rows;

    void add_row(std::vector<Cell> row);  // asserts the width matches
};

// RFC 4180 CSV; reals with up to 6 significant decimals, empty cells empty.
std::string to_csv(const Table& table);
// A JSON array of objects keyed by column; empty cells are null; non-finite reals are null.
std::string to_json(const Table& table);
// Fixed-width text for a terminal, columns right-aligned except text.
std::string to_text(const Table& table, int real_digits = 2);

std::string json_escape(const std::string& text);  // quoted JSON string
std::string csv_field(const std::string& text);    // quoted only when needed
std::string format_real(double value, int max_decimals = 6);  // shortest, no exponent for ordinary values

}  // namespace tocsin
