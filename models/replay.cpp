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
#include "models/replay_rows.hpp"
#include "models/replay_scores.hpp"
#include "models/text.hpp"

namespace tocsin {

namespace {

using namespace replay_rows;


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
    pop.score_name = source.score_name;
    for (const OtherScoreSource& o : source.other_scores) pop.other_scores.push_back({.name = o.name});
    std::vector<std::string> paths{source.scores_path};  // the file each score is read from
    for (const OtherScoreSource& o : source.other_scores) paths.push_back(o.path);
    std::set<std::string> read_before;
    for (std::size_t k = 0; k < pop.score_count(); ++k) {
        ScoreFile f = k == 0 ? ScoreFile{.path = source.scores_path, .low = source.score_low, .high = source.score_high}
                             : ScoreFile{.path = source.other_scores[k - 1].path,
                                         .column = source.other_scores[k - 1].column,
                                         .low = source.other_scores[k - 1].score_low,
                                         .high = source.other_scores[k - 1].score_high};
        f.shared = std::count(paths.begin(), paths.end(), f.path) > 1;
        f.first_reading = read_before.insert(f.path).second;
        f.encounters_path = source.encounters_path;
        f.latency_when_missing = source.latency_when_missing;
        f.parallel_chunk_bytes = source.parallel_chunk_bytes;
        f.bad_rows = source.bad_rows;
        read_score_file(f, zone, file.index, pop, k);
    }
    apply_score_exclusions(pop);
    default_period(pop);
    return pop;
}

}  // namespace tocsin
