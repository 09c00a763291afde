#pragma once
// The reverse of replay.hpp: a Population as the two CSV files load_replay
// reads, so that a generated, resampled or stress-tested population can be
// inspected in a spreadsheet, kept, and replayed later without the generator.
//
// The promise is a round trip: load_replay on the written text, with the
// settings of replay_settings_for, gives back the same encounters in the same
// order, the same unit of each, every instant to the second, the same
// outcomes and the same usable scores in the same order, each value bit for
// bit. What the files cannot carry: the population's period (a log has none;
// the scenario's `reporting:` section restores it), its exclusion counts
// (turned-away arrivals, missing scores: nothing of them is in the rows), a
// unit without encounters, and the units' numbering (a replayed log numbers
// units by name).
//
// The text holds encounter ids, which are patient-level identifiers when the
// population comes from a real log (a bootstrap replication keeps the log's
// ids, with a suffix).
#include <string>
#include <string_view>

#include "models/population.hpp"
#include "models/replay.hpp"
#include "models/time.hpp"

namespace tocsin {

struct ReplayText {
    std::string encounters;  // encounter,unit,admitted,discharged,outcome_at
    std::string scores;      // encounter,scored_at,available_at,score
};

// Rows in population order; instants as local times of `zone` with their UTC
// offset (read the same whatever zone the replaying scenario declares);
// available_at always written (so no latency is added on reading); scores in
// the shortest form that reads back as the same double. Throws
// std::invalid_argument, naming the encounter, when load_replay would refuse
// a row or give a different population: an empty, repeated or unprintable id
// or unit name, a stay that does not end after it starts, an outcome outside
// the stay, a score that is not finite, not usable (outside admission to the
// end of the stay or time zero), available before it was scored, or a second
// score of one encounter at the same scored_at.
ReplayText replay_csv(const Population& population, const TimeZone& zone);

// Reader settings that accept every row replay_csv writes for `population`:
// score_range is [usual_low, usual_high] widened to every score,
// max_stay_days covers the longest stay, and the far-out fence is off (these
// instants were written by tocsin, not typed, and a long generated period
// need not look like one log). Everything else is the reader's default.
ReplaySource replay_settings_for(const Population& population, double usual_low, double usual_high,
                                 std::string encounters_path, std::string scores_path);

// Where a written population came from and how to report on it, for the
// scenario fragment.
struct ReplayFragmentInfo {
    std::string origin;                // e.g. "scenarios/generated.yaml, replication 0"
    std::string time_zone;             // the scenario's time_zone
    Instant report_from = 0;           // the reporting period the scenario used
    Instant report_until = 0;
};

// A YAML fragment (time_zone, reporting, population.replay with `settings`'
// paths and limits) to put in a scenario beside the files in place of its own
// population section. Timestamps as local times of `zone` with their offset.
std::string replay_scenario_fragment(const ReplaySource& settings, const ReplayFragmentInfo& info,
                                     const TimeZone& zone);

}  // namespace tocsin
