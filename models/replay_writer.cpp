#include "models/replay_writer.hpp"

#include <algorithm>
#include <cassert>
#include <cmath>
#include <stdexcept>
#include <unordered_set>
#include <vector>

#include "models/text.hpp"

namespace tocsin {

namespace {

// RFC 4180 quoting; report/table.hpp has its own, but models/ may not include report/.
std::string csv_text(std::string_view text) {
    if (text.find_first_of(",\"\r\n") == std::string_view::npos) return std::string(text);
    std::string out = "\"";
    for (char c : text) {
        if (c == '"') out += '"';
        out += c;
    }
    return out + "\"";
}

[[noreturn]] void refuse(const Encounter& e, const std::string& what) {
    throw std::invalid_argument("encounter '" + e.id + "' cannot be written as a log that replays the same: " + what);
}

void check_name(const Encounter& e, std::string_view text, const char* field) {
    if (text.empty()) refuse(e, std::string("empty ") + field);
    if (std::string problem = text_problem(text); !problem.empty()) refuse(e, std::string(field) + ": " + problem);
}

void check_encounter(const Population& pop, const Encounter& e, std::unordered_set<std::string_view>& ids) {
    assert(e.unit < pop.units.size());
    check_name(e, e.id, "id");
    check_name(e, pop.units[e.unit], "unit name");
    if (!ids.insert(e.id).second) refuse(e, "the id is repeated");
    if (e.groups.size() != pop.groups.size()) refuse(e, "its patient groups do not match the declared group columns");
    if (e.discharged <= e.admitted) refuse(e, "the stay does not end after it starts");
    if (e.outcome_at && (*e.outcome_at < e.admitted || *e.outcome_at > e.discharged))
        refuse(e, "the outcome lies outside the stay");
}

// The reader drops (or refuses) what is not usable and keeps one score per
// scored_at, so anything else would not come back.
void check_scores(const Encounter& e, std::span<const Score> scores, std::vector<Instant>& scored) {
    scored.clear();
    for (const Score& s : scores) {
        if (!std::isfinite(s.value)) refuse(e, "a score is not a finite number");
        if (s.available_at < s.scored_at) refuse(e, "a score is available before it was scored");
        if (s.available_at < e.admitted || s.available_at >= Population::usable_until(e))
            refuse(e, "a score is available outside the stay (before admission, at or after discharge or time zero)");
        scored.push_back(s.scored_at);
    }
    std::sort(scored.begin(), scored.end());
    if (std::adjacent_find(scored.begin(), scored.end()) != scored.end())
        refuse(e, "two scores have the same scored_at");
}

}  // namespace

ReplayText replay_csv(const Population& pop, const TimeZone& zone) {
    if (!pop.other_scores.empty())
        throw std::invalid_argument("a population with other scores (" + pop.other_scores.front().name +
                                    ") cannot be written as a log yet: only its first score would be written");
    ReplayText text;
    text.encounters = "encounter,unit,admitted,discharged,outcome_at";
    for (const GroupColumn& g : pop.groups) text.encounters += "," + csv_text(g.name);
    text.encounters += "\n";
    text.scores = "encounter,scored_at,available_at,score\n";
    std::unordered_set<std::string_view> ids;
    std::vector<Instant> scored;
    for (std::size_t i = 0; i < pop.encounters.size(); ++i) {
        const Encounter& e = pop.encounters[i];
        check_encounter(pop, e, ids);
        check_scores(e, pop.scores_of(i), scored);
        const std::string id = csv_text(e.id);
        text.encounters += id + "," + csv_text(pop.units[e.unit]) + "," + format_local(e.admitted, zone) + "," +
                           format_local(e.discharged, zone) + "," +
                           (e.outcome_at ? format_local(*e.outcome_at, zone) : std::string());
        // "not recorded" is written as an empty field, which reads back as not recorded.
        for (std::size_t g = 0; g < pop.groups.size(); ++g)
            text.encounters += "," + (e.groups[g] < pop.groups[g].values.size()
                                          ? csv_text(pop.groups[g].values[e.groups[g]]) : std::string());
        text.encounters += "\n";
        for (const Score& s : pop.scores_of(i))
            text.scores += id + "," + format_local(s.scored_at, zone) + "," + format_local(s.available_at, zone) + "," +
                           round_trip_text(s.value) + "\n";
    }
    return text;
}

ReplaySource replay_settings_for(const Population& pop, double usual_low, double usual_high,
                                 std::string encounters_path, std::string scores_path) {
    ReplaySource source;
    source.encounters_path = std::move(encounters_path);
    source.scores_path = std::move(scores_path);
    source.score_low = usual_low;
    source.score_high = usual_high;
    for (const Score& s : pop.scores) {
        source.score_low = std::min(source.score_low, s.value);
        source.score_high = std::max(source.score_high, s.value);
    }
    Seconds longest = 0;
    for (const Encounter& e : pop.encounters) longest = std::max(longest, e.discharged - e.admitted);
    // Whole days, so the key reads plainly; the reader compares in seconds.
    source.max_stay_days = std::max(source.max_stay_days, std::ceil(static_cast<double>(longest) / 86400.0));
    source.far_out_fence_iqr = 0;
    source.groups = pop.groups;
    for (GroupColumn& g : source.groups) g.recorded_as_missing.clear();  // written as empty fields
    return source;
}

namespace {

// One line of a YAML comment: a line break in a path would end the comment.
std::string comment_text(std::string_view text) {
    std::string out;
    for (char c : text) out += (c == '\n' || c == '\r') ? ' ' : c;
    return out;
}

// A YAML double-quoted scalar.
std::string yaml_quoted(std::string_view text) {
    std::string out = "\"";
    for (char c : text) {
        if (c == '"' || c == '\\') out += '\\';
        out += c;
    }
    return out + "\"";
}

}  // namespace

std::string replay_scenario_fragment(const ReplaySource& s, const ReplayFragmentInfo& info, const TimeZone& zone) {
    std::string y;
    y += "# Written by tocsin generate: " + comment_text(info.origin) + ".\n";
    y += "# To replay these files, put these sections in a scenario file in this\n"
         "# directory (paths are relative to the scenario file) in place of its own\n"
         "# time_zone, reporting and population; keep its shifts, outcome and plans.\n"
         "# The files hold encounter ids.\n";
    y += "time_zone: " + yaml_quoted(info.time_zone) + "\n";
    y += "# The period the generating scenario reported on (a log carries no period of its own).\n";
    y += "reporting:\n";
    y += "  from: " + yaml_quoted(format_local(info.report_from, zone)) + "\n";
    y += "  until: " + yaml_quoted(format_local(info.report_until, zone)) + "\n";
    y += "population:\n";
    y += "  replay:\n";
    y += "    encounters: " + yaml_quoted(s.encounters_path) + "\n";
    y += "    scores: " + yaml_quoted(s.scores_path) + "\n";
    y += "    score_range: [" + round_trip_text(s.score_low) + ", " + round_trip_text(s.score_high) + "]\n";
    y += "    max_stay_days: " + round_trip_text(s.max_stay_days) + "\n";
    y += "    # Written by tocsin, not typed: no mistyped years to fence off.\n";
    y += "    far_out_fence_iqr: 0\n";
    if (!s.groups.empty()) y += "  groups:\n";
    for (const GroupColumn& g : s.groups) {
        y += "    - name: " + yaml_quoted(g.name) + "\n";
        y += "      values: [";
        for (std::size_t v = 0; v < g.values.size(); ++v) y += (v ? ", " : "") + yaml_quoted(g.values[v]);
        y += "]\n";
    }
    return y;
}

}  // namespace tocsin
