#pragma once
// Running the outside reference scripts (tests/reference/) from a test and
// reading what they print: "key number..." lines.
#include <cstdio>
#include <cstdlib>
#include <map>
#include <sstream>
#include <string>
#include <vector>

#include <doctest/doctest.h>

namespace tocsin::reference {

inline bool command_succeeds(const std::string& command) { return std::system((command + " >/dev/null 2>&1").c_str()) == 0; }

// Runs a command and returns its standard output.
inline std::string run(const std::string& command) {
    std::string output;
    FILE* pipe = ::popen(command.c_str(), "r");
    REQUIRE(pipe != nullptr);
    char buffer[4096];
    while (std::fgets(buffer, sizeof buffer, pipe)) output += buffer;
    const int status = ::pclose(pipe);
    INFO("command: " << command << "\noutput:\n" << output);
    REQUIRE(status == 0);
    return output;
}

// "key... number..." lines -> map. The key is every leading token named in
// `key_tokens` (by first word); the rest are numbers.
inline std::map<std::string, std::vector<double>> parse(const std::string& output) {
    const std::map<std::string, int> key_tokens{{"counts", 2}, {"wilson", 3}};
    std::map<std::string, std::vector<double>> out;
    std::istringstream lines(output);
    std::string line;
    while (std::getline(lines, line)) {
        std::istringstream words(line);
        std::string first;
        if (!(words >> first)) continue;
        std::string key = first;
        const auto it = key_tokens.find(first);
        for (int k = 1; it != key_tokens.end() && k < it->second; ++k) {
            std::string w;
            words >> w;
            key += " " + w;
        }
        std::string number;
        while (words >> number) out[key].push_back(std::stod(number));
    }
    return out;
}

inline const std::string python = "/usr/bin/python3";
inline const std::string reference_dir = std::string(TOCSIN_SOURCE_DIR) + "/tests/reference/";

}  // namespace tocsin::reference
