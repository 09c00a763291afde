#pragma once
// A tidy table: named columns, one row per observation. Every result tocsin
// reports is a Table, so the terminal view, CSV and JSON always agree.
#include <cstdint>
#include <string>
#include <string_view>
#include <variant>
#include <vector>

#include "models/text.hpp"

namespace tocsin {

// A cell is empty (missing / not applicable), text, a whole number or a real.
using Cell = std::variant<std::monostate, std::string, std::int64_t, double>;

struct Table {
    std::string name;                  // file stem, e.g. "plan_summary"
    std::string title;                 // heading for people
    // What the figures rest on: which replication(s) and which period, e.g.
    // "the log as replayed; notices and catches over the whole log". Shown
    // under the title in the report and listed in tables.csv.
    std::string basis;
    std::vector<std::string> columns;  // stable, documented column names
    std::vector<std::vector<Cell>> rows;

    void add_row(std::vector<Cell> row);  // asserts the width matches
};

// A table with its name, title and columns, and no rows yet.
Table make_table(std::string name, std::string title, std::vector<std::string> columns);

// Files are for programs, so their numbers are exact and their text is valid
// UTF-8 whatever bytes a name carried (invalid sequences become U+FFFD); the
// terminal is for people, so its numbers are rounded.

// RFC 4180 CSV; reals as format_number (empty when not finite), empty cells empty.
std::string to_csv(const Table& table);
// A JSON array of objects keyed by column; reals as format_number; empty cells
// and non-finite reals are null.
std::string to_json(const Table& table);
// Fixed-width text for a terminal, columns right-aligned except text.
std::string to_text(const Table& table, int real_digits = 2);

// Quoted JSON string: control characters, U+2028 and U+2029 as \uXXXX.
std::string json_escape(std::string_view text);
std::string csv_field(std::string_view text);  // quoted only when needed
// The shortest text that reads back to the same double (std::to_chars), which
// may use an exponent (1.2e-05); zero is "0", a non-finite value "".
std::string format_number(double value);
// format_real (rounded for people) is in models/text.hpp.

// The text with every invalid UTF-8 sequence (utf8_sequence_length in
// models/text.hpp, the one decoder) replaced by U+FFFD, byte by byte.
std::string valid_utf8(std::string_view text);

}  // namespace tocsin
