#include "models/replay_scores.hpp"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <optional>
#include <set>
#include <thread>

#include "models/parallel.hpp"

namespace tocsin::replay_rows {

std::string ScoreFile::label() const {
    return shared ? file_name(path) + ", column " + column : file_name(path);
}

namespace {

// An empty field of a score in a file shared with other scores.
struct NotRecorded {};

struct ScoreChunk {
    std::vector<Score> scores;
    std::vector<std::uint32_t> owner;
    Exclusions notes;  // notes and rows_skipped, with lines relative to the chunk
    std::optional<InputError> error;
    bool saw_quote = false;
    long lines = 0;
    std::int64_t not_recorded = 0;  // empty fields of a score in a file shared with others
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
                              const ScoreFile& file, LastLookup& lookup, Score& s) {
    const auto& col = c.col;
    row.width(c.width);
    std::string_view id = row.fields[col[0]];
    if (!lookup.valid || id != lookup.id) {
        lookup.valid = false;
        auto it = index.find(id);
        if (it == index.end()) {
            row.text(col[0], "encounter");
            row.fail(col[0], "encounter", "score for an unknown encounter",
                     "score for an unknown encounter '" + std::string(id) + "' (not in " + file.encounters_path + ")");
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
        s.available_at = s.scored_at + file.latency_when_missing;
    } else {
        s.available_at = row.timestamp(col[2], "available_at");
        if (s.available_at < s.scored_at)
            row.fail(col[2], "available_at", "available_at before scored_at", "available_at is before scored_at");
    }
    std::string_view text = row.fields[col[3]];
    if (text.empty() && file.shared) throw NotRecorded{};
    const char* first = text.data();
    const char* last = text.data() + text.size();
    if (first != last && *first == '+') ++first;
    auto [ptr, ec] = std::from_chars(first, last, s.value);
    if (text.empty() || ec != std::errc() || ptr != last || !std::isfinite(s.value))
        row.fail(col[3], file.column, "score that is not a finite number",
                 "expected a finite number, found '" + std::string(text) + "'");
    if (s.value < file.low || s.value > file.high)
        row.fail(col[3], file.column, "score outside score_range",
                 "score " + std::string(text) + " is outside score_range [" + format_number(file.low) + ", " +
                     format_number(file.high) + "]");
    return lookup.index;
}

// Parses score rows from `reader` (positioned after the header) into `out`.
void parse_score_rows(CsvReader& reader, const ScoreColumns& c, const IdIndex& index, const ScoreFile& file,
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
                const std::uint32_t e = parse_score_row(row, c, index, file, last, s);
                out.scores.push_back(s);
                out.owner.push_back(e);
            } catch (const RowProblem& p) {
                if (file.bad_rows == BadRows::stop) throw p.error;
                out.notes.rows_skipped[file.label() + ": " + p.reason].add(p.error.line);
            } catch (const NotRecorded&) {
                ++out.not_recorded;
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
std::vector<long long> score_chunk_cuts(const ScoreFile& file, long long body, long long size,
                                        bool header_quoted) {
    std::vector<long long> cuts{body};
    const unsigned cores = std::max(1u, std::min(8u, std::thread::hardware_concurrency()));
    const long long chunk_min = std::max(1LL, file.parallel_chunk_bytes);
    const long long chunks = header_quoted ? 1 : std::min<long long>(cores, std::max(1LL, (size - body) / chunk_min));
    for (long long k = 1; k < chunks; ++k) {
        const long long cut = next_record_start(file.path, body + (size - body) * k / chunks, size);
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
std::vector<ScoreChunk> parse_score_chunks(const ScoreFile& file, const TimeZone& zone, const IdIndex& index,
                                           const ScoreColumns& columns, const std::vector<long long>& bounds) {
    std::vector<ScoreChunk> chunks(bounds.size() - 1);
    parallel_for(chunks.size(), static_cast<unsigned>(chunks.size()), [&](std::size_t k) {
        CsvReader reader(file.path, bounds[k], bounds[k + 1]);
        // Room for as many rows as the bytes could hold, so the arrays never
        // regrow; the first chunk's for the whole file, so the others are
        // joined onto it in place. Pages never written cost no memory.
        const long long bytes = k == 0 ? bounds.back() - bounds.front() : bounds[k + 1] - bounds[k];
        const auto expected = static_cast<std::size_t>(bytes / shortest_score_row + 16);
        chunks[k].scores.reserve(expected);
        chunks[k].owner.reserve(expected);
        parse_score_rows(reader, columns, index, file, zone, chunks[k]);
    });
    return chunks;
}

// Joins the chunks in file order into `scores` and `owner`, with their notes
// and skipped rows (lines made absolute); throws the first chunk's error.
void join_score_chunks(const ScoreFile& file, std::vector<ScoreChunk>& chunks, Exclusions& excluded,
                       std::vector<Score>& scores, std::vector<std::uint32_t>& owner) {
    long line_offset = 1;  // the header
    std::int64_t not_recorded = 0;
    std::size_t total = 0;
    for (ScoreChunk& c : chunks) {
        if (c.error) {
            const InputError& e = *c.error;
            throw InputError(e.file, e.line + line_offset, e.column, e.field, e.detail);
        }
        for (const auto& [what, rows] : c.notes.rows_skipped) excluded.rows_skipped[what].merge(rows, line_offset);
        line_offset += c.lines;
        total += c.scores.size();
        if (file.first_reading)
            for (const auto& [what, n] : c.notes.notes) excluded.notes[what] += n;
        not_recorded += c.not_recorded;
    }
    if (not_recorded) excluded.scores_by_reason["not recorded in this row (empty " + file.column + ")"] += not_recorded;
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
void read_scores(const ScoreFile& file, const TimeZone& zone, const IdIndex& index, Exclusions& excluded,
                 std::vector<Score>& scores, std::vector<std::uint32_t>& owner, ScoreColumns& columns) {
    const std::string& path = file.path;
    long long body = 0;  // offset of the first record after the header
    bool header_quoted = false;
    {
        std::vector<std::string_view> fields;
        CsvReader reader(path);
        if (!reader.next(fields)) throw InputError(path, 1, 0, "", "file is empty (expected a header)");
        columns.col = header_columns(reader, fields, {"encounter", "scored_at", "available_at", file.column});
        columns.width = fields.size();
        body = reader.offset();
        header_quoted = reader.saw_quote();
    }
    const long long size = static_cast<long long>(std::filesystem::file_size(path));
    const std::vector<long long> cuts = score_chunk_cuts(file, body, size, header_quoted);
    std::vector<ScoreChunk> chunks = parse_score_chunks(file, zone, index, columns, cuts);
    // A cut inside a quoted field (a line break within quotes) would split a
    // record: any quote before the last chunk sends the file down the plain path.
    bool quoted = false;
    for (std::size_t k = 0; k + 1 < chunks.size(); ++k) quoted = quoted || chunks[k].saw_quote;
    if (quoted) chunks = parse_score_chunks(file, zone, index, columns, {cuts.front(), cuts.back()});
    join_score_chunks(file, chunks, excluded, scores, owner);
}

using ScoreKey = std::pair<std::uint32_t, Instant>;  // encounter, scored_at

// File lines of the score rows (as read, bad rows left out) whose encounter and
// scored_at are in `wanted`, in file order. Found by reading the file again:
// only needed when repeated rows disagree, which is rare, so the fast path
// keeps no line per score.
std::vector<std::pair<long, ScoreKey>> score_lines(const ScoreFile& file, const TimeZone& zone,
                                                   const IdIndex& index, const ScoreColumns& c,
                                                   const std::set<ScoreKey>& wanted) {
    std::vector<std::pair<long, ScoreKey>> lines;
    CsvReader reader(file.path);
    std::vector<std::string_view> fields;
    reader.next(fields);
    Exclusions ignored;
    LastLookup last;
    while (reader.next(fields)) {
        if (blank(fields)) continue;
        RowContext row{reader, fields, zone, ignored};
        Score s;
        try {
            const ScoreKey key{parse_score_row(row, c, index, file, last, s), s.scored_at};
            if (wanted.count(key)) lines.emplace_back(reader.line(), key);
        } catch (const RowProblem&) {
            // Skipped (or would have stopped) on the first reading.
        } catch (const NotRecorded&) {
        }
    }
    return lines;
}

// Repeated score rows of one encounter at one scored_at: identical values are
// a resent row (the one available first is kept, the rest counted); different
// values are bad rows, since nothing says which one the system acted on.
void resolve_repeated_scores(Population& pop, const ScoreFile& file, const TimeZone& zone, const IdIndex& index,
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

    const auto lines = score_lines(file, zone, index, columns, conflicts);
    const std::string reason = "same encounter and scored_at with different scores (every such row skipped)";
    if (file.bad_rows == BadRows::skip) {
        auto& skipped = pop.excluded.rows_skipped[file.label() + ": " + reason];
        for (const auto& [line, key] : lines) skipped.add(line);
        return;
    }
    // Stop at the first row that repeats an earlier one, naming that one.
    std::map<ScoreKey, long> first_line;
    for (const auto& [line, key] : lines) {
        const auto [seen, fresh] = first_line.emplace(key, line);
        if (fresh) continue;
        throw InputError(file.path, line, static_cast<long>(columns.col[3] + 1), file.column,
                         "encounter '" + pop.encounters[key.first].id + "' has two different scores at scored_at " +
                             format_utc(key.second) + " (the other on line " + std::to_string(seen->second) +
                             "); keep one row per encounter and scored_at");
    }
    throw InputError(file.path, 1, 0, file.column, "two different scores at one scored_at of one encounter");
}
}  // namespace

void read_score_file(const ScoreFile& file, const TimeZone& zone, const IdIndex& index, Population& pop,
                     std::size_t score) {
    swap_first_score(pop, score);  // the reading below fills the first score's place
    std::vector<Score> scores;
    std::vector<std::uint32_t> owner;
    ScoreColumns columns;
    read_scores(file, zone, index, pop.excluded, scores, owner, columns);
    group_scores_by_encounter(pop, scores, owner);
    resolve_repeated_scores(pop, file, zone, index, columns);
    swap_first_score(pop, score);
}

}  // namespace tocsin::replay_rows
