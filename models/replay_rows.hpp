#pragma once
// Shared by the two readers of a replay (encounters, scores): the id index,
// a row being read and what a row that cannot be used becomes. Internal to
// models/replay*.cpp.
#include <cstdio>
#include <filesystem>
#include <functional>
#include <map>
#include <string>
#include <string_view>
#include <unordered_map>
#include <vector>

#include "models/csv.hpp"
#include "models/errors.hpp"
#include "models/population.hpp"
#include "models/text.hpp"
#include "models/time.hpp"

namespace tocsin::replay_rows {

struct StringHash {
    using is_transparent = void;
    std::size_t operator()(std::string_view s) const { return std::hash<std::string_view>{}(s); }
};
// Encounter id -> index; `skipped_encounter` marks an id whose row was skipped.
using IdIndex = std::unordered_map<std::string, std::uint32_t, StringHash, std::equal_to<>>;
constexpr std::uint32_t skipped_encounter = UINT32_MAX;

inline bool blank(const std::vector<std::string_view>& f) { return f.size() == 1 && f[0].empty(); }

// Short form for messages: 365, 0.5, 1e+308.
inline std::string format_number(double v) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.6g", v);
    return buf;
}

inline std::string file_name(const std::string& path) { return std::filesystem::path(path).filename().string(); }

// A row that cannot be used. `reason` is the short category it is counted
// under with bad_rows: skip; `error` is what stops the run otherwise.
struct RowProblem {
    std::string reason;
    InputError error;
};

struct RowContext {
    CsvReader& reader;
    const std::vector<std::string_view>& fields;
    const TimeZone& zone;
    Exclusions& excluded;
    TimestampCache* cache = nullptr;  // the reader's own, for rows that share a date

    [[noreturn]] void fail(std::size_t column, std::string_view name, std::string reason,
                           const std::string& message) const {
        throw RowProblem{std::move(reason), InputError(reader.path(), reader.line(), static_cast<long>(column + 1),
                                                       std::string(name), message)};
    }
    Instant timestamp(std::size_t column, std::string_view name) const {
        TimestampNote note;
        auto t = parse_timestamp(fields[column], zone, &note, cache);
        if (!t)
            fail(column, name, "bad timestamp in " + std::string(name),
                 "expected a timestamp such as 2026-03-03T19:05:00Z, 2026-03-03T20:05:00+01:00 or "
                 "2026-03-03 20:05:00 (local time), found '" + std::string(fields[column]) + "'");
        if (note.mapping == LocalMapping::ambiguous_took_earlier)
            ++excluded.notes["local time in a repeated hour (daylight saving ended): earlier instant taken"];
        else if (note.mapping == LocalMapping::nonexistent_moved_forward)
            ++excluded.notes["local time in a skipped hour (daylight saving began): moved forward"];
        return *t;
    }
    // Names and ids must be printable text: a stray byte or control character
    // would otherwise reach every table and report.
    void text(std::size_t column, std::string_view name) const {
        if (std::string problem = text_problem(fields[column]); !problem.empty())
            fail(column, name, "text that is not UTF-8 or holds a control character",
                 "expected UTF-8 text without control characters: " + problem);
    }
    void width(std::size_t expected) const {
        if (fields.size() != expected)
            throw RowProblem{"wrong number of fields",
                             InputError(reader.path(), reader.line(), 0, "",
                                        "expected " + std::to_string(expected) + " fields as in the header, found " +
                                            std::to_string(fields.size()))};
    }
};

// Counts a skipped row, or stops when the mode says so.
inline void handle(const RowProblem& p, BadRows mode, std::map<std::string, SkippedRows>& skipped) {
    if (mode == BadRows::stop) throw p.error;
    skipped[file_name(p.error.file) + ": " + p.reason].add(p.error.line);
}

}  // namespace tocsin::replay_rows
