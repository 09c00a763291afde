#pragma once
// Small helpers shared by tests: a scratch directory that cleans up after
// itself, and running the built command-line tool.
#include <cstdio>
#include <sys/wait.h>
#include <unistd.h>
#include <filesystem>
#include <fstream>
#include <random>
#include <sstream>
#include <string>

#include <doctest/doctest.h>

#include "models/errors.hpp"
#include "study/run.hpp"
#include "study/scenario.hpp"

namespace tocsin::testing {

class ScratchDir {
public:
    ScratchDir() {
        static int counter = 0;
        path_ = std::filesystem::temp_directory_path() /
                ("tocsin-test-" + std::to_string(::getpid()) + "-" + std::to_string(counter++));
        std::filesystem::remove_all(path_);
        std::filesystem::create_directories(path_);
    }
    ~ScratchDir() { std::filesystem::remove_all(path_); }
    ScratchDir(const ScratchDir&) = delete;
    ScratchDir& operator=(const ScratchDir&) = delete;

    std::string file(const std::string& name, const std::string& content) const {
        const auto p = path_ / name;
        std::filesystem::create_directories(p.parent_path());
        std::ofstream(p, std::ios::binary) << content;
        return p.string();
    }
    std::string path(const std::string& name = "") const { return (path_ / name).string(); }

private:
    std::filesystem::path path_;
};

inline std::string read_file(const std::string& path) {
    std::ifstream in(path, std::ios::binary);
    std::stringstream s;
    s << in.rdbuf();
    return s.str();
}

struct CommandResult {
    int exit_code = -1;
    std::string output;  // stdout and stderr together
};

inline CommandResult run_command(const std::string& command) {
    CommandResult r;
    FILE* pipe = ::popen((command + " 2>&1").c_str(), "r");
    if (!pipe) return r;
    char buf[4096];
    std::size_t n;
    while ((n = std::fread(buf, 1, sizeof buf, pipe)) > 0) r.output.append(buf, n);
    const int status = ::pclose(pipe);
    r.exit_code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
    return r;
}

// The InputError that loading `yaml` as a scenario file named s.yaml raises
// (the test fails when it loads).
inline InputError scenario_error(const std::string& yaml) {
    try {
        parse_scenario(yaml, "s.yaml", "");
    } catch (const InputError& e) {
        return e;
    }
    FAIL("expected an InputError");
    return InputError("", 0, 0, "", "");
}

// A run of two threads that keeps the notice and task logs and skips the model
// evaluation: what the tests comparing whole runs table by table use.
inline RunSettings logged_run_settings() {
    RunSettings settings;
    settings.threads = 2;
    settings.notice_log = true;
    settings.task_log = true;
    settings.evaluate = false;
    return settings;
}

inline CommandResult run_tocsin(const std::string& args) { return run_command(std::string(TOCSIN_BINARY) + " " + args); }

}  // namespace tocsin::testing
