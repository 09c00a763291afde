#include "analysis/output.hpp"

#include <cstdio>
#include <filesystem>
#include <fstream>
#include <stdexcept>
#include <system_error>

namespace tocsin {

void add_table_files(std::vector<OutputFile>& files, const Table& table) {
    files.push_back({table.name + ".csv", to_csv(table)});
    files.push_back({table.name + ".json", to_json(table)});
}

void write_output_files(const std::string& directory, const std::vector<OutputFile>& files) {
    namespace fs = std::filesystem;
    std::error_code ec;
    fs::create_directories(directory, ec);
    if (ec) throw std::runtime_error("cannot create output directory " + directory + ": " + ec.message());
    std::vector<fs::path> written;
    auto clean = [&] {
        for (const auto& p : written) fs::remove(p, ec);
    };
    for (const OutputFile& f : files) {
        fs::path tmp = fs::path(directory) / ("." + f.name + ".partial");
        std::ofstream out(tmp, std::ios::binary);
        out.write(f.content.data(), static_cast<std::streamsize>(f.content.size()));
        out.close();
        if (!out) {
            written.push_back(tmp);
            clean();
            throw std::runtime_error("cannot write " + tmp.string());
        }
        written.push_back(tmp);
    }
    for (std::size_t i = 0; i < files.size(); ++i) {
        fs::rename(written[i], fs::path(directory) / files[i].name, ec);
        if (ec) {
            clean();
            throw std::runtime_error("cannot move " + written[i].string() + " into place: " + ec.message());
        }
    }
}

}  // namespace tocsin
