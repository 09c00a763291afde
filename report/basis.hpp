#pragma once
// What each table's figures rest on: which replication or replications, and
// which stretch of time. A committee member reading "1.9 pages per ward per
// night" must know whether that is the log itself or a mean over resamples,
// and whether it counts the whole log or only the complete shifts.
#include <cstdint>
#include <string>
#include <vector>

#include "analysis/results.hpp"
#include "models/population_source.hpp"
#include "models/time.hpp"
#include "report/table.hpp"

namespace tocsin {

struct TableBases {
    std::string first;         // replication 0, counts over the whole log or generated period
    std::string input;         // replication 0, what was read and left out
    std::string first_shifts;  // replication 0, per-shift figures over the reporting shifts
    std::string first_scores;  // replication 0, every usable score and encounter (the evaluation)
    std::string replications;  // means over replications
    std::string every;         // patient-level logs of every replication
};

TableBases table_bases(const PopulationSetup& population, const PopulationSummary& first, std::uint64_t replications,
                       const TimeZone& zone);

// The index of the tables written (`tables.csv`): each table's file stem,
// title, basis and number of rows.
Table table_index(const std::vector<Table>& tables);

}  // namespace tocsin
