#pragma once
// The files a run writes: its tables as CSV and JSON, the cautions, and the
// run record.
#include <string>
#include <vector>

#include "report/output.hpp"
#include "study/run.hpp"

namespace tocsin {

// The machine-readable record of a run: tool version, scenario file and hash,
// seed, replications, threads and time taken. It is the one output that
// differs between identical runs (threads, time).
std::string run_record_json(const Scenario& scenario, const RunSettings& settings, double seconds);

// Every output file of a run: its tables as CSV and JSON (with `more`, tables
// the caller made, their basis set), tables.csv indexing them, the cautions.
std::vector<OutputFile> run_output_files(const Scenario& scenario, const RunOutput& output, const RunSettings& settings,
                                         std::vector<Table> more = {});

}  // namespace tocsin
