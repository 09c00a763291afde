#include "models/replay.hpp"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <string_view>
#include <filesystem>
#include <fstream>
#include <optional>
#include <thread>
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


struct ScoreChunk {
    std::vector<Score> scores;
    std::vector<std::uint32_t> owner;
    Exclusions notes;
    std::optional<InputError> error;
    bool saw_quote = false;
    long lines = 0;
};

// Parses score rows from `reader` (positioned after the header) into `out`.
void parse_score_rows(CsvReader& reader, const std::vector<std::size_t>& col, std::size_t width, const IdIndex& index,
                      const ReplaySource& source, const TimeZone& zone, ScoreChunk& out) {
    std::vector<std::string_view> fields;
    std::string last_id;
    std::uint32_t last_index = 0;
    bool have_last = false;
    try {
        while (reader.next(fields)) {
            if (blank(fields)) continue;
            check_width(reader, fields, width);
            RowContext row{reader, fields, zone, out.notes};
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
            out.scores.push_back(s);
            out.owner.push_back(last_index);
        }
    } catch (const InputError& e) {
        out.error = e;
    }
    out.saw_quote = reader.saw_quote();
    out.lines = reader.lines_read();
}

// Reads the scores file. Large files are cut at line breaks into one chunk
// per core and parsed in parallel; chunks are joined in file order, so the
// result (and the first error reported) does not depend on the core count.
void read_scores(const ReplaySource& source, const TimeZone& zone, const IdIndex& index, Exclusions& excluded,
                 std::vector<Score>& scores, std::vector<std::uint32_t>& owner) {
    const std::string& path = source.scores_path;
    std::vector<std::string_view> fields;
    std::vector<std::size_t> col;
    std::size_t width = 0;
    {
        CsvReader reader(path);
        if (!reader.next(fields)) throw InputError(path, 1, 0, "", "file is empty (expected a header)");
        col = locate_columns(reader, fields, {"encounter", "scored_at", "available_at", "score"});
        width = fields.size();
    }
    // Byte offset just after the header line, and chunk boundaries just after
    // a line break. A header with quotes is read by the plain path.
    const long long size = static_cast<long long>(std::filesystem::file_size(path));
    std::vector<long long> cuts;
    {
        std::ifstream in(path, std::ios::binary);
        std::string header;
        std::getline(in, header);
        const long long body = in ? static_cast<long long>(header.size()) + 1 : size;
        cuts.push_back(body);
        const unsigned cores = std::max(1u, std::min(8u, std::thread::hardware_concurrency()));
        const long long chunk_min = std::max(1LL, source.parallel_chunk_bytes);
        const long long chunks = header.find('"') != std::string::npos ? 1 : std::min<long long>(cores, std::max(1LL, (size - body) / chunk_min));
        for (long long k = 1; k < chunks; ++k) {
            in.clear();
            in.seekg(body + (size - body) * k / chunks);
            std::string rest;
            std::getline(in, rest);
            if (!in) break;
            const long long cut = static_cast<long long>(in.tellg());
            if (cut > cuts.back() && cut < size) cuts.push_back(cut);
        }
        cuts.push_back(size);
    }
    auto parse = [&](const std::vector<long long>& bounds) {
        std::vector<ScoreChunk> chunks(bounds.size() - 1);
        auto work = [&](std::size_t k) {
            CsvReader reader(path, bounds[k], bounds[k + 1]);
            // Reserve from the average row length so the arrays never regrow.
            const auto expected = static_cast<std::size_t>((bounds[k + 1] - bounds[k]) / 40 + 16);
            chunks[k].scores.reserve(expected);
            chunks[k].owner.reserve(expected);
            parse_score_rows(reader, col, width, index, source, zone, chunks[k]);
        };
        if (chunks.size() == 1) {
            work(0);
        } else {
            std::vector<std::thread> pool;
            for (std::size_t k = 0; k < chunks.size(); ++k) pool.emplace_back(work, k);
            for (auto& t : pool) t.join();
        }
        return chunks;
    };
    std::vector<ScoreChunk> chunks = parse(cuts);
    // A cut inside a quoted field (a line break within quotes) would split a
    // record: any quote before the last chunk sends the file down the plain path.
    bool quoted = false;
    for (std::size_t k = 0; k + 1 < chunks.size(); ++k) quoted = quoted || chunks[k].saw_quote;
    if (quoted) chunks = parse({cuts.front(), cuts.back()});

    long line_offset = 1;  // the header
    std::size_t total = 0;
    for (ScoreChunk& c : chunks) {
        if (c.error) {
            const InputError& e = *c.error;
            throw InputError(e.file, e.line + line_offset, e.column, e.field, e.detail);
        }
        line_offset += c.lines;
        total += c.scores.size();
        for (const auto& [what, n] : c.notes.notes) excluded.notes[what] += n;
    }
    if (chunks.size() == 1) {
        scores = std::move(chunks[0].scores);
        owner = std::move(chunks[0].owner);
        return;
    }
    scores.reserve(total);
    owner.reserve(total);
    for (ScoreChunk& c : chunks) {
        scores.insert(scores.end(), c.scores.begin(), c.scores.end());
        owner.insert(owner.end(), c.owner.begin(), c.owner.end());
        std::vector<Score>().swap(c.scores);
        std::vector<std::uint32_t>().swap(c.owner);
    }
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
    read_scores(source, zone, index, pop.excluded, scores, owner);
    group_scores_by_encounter(pop, scores, owner);
    apply_score_exclusions(pop);
    default_period(pop);
    return pop;
}

}  // namespace tocsin
