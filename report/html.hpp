#pragma once
// Small pieces of HTML shared by the report and its charts. Every string that
// came from a user (scenario, plan, unit and role names, titles) passes
// through html_escape before it reaches a page, in text and in attributes.
#include <map>
#include <string>
#include <string_view>

#include "report/table.hpp"

namespace tocsin {

// Escapes & < > " ' so the text is inert in element content, in quoted
// attributes and inside inline SVG. Control characters other than tab and
// newline become U+FFFD, and so do bytes that are not valid UTF-8, so a hostile
// name can neither break the markup nor the page's encoding.
std::string html_escape(std::string_view text);

// Cuts text to at most `max_characters` characters (not bytes), with an
// ellipsis in the middle when something was cut, so that the end (what sets a
// swept plan apart) stays. Never splits a UTF-8 sequence.
std::string shorten(std::string_view text, std::size_t max_characters);

// A number for people: whole numbers without decimals, otherwise two decimals,
// three significant figures for small magnitudes. Non-finite values -> "–".
std::string format_for_people(double value);

struct HtmlTableOptions {
    // Header shown for a column; a column missing here shows its name with
    // underscores as spaces. The raw column name stays visible as a tooltip so
    // analysts can find it in the CSV.
    std::map<std::string, std::string> column_labels;
    // Show columns `x`, `x_lo`, `x_hi` (or `x_lower`, `x_upper`) as one cell "x (lo to hi)".
    bool combine_intervals = true;
};

// A <table> with the table's title as caption; numbers right-aligned; empty
// cells shown as an en dash.
std::string html_table(const Table& table, const HtmlTableOptions& options = {});

}  // namespace tocsin
