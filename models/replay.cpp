#include "models/replay.hpp"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <string_view>
#include <unordered_map>

#include "models/csv.hpp"
#include "models/errors.hpp"

namespace tocsin {

namespace {

struct StringHash {
    using is_transparent = void;
    std::size_t operator()(std::string_view s) const { return std::hash<std::string_view>{}(s); }
};
using IdIndex = std::unordered_map<std::string, std::uint32_t, StringHash, std::equal_to<>>;

// Maps required column names to their positions in the header.
std::vector<std::size_t> locate_columns(CsvReader& reader, const std::vector<std::string_view>& header,
                                        const std::vector<std::string_view>& required) {
    std::vector<std::size_t> at(required.size(), SIZE_MAX);
    for (std::size_t i = 0; i < header.size(); ++i) {
        std::string_view name = header[i];
        if (i == 0 && name.substr(0, 3) == "\xEF\xBB\xBF") name.remove_prefix(3);  // UTF-8 byte order mark
        for (std::size_t r = 0; r < required.size(); ++r) {
            if (name != required[r]) continue;
            if (at[r] != SIZE_MAX)
                throw InputError(reader.path(), reader.line(), static_cast<long>(i + 1), std::string(name),
                                 "column appears twice in the header");
            at[r] = i;
        }
    }
    for (std::size_t r = 0; r < required.size(); ++r) {
        if (at[r] != SIZE_MAX) continue;
        std::string expected;
        for (auto n : required) expected += (expected.empty() ? "" : ",") + std::string(n);
        throw InputError(reader.path(), reader.line(), 0, std::string(required[r]),
                         "required column is missing from the header (expected columns " + expected +
                             " in any order; extra columns are ignored)");
    }
    return at;
}

bool blank(const std::vector<std::string_view>& f) { return f.size() == 1 && f[0].empty(); }

struct RowContext {
    CsvReader& reader;
    const std::vector<std::string_view>& fields;
    const TimeZone& zone;
    Exclusions& excluded;

