#pragma once
// Writing results without ever leaving a partial set: everything is rendered
// in memory first, each file is written beside its final name and renamed
// into place only after every file was written successfully.
#include <string>
#include <utility>
#include <vector>

#include "analysis/table.hpp"

namespace tocsin {

struct OutputFile {
    std::string name;     // file name inside the output directory
    std::string content;
};

// Adds `<table.name>.csv` and `<table.name>.json`.
void add_table_files(std::vector<OutputFile>& files, const Table& table);

// Creates `directory` if needed and writes all files, or none: on failure the
// temporary files are removed and std::runtime_error names the file.
void write_output_files(const std::string& directory, const std::vector<OutputFile>& files);

}  // namespace tocsin
