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

// A further score on the same encounters: the score in use today beside a
// candidate, or two candidates. Its usable scores are grouped and ordered like
// Population::scores, and what was excluded is counted for it alone, since one
// score may be missing where the other is present.
struct OtherScore {
    std::string name;  // what a plan's `score` names
    std::vector<Score> scores{};
    std::vector<std::size_t> score_start{};
    std::map<std::string, std::int64_t> excluded_by_reason{};
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

    // The first score's name when other scores are declared ("" otherwise),
    // and the others, in the scenario's order: score k > 0 is other_scores[k - 1].
    std::string score_name;
    std::vector<OtherScore> other_scores;

    std::span<const Score> scores_of(std::size_t encounter) const {
        return {scores.data() + score_start[encounter], score_start[encounter + 1] - score_start[encounter]};
    }
    std::span<const Score> scores_of(std::size_t encounter, std::size_t score) const {
        if (score == 0) return scores_of(encounter);
        const OtherScore& o = other_scores[score - 1];
        return {o.scores.data() + o.score_start[encounter], o.score_start[encounter + 1] - o.score_start[encounter]};
    }
    std::size_t score_count() const { return 1 + other_scores.size(); }
    // End of the interval in which scores are usable: min(discharged, outcome_at).
    static Instant usable_until(const Encounter& e) {
        return e.outcome_at && *e.outcome_at < e.discharged ? *e.outcome_at : e.discharged;
    }
};

// Rebuild score `score`'s values and offsets (0: Population::scores and
// score_start) from a per-value encounter index, sorting each encounter's
// values into rule order. `owner[i]` is the encounter of `values[i]`; source
// order breaks ties.
void group_scores_by_encounter(Population& population, std::vector<Score>& values,
                               std::vector<std::uint32_t>& owner, std::size_t score = 0);

// Remove every score's values outside [admitted, min(discharged, outcome_at))
// and count them by reason, for each score apart. Assumes values are grouped.
void apply_score_exclusions(Population& population);

// Exchanges the first score with score `score` (names, values, offsets and
// exclusion counts; constant time), so that code written for the first score
// serves any; doing it twice restores the population.
void swap_first_score(Population& population, std::size_t score);

// A copy of `population` whose only score is its score `score`, under that
// score's name: what measures of one score read.
Population with_only_score(const Population& population, std::size_t score);

// The index of the score called `name` (the first score answers to its own
// name and to ""), or nullopt.
std::optional<std::size_t> score_index(const Population& population, const std::string& name);

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
ScoreSample observed_scores(const Population& population, std::size_t score = 0);

}  // namespace tocsin
