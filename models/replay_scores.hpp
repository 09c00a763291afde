#pragma once
// Reading one score's values from a scores file: internal to models/replay*.cpp
// (load_replay calls it once per declared score).
#include <string>

#include "models/replay.hpp"
#include "models/replay_rows.hpp"

namespace tocsin::replay_rows {

// One score's column of a scores file, with what reading it needs.
struct ScoreFile {
    std::string path;
    std::string column = "score";
    double low = 0, high = 100;
    // The file holds other scores' columns too: an empty field means this
    // score was not recorded in that row (counted for this score), not a bad row.
    bool shared = false;
    // The file's first reading counts its notes (e.g. ambiguous local times);
    // a further column of the same file must not count them again.
    bool first_reading = true;
    std::string encounters_path{};
    Seconds latency_when_missing{};
    long long parallel_chunk_bytes{};
    BadRows bad_rows{};

    // How skipped rows are counted: "scores.csv" or "scores.csv, column bedside".
    std::string label() const;
};

// Reads `file` into score `score` of `pop` (0: the first; its values grouped by
// encounter in rule order, repeated rows resolved, skipped rows and exclusions
// counted). Encounters must be read already; `index` maps their ids.
void read_score_file(const ScoreFile& file, const TimeZone& zone, const IdIndex& index, Population& pop,
                     std::size_t score);

}  // namespace tocsin::replay_rows
