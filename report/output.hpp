#pragma once
// Writing results without ever leaving a partial set or a mix of two runs:
// everything is rendered in memory first, each file is written beside its
// final name and renamed into place only after every file was written. An
// output directory carries a manifest of what tocsin wrote there, so the next
// run can remove what it does not write again, and never touches anything else.
#include <string>
#include <utility>
#include <vector>

#include "report/table.hpp"

namespace tocsin {

// Lists, one file name a line, what the last run wrote into its directory.
inline constexpr const char* manifest_name = "tocsin-manifest.txt";

struct OutputFile {
    std::string name;     // file name inside the output directory
    std::string content;
};

// Adds `<table.name>.csv` and `<table.name>.json`.
void add_table_files(std::vector<OutputFile>& files, const Table& table);

// Throws std::invalid_argument, naming the directory, when `directory` could
// not take a run's files: it is not a directory, or it is a non-empty
// directory without a manifest (tocsin did not make it), or its manifest names
// something that is not a plain file name inside it. A missing or empty
// directory is fine. Call it before a long run to fail early.
void check_output_directory(const std::string& directory);

// Creates `directory` if needed and writes all files and the manifest, or
// none. After check_output_directory passes, files of the earlier run listed
// in its manifest and not written again are removed. On failure the partial
// files (and a directory this call created) are removed and
// std::runtime_error names the file.
void write_output_files(const std::string& directory, const std::vector<OutputFile>& files);

// One file at `path` (e.g. --report), written beside it and renamed into
// place; no manifest, nothing else in its directory is touched.
void write_output_file(const std::string& path, const std::string& content);

// On SIGINT, SIGTERM or SIGHUP, removes the partial files being written (and
// a directory made for them) and then dies of the same signal, so the exit
// status still says what happened. Signals already ignored stay ignored.
void remove_partial_outputs_on_signals();

}  // namespace tocsin
