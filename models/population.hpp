#pragma once
// A population: the encounters on each unit, each encounter's score stream
// and its outcome. Every source (replay, bootstrap, generator, shift) produces
// this one value type; the simulation and the evaluation measures read it.
#include <cstddef>
#include <cstdint>
#include <map>
#include <optional>
#include <span>
#include <string>
#include <vector>

#include "models/time.hpp"

namespace tocsin {

struct Encounter {
    std::string id;       // as in the source; leaves the machine only on request
    std::uint32_t unit = 0;  // index into Population::units
    Instant admitted = 0;
    Instant discharged = 0;
    std::optional<Instant> outcome_at;  // time zero, when the outcome happened
    // The encounter's value of each patient-group column (Population::groups),
    // as a level index; empty when the scenario declares no group.
    std::vector<std::uint16_t> groups{};
};

// A patient-group column the scenario declares (age band, language spoken,
// admission route...): the values it may take. A missing value is a group of
// its own, "not recorded", at level values.size(): never dropped, because the
// patients whose group nobody wrote down are often the ones a committee
// should look at.
struct GroupColumn {
    std::string name;
    std::vector<std::string> values;
    std::vector<std::string> recorded_as_missing{};  // a log's own markers, e.g. "NA", "unknown"

    static constexpr const char* not_recorded = "not recorded";
    std::size_t levels() const { return values.size() + 1; }
    std::uint16_t not_recorded_level() const { return static_cast<std::uint16_t>(values.size()); }
    const std::string& level_name(std::size_t level) const;
    std::string values_text() const;  // "18-64, 65-79, 80+"
};

struct Score {
    Instant available_at = 0;  // first instant a system could act on it
    Instant scored_at = 0;     // the clinical instant it describes
    double value = 0.0;
};

// What a loader does with a row it cannot use (a bad timestamp, a score out of
// range, an unknown encounter, ...): stop with the row's file:line (the
// default), or skip it and count it by reason (`bad_rows: skip`, for a dirty
// log that must be run anyway; the counts are always reported).
enum class BadRows { stop, skip };

// Rows of one input file skipped for one reason under `bad_rows: skip`.
struct SkippedRows {
    static constexpr std::size_t lines_kept = 5;  // enough to find the pattern in the file
    std::int64_t count = 0;
    std::vector<long> first_lines;  // the first few, in file order

    void add(long line) {
        ++count;
        if (first_lines.size() < lines_kept) first_lines.push_back(line);
    }
    // Adds rows skipped in a later part of the same file.
    void merge(const SkippedRows& later, long line_offset);
};

// "lines 4, 9, 12 and 3 more" for tables and messages.
std::string describe_lines(const SkippedRows& rows);

// Why a score or encounter was not used. Counted, never silently dropped.
struct Exclusions {
    std::map<std::string, std::int64_t> scores_by_reason;
    std::map<std::string, std::int64_t> encounters_by_reason;
    std::map<std::string, std::int64_t> notes;  // resolved oddities, e.g. ambiguous local times
    // Rows skipped under `bad_rows: skip`, by "<file name>: <reason>".
    std::map<std::string, SkippedRows> rows_skipped;
    std::int64_t total_scores() const;
};

struct Population {
    std::vector<std::string> units;       // unit names; index = unit id
    std::vector<GroupColumn> groups;      // declared patient groups; Encounter::groups follows this order
    std::vector<Encounter> encounters;
    // Usable scores only (admitted <= available_at < min(discharged, outcome_at)),
    // grouped by encounter, each group in the order the rule sees them:
    // available_at, then scored_at, then source order.
    std::vector<Score> scores;
    std::vector<std::size_t> score_start;  // encounters.size() + 1 offsets into scores
    Exclusions excluded;
    // The period the population covers: [period_start, period_end).
    Instant period_start = 0;
    Instant period_end = 0;

    std::span<const Score> scores_of(std::size_t encounter) const {
        return {scores.data() + score_start[encounter], score_start[encounter + 1] - score_start[encounter]};
    }
    // End of the interval in which scores are usable: min(discharged, outcome_at).
    static Instant usable_until(const Encounter& e) {
        return e.outcome_at && *e.outcome_at < e.discharged ? *e.outcome_at : e.discharged;
    }
};

// Rebuild score_start from a per-score encounter index, sorting each group into
// rule order. `owner[i]` is the encounter of `scores[i]`; source order breaks ties.
void group_scores_by_encounter(Population& population, std::vector<Score>& scores,
                               std::vector<std::uint32_t>& owner);

// Remove scores outside [admitted, min(discharged, outcome_at)) and count them by
// reason. Assumes scores are grouped (score_start valid).
void apply_score_exclusions(Population& population);

// Set period_start/period_end to span every stay when they are unset (both 0).
void default_period(Population& population);

// The lowest and highest usable score, what a rule's threshold and a score
// scale are checked against.
struct ScoreRange {
    std::int64_t scores = 0;         // usable scores counted
    double lowest = 0, highest = 0;  // meaningful only when scores > 0
};
ScoreRange observed_score_range(const Population& population);

// Every usable score in ascending order, for where a threshold falls among
// them (a share reaching it, a percentile).
struct ScoreSample {
    std::vector<double> ascending;
    ScoreRange range() const;
    // Share of the scores >= threshold (0 when there are none).
    double share_at_or_above(double threshold) const;
    // The lowest score with at least `fraction` of the scores at or below it
    // (the inverse of the empirical distribution; Hyndman & Fan 1996, type 1).
    double percentile(double fraction) const;
};
ScoreSample observed_scores(const Population& population);

}  // namespace tocsin
