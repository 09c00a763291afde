#include "models/replay.hpp"

#include <algorithm>
#include <charconv>
#include <cstdio>
#include <cmath>
#include <filesystem>
#include <map>
#include <optional>
#include <set>
#include <string_view>
#include <thread>
#include <unordered_map>

#include "models/csv.hpp"
#include "models/errors.hpp"
#include "models/parallel.hpp"
#include "models/text.hpp"

namespace tocsin {

namespace {

struct StringHash {
    using is_transparent = void;
    std::size_t operator()(std::string_view s) const { return std::hash<std::string_view>{}(s); }
};
// Encounter id -> index; `skipped_encounter` marks an id whose row was skipped.
using IdIndex = std::unordered_map<std::string, std::uint32_t, StringHash, std::equal_to<>>;
constexpr std::uint32_t skipped_encounter = UINT32_MAX;

bool blank(const std::vector<std::string_view>& f) { return f.size() == 1 && f[0].empty(); }

// Short form for messages: 365, 0.5, 1e+308.
std::string format_number(double v) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.6g", v);
    return buf;
}

std::string file_name(const std::string& path) { return std::filesystem::path(path).filename().string(); }

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
void handle(const RowProblem& p, BadRows mode, std::map<std::string, SkippedRows>& skipped) {
    if (mode == BadRows::stop) throw p.error;
    skipped[file_name(p.error.file) + ": " + p.reason].add(p.error.line);
}

struct ScoreChunk {
    std::vector<Score> scores;
    std::vector<std::uint32_t> owner;
    Exclusions notes;  // notes and rows_skipped, with lines relative to the chunk
    std::optional<InputError> error;
    bool saw_quote = false;
    long lines = 0;
};

struct ScoreColumns {
    std::vector<std::size_t> col;
    std::size_t width = 0;
};

// The last id looked up: logs are usually grouped by encounter.
struct LastLookup {
    std::string id;
    std::uint32_t index = 0;
    bool valid = false;
};

// Parses one score row into `s` and returns its encounter, or throws RowProblem.
std::uint32_t parse_score_row(const RowContext& row, const ScoreColumns& c, const IdIndex& index,
                              const ReplaySource& source, LastLookup& lookup, Score& s) {
    const auto& col = c.col;
    row.width(c.width);
    std::string_view id = row.fields[col[0]];
    if (!lookup.valid || id != lookup.id) {
        lookup.valid = false;
        auto it = index.find(id);
        if (it == index.end()) {
            row.text(col[0], "encounter");
            row.fail(col[0], "encounter", "score for an unknown encounter",
                     "score for an unknown encounter '" + std::string(id) + "' (not in " + source.encounters_path + ")");
        }
        if (it->second == skipped_encounter)
            row.fail(col[0], "encounter", "score for an encounter whose row was skipped",
                     "score for encounter '" + std::string(id) + "', whose row was skipped");
        lookup.id.assign(id);
        lookup.index = it->second;
        lookup.valid = true;
    }
    s.scored_at = row.timestamp(col[1], "scored_at");
    if (row.fields[col[2]].empty()) {
        s.available_at = s.scored_at + source.latency_when_missing;
    } else {
        s.available_at = row.timestamp(col[2], "available_at");
        if (s.available_at < s.scored_at)
            row.fail(col[2], "available_at", "available_at before scored_at", "available_at is before scored_at");
    }
    std::string_view text = row.fields[col[3]];
    const char* first = text.data();
    const char* last = text.data() + text.size();
    if (first != last && *first == '+') ++first;
    auto [ptr, ec] = std::from_chars(first, last, s.value);
    if (text.empty() || ec != std::errc() || ptr != last || !std::isfinite(s.value))
        row.fail(col[3], "score", "score that is not a finite number",
                 "expected a finite number, found '" + std::string(text) + "'");
    if (s.value < source.score_low || s.value > source.score_high)
        row.fail(col[3], "score", "score outside score_range",
                 "score " + std::string(text) + " is outside score_range [" + format_number(source.score_low) + ", " +
                     format_number(source.score_high) + "]");
    return lookup.index;
}

// Parses score rows from `reader` (positioned after the header) into `out`.
void parse_score_rows(CsvReader& reader, const ScoreColumns& c, const IdIndex& index, const ReplaySource& source,
                      const TimeZone& zone, ScoreChunk& out) {
    std::vector<std::string_view> fields;
    LastLookup last;
    TimestampCache dates;
    try {
        while (reader.next(fields)) {
            if (blank(fields)) continue;
            RowContext row{reader, fields, zone, out.notes, &dates};
            Score s;
            try {
                const std::uint32_t e = parse_score_row(row, c, index, source, last, s);
                out.scores.push_back(s);
                out.owner.push_back(e);
            } catch (const RowProblem& p) {
                handle(p, source.bad_rows, out.notes.rows_skipped);
            }
        }
    } catch (const InputError& e) {
        out.error = e;
    }
    out.saw_quote = reader.saw_quote();
    out.lines = reader.lines_read();
}

// Chunk boundaries for the scores file's body [body, size): just after a line
// break, found by the same rule the reader uses (LF, CRLF or a lone CR), one
// chunk per core (at most 8) of at least parallel_chunk_bytes. A header with
// quotes is read by the plain path (one chunk).
std::vector<long long> score_chunk_cuts(const ReplaySource& source, long long body, long long size,
                                        bool header_quoted) {
    std::vector<long long> cuts{body};
    const unsigned cores = std::max(1u, std::min(8u, std::thread::hardware_concurrency()));
    const long long chunk_min = std::max(1LL, source.parallel_chunk_bytes);
    const long long chunks = header_quoted ? 1 : std::min<long long>(cores, std::max(1LL, (size - body) / chunk_min));
    for (long long k = 1; k < chunks; ++k) {
        const long long cut = next_record_start(source.scores_path, body + (size - body) * k / chunks, size);
        if (cut > cuts.back() && cut < size) cuts.push_back(cut);
    }
    cuts.push_back(size);
    return cuts;
}

// The fewest bytes a usable score row takes: an id of one character, a
// 19-character scored_at, an empty available_at, a one-digit score, three
// commas and a line break.
constexpr long long shortest_score_row = 1 + 19 + 0 + 1 + 3 + 1;

// Parses the chunks between consecutive `bounds`, one thread each.
std::vector<ScoreChunk> parse_score_chunks(const ReplaySource& source, const TimeZone& zone, const IdIndex& index,
                                           const ScoreColumns& columns, const std::vector<long long>& bounds) {
    std::vector<ScoreChunk> chunks(bounds.size() - 1);
    parallel_for(chunks.size(), static_cast<unsigned>(chunks.size()), [&](std::size_t k) {
        CsvReader reader(source.scores_path, bounds[k], bounds[k + 1]);
        // Room for as many rows as the bytes could hold, so the arrays never
        // regrow; the first chunk's for the whole file, so the others are
        // joined onto it in place. Pages never written cost no memory.
        const long long bytes = k == 0 ? bounds.back() - bounds.front() : bounds[k + 1] - bounds[k];
        const auto expected = static_cast<std::size_t>(bytes / shortest_score_row + 16);
        chunks[k].scores.reserve(expected);
        chunks[k].owner.reserve(expected);
        parse_score_rows(reader, columns, index, source, zone, chunks[k]);
    });
    return chunks;
}

// Joins the chunks in file order into `scores` and `owner`, with their notes
// and skipped rows (lines made absolute); throws the first chunk's error.
void join_score_chunks(std::vector<ScoreChunk>& chunks, Exclusions& excluded, std::vector<Score>& scores,
                       std::vector<std::uint32_t>& owner) {
    long line_offset = 1;  // the header
    std::size_t total = 0;
    for (ScoreChunk& c : chunks) {
        if (c.error) {
            const InputError& e = *c.error;
            throw InputError(e.file, e.line + line_offset, e.column, e.field, e.detail);
        }
        for (const auto& [what, rows] : c.notes.rows_skipped) excluded.rows_skipped[what].merge(rows, line_offset);
        line_offset += c.lines;
        total += c.scores.size();
        for (const auto& [what, n] : c.notes.notes) excluded.notes[what] += n;
    }
    scores = std::move(chunks[0].scores);
    owner = std::move(chunks[0].owner);
    scores.reserve(total);  // already so (parse_score_chunks), unless rows were shorter than any usable one
    owner.reserve(total);
    for (std::size_t k = 1; k < chunks.size(); ++k) {
        ScoreChunk& c = chunks[k];
        scores.insert(scores.end(), c.scores.begin(), c.scores.end());
        owner.insert(owner.end(), c.owner.begin(), c.owner.end());
        std::vector<Score>().swap(c.scores);
        std::vector<std::uint32_t>().swap(c.owner);
    }
}

// Reads the scores file. Large files are cut at line breaks into one chunk
// per core and parsed in parallel; chunks are joined in file order, so the
// result (and the first error reported) does not depend on the core count.
void read_scores(const ReplaySource& source, const TimeZone& zone, const IdIndex& index, Exclusions& excluded,
                 std::vector<Score>& scores, std::vector<std::uint32_t>& owner, ScoreColumns& columns) {
    const std::string& path = source.scores_path;
    long long body = 0;  // offset of the first record after the header
    bool header_quoted = false;
    {
        std::vector<std::string_view> fields;
        CsvReader reader(path);
        if (!reader.next(fields)) throw InputError(path, 1, 0, "", "file is empty (expected a header)");
        columns.col = header_columns(reader, fields, {"encounter", "scored_at", "available_at", "score"});
        columns.width = fields.size();
        body = reader.offset();
        header_quoted = reader.saw_quote();
    }
    const long long size = static_cast<long long>(std::filesystem::file_size(path));
    const std::vector<long long> cuts = score_chunk_cuts(source, body, size, header_quoted);
    std::vector<ScoreChunk> chunks = parse_score_chunks(source, zone, index, columns, cuts);
    // A cut inside a quoted field (a line break within quotes) would split a
    // record: any quote before the last chunk sends the file down the plain path.
    bool quoted = false;
    for (std::size_t k = 0; k + 1 < chunks.size(); ++k) quoted = quoted || chunks[k].saw_quote;
    if (quoted) chunks = parse_score_chunks(source, zone, index, columns, {cuts.front(), cuts.back()});
    join_score_chunks(chunks, excluded, scores, owner);
}

using ScoreKey = std::pair<std::uint32_t, Instant>;  // encounter, scored_at

// File lines of the score rows (as read, bad rows left out) whose encounter and
// scored_at are in `wanted`, in file order. Found by reading the file again:
// only needed when repeated rows disagree, which is rare, so the fast path
// keeps no line per score.
std::vector<std::pair<long, ScoreKey>> score_lines(const ReplaySource& source, const TimeZone& zone,
                                                   const IdIndex& index, const ScoreColumns& c,
                                                   const std::set<ScoreKey>& wanted) {
    std::vector<std::pair<long, ScoreKey>> lines;
    CsvReader reader(source.scores_path);
    std::vector<std::string_view> fields;
    reader.next(fields);
    Exclusions ignored;
    LastLookup last;
    while (reader.next(fields)) {
        if (blank(fields)) continue;
        RowContext row{reader, fields, zone, ignored};
        Score s;
        try {
            const ScoreKey key{parse_score_row(row, c, index, source, last, s), s.scored_at};
            if (wanted.count(key)) lines.emplace_back(reader.line(), key);
        } catch (const RowProblem&) {
            // Skipped (or would have stopped) on the first reading.
        }
    }
    return lines;
}

// Repeated score rows of one encounter at one scored_at: identical values are
// a resent row (the one available first is kept, the rest counted); different
// values are bad rows, since nothing says which one the system acted on.
void resolve_repeated_scores(Population& pop, const ReplaySource& source, const TimeZone& zone, const IdIndex& index,
                             const ScoreColumns& columns) {
    std::int64_t repeated = 0;
    std::set<ScoreKey> conflicts;
    std::vector<std::size_t> start(pop.encounters.size() + 1, 0);
    std::vector<std::size_t> order;
    std::vector<char> drop;
    std::size_t out = 0;
    for (std::size_t e = 0; e < pop.encounters.size(); ++e) {
        const std::size_t a = pop.score_start[e], b = pop.score_start[e + 1];
        start[e] = out;
        // Scores are in available_at order; usually scored_at rises with it.
        bool strictly_rising = true;
        for (std::size_t i = a + 1; i < b && strictly_rising; ++i)
            strictly_rising = pop.scores[i - 1].scored_at < pop.scores[i].scored_at;
        drop.assign(b - a, 0);
        if (!strictly_rising) {
            order.resize(b - a);
            for (std::size_t i = 0; i < order.size(); ++i) order[i] = a + i;
            std::stable_sort(order.begin(), order.end(),
                             [&](std::size_t x, std::size_t y) { return pop.scores[x].scored_at < pop.scores[y].scored_at; });
            for (std::size_t k = 0; k < order.size();) {
                std::size_t m = k + 1;
                while (m < order.size() && pop.scores[order[m]].scored_at == pop.scores[order[k]].scored_at) ++m;
                bool differ = false;
                for (std::size_t j = k + 1; j < m; ++j) differ = differ || pop.scores[order[j]].value != pop.scores[order[k]].value;
                if (differ) conflicts.emplace(static_cast<std::uint32_t>(e), pop.scores[order[k]].scored_at);
                else repeated += static_cast<std::int64_t>(m - k - 1);
                // Stable sort kept available_at order: the first is available first.
                for (std::size_t j = differ ? k : k + 1; j < m; ++j) drop[order[j] - a] = 1;
                k = m;
            }
        }
        for (std::size_t i = a; i < b; ++i)
            if (!drop[i - a]) pop.scores[out++] = pop.scores[i];
    }
    start[pop.encounters.size()] = out;
    pop.scores.resize(out);
    pop.score_start = std::move(start);
    if (repeated) pop.excluded.scores_by_reason["repeated row (same encounter, scored_at and score)"] += repeated;
    if (conflicts.empty()) return;

    const auto lines = score_lines(source, zone, index, columns, conflicts);
    const std::string reason = "same encounter and scored_at with different scores (every such row skipped)";
    if (source.bad_rows == BadRows::skip) {
        auto& skipped = pop.excluded.rows_skipped[file_name(source.scores_path) + ": " + reason];
        for (const auto& [line, key] : lines) skipped.add(line);
        return;
    }
    // Stop at the first row that repeats an earlier one, naming that one.
    std::map<ScoreKey, long> first_line;
    for (const auto& [line, key] : lines) {
        const auto [seen, fresh] = first_line.emplace(key, line);
        if (fresh) continue;
        throw InputError(source.scores_path, line, static_cast<long>(columns.col[3] + 1), "score",
                         "encounter '" + pop.encounters[key.first].id + "' has two different scores at scored_at " +
                             format_utc(key.second) + " (the other on line " + std::to_string(seen->second) +
                             "); keep one row per encounter and scored_at");
    }
    throw InputError(source.scores_path, 1, 0, "score", "two different scores at one scored_at of one encounter");
}

// Quantile by the nearest-rank rule on a copy; precise enough for fences.
Instant quartile(std::vector<Instant>& v, double q) {
    const auto k = static_cast<std::size_t>(q * static_cast<double>(v.size() - 1));
    std::nth_element(v.begin(), v.begin() + static_cast<std::ptrdiff_t>(k), v.end());
    return v[k];
}

// What reading the encounters file leaves for reading the scores and for
// messages: the id index, the units in first-seen order, each kept
// encounter's file line and the columns of the header.
struct EncounterFile {
    IdIndex index;
    std::vector<std::string> unit_names;
    std::unordered_map<std::string, std::uint32_t> unit_index;
    std::vector<long> line;  // file line of each kept encounter
    std::vector<std::size_t> col;
};

// The times of one encounter row, checked (stay, outcome).
void parse_encounter_times(const RowContext& row, const std::vector<std::size_t>& col, const ReplaySource& source,
                           Seconds max_stay, Encounter& e) {
    const auto& fields = row.fields;
    e.admitted = row.timestamp(col[2], "admitted");
    e.discharged = row.timestamp(col[3], "discharged");
    if (e.discharged <= e.admitted)
        row.fail(col[3], "discharged", "discharged not after admitted",
                 "discharged must be after admitted (" + std::string(fields[col[2]]) + ")");
    if (e.discharged - e.admitted > max_stay)
        row.fail(col[3], "discharged", "stay longer than max_stay_days",
                 "a stay of " + format_number(static_cast<double>(e.discharged - e.admitted) / 86400.0) +
                     " days is longer than max_stay_days (" + format_number(source.max_stay_days) + "; admitted " +
                     std::string(fields[col[2]]) + "): a mistyped year?");
    if (!fields[col[4]].empty()) {
        Instant t0 = row.timestamp(col[4], "outcome_at");
        if (t0 < e.admitted || t0 > e.discharged)
            row.fail(col[4], "outcome_at", "outcome outside the stay",
                     "outcome must lie within the stay (admitted to discharged)");
        e.outcome_at = t0;
    }
}

// The encounter's value of each group column (after the five required ones in
// `col`); an empty field or one of the column's missing markers is "not recorded".
void parse_encounter_groups(const RowContext& row, const std::vector<std::size_t>& col,
                            const std::vector<GroupColumn>& groups, Encounter& e) {
    for (std::size_t g = 0; g < groups.size(); ++g) {
        const GroupColumn& group = groups[g];
        const std::size_t c = col[5 + g];
        const std::string_view value = row.fields[c];
        const auto& missing = group.recorded_as_missing;
        if (value.empty() || std::find(missing.begin(), missing.end(), value) != missing.end()) {
            e.groups.push_back(group.not_recorded_level());
            continue;
        }
        const auto at = std::find(group.values.begin(), group.values.end(), value);
        if (at == group.values.end()) {
            row.text(c, group.name);
            row.fail(c, group.name, "a value not declared for group " + group.name,
                     "expected one of the values declared for group " + group.name + " (" + group.values_text() +
                         ") or an empty field (not recorded), found '" + std::string(value) + "'");
        }
        e.groups.push_back(static_cast<std::uint16_t>(at - group.values.begin()));
    }
}

// One encounter row, checked and appended to pop.encounters, or throws RowProblem.
void read_encounter_row(const RowContext& row, const ReplaySource& source, Seconds max_stay, Population& pop,
                        EncounterFile& file) {
    const auto& col = file.col;
    const auto& fields = row.fields;
    Encounter e;
    if (fields[col[0]].empty()) row.fail(col[0], "encounter", "empty encounter id", "encounter id is empty");
    row.text(col[0], "encounter");
    if (fields[col[1]].empty()) row.fail(col[1], "unit", "empty unit", "unit is empty");
    row.text(col[1], "unit");
    e.id = std::string(fields[col[0]]);
    if (auto seen = file.index.find(e.id); seen != file.index.end()) {
        if (seen->second == skipped_encounter)
            row.fail(col[0], "encounter", "repeated encounter id of a skipped row",
                     "duplicate encounter id '" + e.id + "'");
        row.fail(col[0], "encounter", "repeated encounter id (the first row is kept)",
                 "duplicate encounter id '" + e.id + "' (first seen on line " +
                     std::to_string(file.line[seen->second]) + ")");
    }
    try {
        parse_encounter_times(row, col, source, max_stay, e);
    } catch (const RowProblem&) {
        // Its scores are then counted as belonging to a skipped row, not as unknown.
        if (source.bad_rows == BadRows::skip) file.index.emplace(e.id, skipped_encounter);
        throw;
    }
    parse_encounter_groups(row, col, source.groups, e);
    std::string unit(fields[col[1]]);
    auto [it, added] = file.unit_index.emplace(unit, static_cast<std::uint32_t>(file.unit_names.size()));
    if (added) file.unit_names.push_back(unit);
    e.unit = it->second;
    file.index.emplace(e.id, static_cast<std::uint32_t>(pop.encounters.size()));
    pop.encounters.push_back(std::move(e));
    file.line.push_back(row.reader.line());
}

// Reads the encounters file into pop.encounters (units numbered in first-seen order).
void read_encounters(const ReplaySource& source, const TimeZone& zone, Population& pop, EncounterFile& file) {
    const std::string& enc_path = source.encounters_path;
    std::vector<std::string_view> fields;
    CsvReader reader(enc_path);
    if (!reader.next(fields)) throw InputError(enc_path, 1, 0, "", "file is empty (expected a header)");
    const long header_line = reader.line();
    std::vector<std::string_view> required = {"encounter", "unit", "admitted", "discharged", "outcome_at"};
    for (const GroupColumn& g : source.groups) required.push_back(g.name);
    file.col = header_columns(reader, fields, required);
    const std::size_t width = fields.size();
    const Seconds max_stay = static_cast<Seconds>(std::llround(source.max_stay_days * 86400.0));
    bool any_row = false;
    while (reader.next(fields)) {
        if (blank(fields)) continue;
        any_row = true;
        RowContext row{reader, fields, zone, pop.excluded};
        try {
            row.width(width);
            read_encounter_row(row, source, max_stay, pop, file);
        } catch (const RowProblem& p) {
            handle(p, source.bad_rows, pop.excluded.rows_skipped);
        }
    }
    if (!any_row)
        throw InputError(enc_path, header_line, 0, "", "no encounters: nothing to simulate (the file has a header and no rows)");
    if (pop.encounters.empty())
        throw InputError(enc_path, header_line, 0, "",
                         "no encounters left after skipping bad rows (bad_rows: skip): nothing to simulate");
}

// Drops (or stops at) encounters admitted or discharged far outside the rest
// of the log: a mistyped year that still gives a plausible stay (2062 for
// 2026) lies far outside every other instant.
void drop_far_out_encounters(const ReplaySource& source, Population& pop, EncounterFile& file) {
    if (source.far_out_fence_iqr <= 0 || pop.encounters.size() < 4) return;
    const std::string& enc_path = source.encounters_path;
    std::vector<Instant> instants;
    instants.reserve(2 * pop.encounters.size());
    for (const Encounter& e : pop.encounters) {
        instants.push_back(e.admitted);
        instants.push_back(e.discharged);
    }
    const Instant q1 = quartile(instants, 0.25), q3 = quartile(instants, 0.75);
    const double spread = std::max(static_cast<double>(q3 - q1), 30.0 * 86400.0) * source.far_out_fence_iqr;
    const double low = static_cast<double>(q1) - spread, high = static_cast<double>(q3) + spread;
    auto far = [&](Instant t) { return static_cast<double>(t) < low || static_cast<double>(t) > high; };
    std::vector<char> drop(pop.encounters.size(), 0);
    bool any = false;
    for (std::size_t i = 0; i < pop.encounters.size(); ++i) {
        const Encounter& e = pop.encounters[i];
        if (!far(e.admitted) && !far(e.discharged)) continue;
        const bool admitted = far(e.admitted);
        const Instant t = admitted ? e.admitted : e.discharged;
        const RowProblem p{"admission or discharge far outside the rest of the log",
                           InputError(enc_path, file.line[i], static_cast<long>(file.col[admitted ? 2 : 3] + 1),
                                      admitted ? "admitted" : "discharged",
                                      format_utc(t) + " lies far outside the rest of the log (half of all admissions "
                                      "and discharges lie between " + format_utc(q1) + " and " + format_utc(q3) +
                                      "; the fence is " + format_number(source.far_out_fence_iqr) +
                                      " interquartile ranges beyond): a mistyped year?")};
        handle(p, source.bad_rows, pop.excluded.rows_skipped);
        drop[i] = 1;
        any = true;
    }
    if (!any) return;
    std::size_t out = 0;
    for (std::size_t i = 0; i < pop.encounters.size(); ++i) {
        if (drop[i]) {
            file.index[pop.encounters[i].id] = skipped_encounter;
            continue;
        }
        file.index[pop.encounters[i].id] = static_cast<std::uint32_t>(out);
        file.line[out] = file.line[i];
        pop.encounters[out++] = std::move(pop.encounters[i]);
    }
    pop.encounters.resize(out);
    file.line.resize(out);
    if (pop.encounters.empty())
        throw InputError(enc_path, 1, 0, "", "no encounters left after skipping bad rows (bad_rows: skip): nothing to simulate");
}

// Units are numbered in name order so that outputs do not depend on row
// order; a unit whose every row was skipped does not appear.
void number_units_by_name(Population& pop, const std::vector<std::string>& unit_names) {
    std::vector<char> used(unit_names.size(), 0);
    for (const Encounter& e : pop.encounters) used[e.unit] = 1;
    std::vector<std::uint32_t> order;
    for (std::uint32_t i = 0; i < unit_names.size(); ++i)
        if (used[i]) order.push_back(i);
    std::sort(order.begin(), order.end(), [&](auto a, auto b) { return unit_names[a] < unit_names[b]; });
    std::vector<std::uint32_t> renumber(unit_names.size(), 0);
    for (std::uint32_t k = 0; k < order.size(); ++k) {
        renumber[order[k]] = k;
        pop.units.push_back(unit_names[order[k]]);
    }
    for (Encounter& e : pop.encounters) e.unit = renumber[e.unit];
}

}  // namespace

Population load_replay(const ReplaySource& source, const TimeZone& zone) {
    Population pop;
    EncounterFile file;
    pop.groups = source.groups;
    read_encounters(source, zone, pop, file);
    drop_far_out_encounters(source, pop, file);
    number_units_by_name(pop, file.unit_names);
    std::vector<Score> scores;
    std::vector<std::uint32_t> owner;
    ScoreColumns columns;
    read_scores(source, zone, file.index, pop.excluded, scores, owner, columns);
    group_scores_by_encounter(pop, scores, owner);
    resolve_repeated_scores(pop, source, zone, file.index, columns);
    apply_score_exclusions(pop);
    default_period(pop);
    return pop;
}

}  // namespace tocsin
