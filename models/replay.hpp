#pragma once
// Replay of a silent-mode log: an encounters CSV and a scores CSV, read into a
// Population. What is fatal and what is a counted exclusion:
//   fatal whole-file problems (InputError naming the file and line 1 or the
//     header line): unreadable file or a directory; missing or repeated
//     required column; no encounter rows; unterminated or stray quote.
//   bad rows (InputError naming file, line, column; or, with bad_rows: skip,
//     skipped and counted by reason with their first line numbers): wrong
//     number of fields; empty encounter id or unit; id or unit that is not
//     UTF-8 or holds a control character; bad timestamp; discharged not after
//     admitted; a stay longer than max_stay_days; an admission or discharge
//     far outside the rest of the log (see far_out_fence_iqr); outcome outside
//     [admitted, discharged]; repeated encounter id (skip keeps the first);
//     score for an unknown encounter (or one whose row was skipped); a score
//     that is not a finite number or lies outside score_range; available_at
//     before scored_at; two rows of one encounter with the same scored_at and
//     different scores (skip drops every row of the pair).
//   counted exclusions (reported by reason): scores available before
//     admission, at or after time zero, at or after discharge; a repeated
//     score row (same encounter, scored_at and score: the one available first
//     is kept).
//   several scores: each is read like the first (its own range, bad rows and
//     exclusions, counted for that score); in a file that holds several
//     scores' columns an empty field is "not recorded in this row" for that
//     score, counted, not a bad row.
//   counted notes: naive local times in a repeated hour (earlier taken) or a
//     skipped hour (moved forward); blank lines are skipped.
#include <string>

#include "models/population.hpp"
#include "models/time.hpp"

namespace tocsin {

// A further score on the same encounters (see OtherScore): a column of the
// scores file, or a file of its own with the same columns.
struct OtherScoreSource {
    std::string name;
    std::string path;              // the scores file itself when it is a column of it
    std::string column = "score";  // the column holding its values
    double score_low = 0, score_high = 100;
};

struct ReplaySource {
    std::string encounters_path;
    std::string scores_path;
    // Used for available_at when a row leaves it empty.
    Seconds latency_when_missing = 0;
    // Score logs larger than this are parsed in parallel chunks (one per core);
    // the result is the same either way. Tests set it small to exercise chunking.
    long long parallel_chunk_bytes = 32LL << 20;
    // A longer stay is a bad row (a mistyped year stretches the period).
    double max_stay_days = 365;
    // An admission or discharge more than this many interquartile ranges
    // (at least this many times 30 days) before the first or after the third
    // quartile of every admission and discharge of the log is a bad row:
    // Tukey's outer fences (k = 3, "far out", Tukey 1977), with the 30-day
    // floor (our choice, no source) so that a short log flags nothing near it.
    double far_out_fence_iqr = 3;
    // Scores outside [score_low, score_high] are bad rows.
    double score_low = 0, score_high = 100;
    BadRows bad_rows = BadRows::stop;
    // Patient-group columns of the encounters file, each required in its header.
    std::vector<GroupColumn> groups{};
    // Further scores, and then the first score's own name (plans choose by name).
    std::vector<OtherScoreSource> other_scores{};
    std::string score_name{};
};

Population load_replay(const ReplaySource& source, const TimeZone& zone);

}  // namespace tocsin
