#pragma once
// Replay of a silent-mode log: an encounters CSV and a scores CSV, read into a
// Population. What is fatal and what is a counted exclusion:
//   fatal (InputError naming file, line, column): unreadable file; missing or
//     repeated required column; wrong number of fields; unterminated quote;
//     empty encounter id or unit; bad timestamp; discharged not after
//     admitted; outcome outside [admitted, discharged]; duplicate encounter
//     id; score for an unknown encounter; non-numeric or non-finite score;
//     available_at before scored_at.
//   counted exclusions (reported by reason): scores available before
//     admission, at or after time zero, at or after discharge.
//   counted notes: naive local times in a repeated hour (earlier taken) or a
//     skipped hour (moved forward); blank lines are skipped.
#include <string>

#include "models/population.hpp"
#include "models/time.hpp"

namespace tocsin {

struct ReplaySource {
    std::string encounters_path;
    std::string scores_path;
    // Used for available_at when a row leaves it empty.
    Seconds latency_when_missing = 0;
    // Score logs larger than this are parsed in parallel chunks (one per core);
    // the result is the same either way. Tests set it small to exercise chunking.
    long long parallel_chunk_bytes = 32LL << 20;
};

Population load_replay(const ReplaySource& source, const TimeZone& zone);

}  // namespace tocsin