    [[noreturn]] void fail(std::size_t column, std::string_view name, const std::string& message) const {
        throw InputError(reader.path(), reader.line(), static_cast<long>(column + 1), std::string(name), message);
    }
    Instant timestamp(std::size_t column, std::string_view name) const {
        TimestampNote note;
        auto t = parse_timestamp(fields[column], zone, &note);
        if (!t)
            fail(column, name,
                 "expected a timestamp such as 2026-03-03T19:05:00Z, 2026-03-03T20:05:00+01:00 or "
                 "2026-03-03 20:05:00 (local time), found '" + std::string(fields[column]) + "'");
        if (note.mapping == LocalMapping::ambiguous_took_earlier)
            ++excluded.notes["local time in a repeated hour (daylight saving ended): earlier instant taken"];
        else if (note.mapping == LocalMapping::nonexistent_moved_forward)
            ++excluded.notes["local time in a skipped hour (daylight saving began): moved forward"];
        return *t;
    }
};

void check_width(CsvReader& reader, const std::vector<std::string_view>& fields, std::size_t width) {
    if (fields.size() != width)
        throw InputError(reader.path(), reader.line(), 0, "",
                         "expected " + std::to_string(width) + " fields as in the header, found " +
                             std::to_string(fields.size()));
}

}  // namespace

Population load_replay(const ReplaySource& source, const TimeZone& zone) {
    Population pop;
    IdIndex index;
    std::vector<std::string> unit_names;
    std::unordered_map<std::string, std::uint32_t> unit_index;
    std::vector<std::string_view> fields;

    {
        CsvReader reader(source.encounters_path);
        if (!reader.next(fields)) throw InputError(source.encounters_path, 1, 0, "", "file is empty (expected a header)");
        const std::vector<std::string_view> required = {"encounter", "unit", "admitted", "discharged", "outcome_at"};
        auto col = locate_columns(reader, fields, required);
        const std::size_t width = fields.size();
        while (reader.next(fields)) {
            if (blank(fields)) continue;
            check_width(reader, fields, width);
            RowContext row{reader, fields, zone, pop.excluded};
            Encounter e;
            if (fields[col[0]].empty()) row.fail(col[0], "encounter", "encounter id is empty");
            if (fields[col[1]].empty()) row.fail(col[1], "unit", "unit is empty");
            e.id = std::string(fields[col[0]]);
            e.admitted = row.timestamp(col[2], "admitted");
            e.discharged = row.timestamp(col[3], "discharged");
            if (e.discharged <= e.admitted)
                row.fail(col[3], "discharged", "discharged must be after admitted (" +
                                                   std::string(fields[col[2]]) + ")");
            if (!fields[col[4]].empty()) {
                Instant t0 = row.timestamp(col[4], "outcome_at");
                if (t0 < e.admitted || t0 > e.discharged)
                    row.fail(col[4], "outcome_at", "outcome must lie within the stay (admitted to discharged)");
                e.outcome_at = t0;
            }
            std::string unit(fields[col[1]]);
            auto [it, added] = unit_index.emplace(unit, static_cast<std::uint32_t>(unit_names.size()));
            if (added) unit_names.push_back(unit);
            e.unit = it->second;
            auto [eit, fresh] = index.emplace(e.id, static_cast<std::uint32_t>(pop.encounters.size()));
            if (!fresh)
                row.fail(col[0], "encounter", "duplicate encounter id '" + e.id + "' (first seen earlier in the file)");
            pop.encounters.push_back(std::move(e));
        }
    }
    // Units are numbered in name order so that outputs do not depend on row order.
    {
        std::vector<std::uint32_t> order(unit_names.size());
        for (std::uint32_t i = 0; i < order.size(); ++i) order[i] = i;
        std::sort(order.begin(), order.end(), [&](auto a, auto b) { return unit_names[a] < unit_names[b]; });
        std::vector<std::uint32_t> renumber(order.size());
        for (std::uint32_t k = 0; k < order.size(); ++k) {
            renumber[order[k]] = k;
            pop.units.push_back(unit_names[order[k]]);
        }
        for (Encounter& e : pop.encounters) e.unit = renumber[e.unit];
    }

    std::vector<Score> scores;
    std::vector<std::uint32_t> owner;
    {
        CsvReader reader(source.scores_path);
        if (!reader.next(fields)) throw InputError(source.scores_path, 1, 0, "", "file is empty (expected a header)");
        const std::vector<std::string_view> required = {"encounter", "scored_at", "available_at", "score"};
        auto col = locate_columns(reader, fields, required);
        const std::size_t width = fields.size();
        std::string last_id;
        std::uint32_t last_index = 0;
        bool have_last = false;
        while (reader.next(fields)) {
            if (blank(fields)) continue;
            check_width(reader, fields, width);
            RowContext row{reader, fields, zone, pop.excluded};
            std::string_view id = fields[col[0]];
            // Logs are usually grouped by encounter: reuse the last lookup.
            if (!have_last || id != last_id) {
                auto it = index.find(id);
                if (it == index.end())
                    row.fail(col[0], "encounter", "score for an unknown encounter '" + std::string(id) +
                                                      "' (not in " + source.encounters_path + ")");
                last_id.assign(id);
                last_index = it->second;
                have_last = true;
            }
            Score s;
            s.scored_at = row.timestamp(col[1], "scored_at");
            if (fields[col[2]].empty()) {
                s.available_at = s.scored_at + source.latency_when_missing;
            } else {
                s.available_at = row.timestamp(col[2], "available_at");
                if (s.available_at < s.scored_at)
                    row.fail(col[2], "available_at", "available_at is before scored_at");
            }
            std::string_view text = fields[col[3]];
            const char* first = text.data();
            const char* last = text.data() + text.size();
            if (first != last && *first == '+') ++first;
            auto [ptr, ec] = std::from_chars(first, last, s.value);
            if (text.empty() || ec != std::errc() || ptr != last || !std::isfinite(s.value))
                row.fail(col[3], "score", "expected a finite number, found '" + std::string(text) + "'");
            scores.push_back(s);
            owner.push_back(last_index);
        }
    }
    group_scores_by_encounter(pop, scores, owner);
    apply_score_exclusions(pop);
    default_period(pop);
    return pop;
}

}  // namespace tocsin
