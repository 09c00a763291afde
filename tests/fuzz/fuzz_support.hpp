#pragma once
// Shared by the libFuzzer harnesses: a scratch directory for the files the
// loaders read, and the way a broken property is reported.
#include <unistd.h>

#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <string>
#include <string_view>

namespace tocsin::fuzz {

// libFuzzer saves the input that made the process abort; the message says
// which property failed, so a finding reads differently from a crash.
[[noreturn]] inline void broken(const std::string& what) {
    std::fprintf(stderr, "PROPERTY BROKEN: %s\n", what.c_str());
    std::fflush(stderr);
    std::abort();
}

// One directory per fuzzing process, reused for every input: the loaders
// take paths, and creating a directory per input would cost more than the
// parse being tested.
class Scratch {
public:
    Scratch() {
        std::string pattern = (std::filesystem::temp_directory_path() / "tocsin-fuzz-XXXXXX").string();
        if (!::mkdtemp(pattern.data())) broken("cannot create a scratch directory");
        dir_ = pattern;
    }
    ~Scratch() {
        std::error_code ignored;
        std::filesystem::remove_all(dir_, ignored);
    }
    Scratch(const Scratch&) = delete;
    Scratch& operator=(const Scratch&) = delete;

    std::string write(const std::string& name, std::string_view content) const {
        const std::string path = (dir_ / name).string();
        std::ofstream out(path, std::ios::binary | std::ios::trunc);
        out.write(content.data(), static_cast<std::streamsize>(content.size()));
        if (!out) broken("cannot write " + path);
        return path;
    }
    const std::filesystem::path& dir() const { return dir_; }

private:
    std::filesystem::path dir_;
};

inline const Scratch& scratch() {
    static const Scratch s;
    return s;
}

}  // namespace tocsin::fuzz
