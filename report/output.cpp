#include "report/output.hpp"

#include <algorithm>
#include <atomic>
#include <cerrno>
#include <csignal>
#include <cstdlib>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <iostream>
#include <optional>
#include <sstream>
#include <stdexcept>
#include <system_error>

#include <fcntl.h>
#include <pthread.h>
#include <unistd.h>

namespace tocsin {

namespace fs = std::filesystem;

void add_table_files(std::vector<OutputFile>& files, const Table& table) {
    files.push_back({table.name + ".csv", to_csv(table)});
    files.push_back({table.name + ".json", to_json(table)});
}

namespace {

// The paths a signal handler must remove. This is the only global state in
// the library, because a handler can reach nothing else: it may not allocate
// or lock, so the paths sit in a fixed buffer as entries "f<path>\0" (a file to
// unlink) or "d<path>\0" (a directory to rmdir), and `published` says how many
// bytes hold complete entries. Files are written only after the worker
// threads have finished, so the handler interrupts the one thread that
// appends here and sees either the old or the new length.
constexpr std::size_t cleanup_capacity = 1 << 20;
char cleanup_paths[cleanup_capacity];
std::atomic<std::size_t> published{0};
static_assert(std::atomic<std::size_t>::is_always_lock_free, "read from a signal handler");

void remember_for_cleanup(char kind, const fs::path& path) {
    const std::string& p = path.native();
    const std::size_t at = published.load();
    if (at + p.size() + 2 > cleanup_capacity)
        throw std::runtime_error("cannot write " + p + ": too many output files to track for removal on interruption");
    cleanup_paths[at] = kind;
    std::memcpy(cleanup_paths + at + 1, p.c_str(), p.size() + 1);
    published.store(at + p.size() + 2);
}

// Removes the remembered entries of one kind between two buffer offsets.
void remove_remembered(char kind, std::size_t from, std::size_t end) {
    for (std::size_t at = from; at < end;) {
        const char* path = cleanup_paths + at + 1;
        if (cleanup_paths[at] == kind) {
            if (kind == 'f') ::unlink(path);
            else ::rmdir(path);
        }
        at += 2 + std::strlen(path);
    }
}

extern "C" void remove_partials_and_die(int signal) {
    // unlink, rmdir, signal and raise are async-signal-safe (POSIX 2.4.3).
    const std::size_t end = published.load();
    remove_remembered('f', 0, end);
    remove_remembered('d', 0, end);  // directories last, deepest first, and only if now empty
    std::signal(signal, SIG_DFL);
    std::raise(signal);  // blocked until this handler returns, then fatal
}

constexpr int cleanup_signals[] = {SIGINT, SIGTERM, SIGHUP};

// Holds SIGINT, SIGTERM and SIGHUP back while files are renamed into place
// and the earlier run's files removed, so an interruption finds the directory
// holding either the earlier run or this one, never half of each.
class HoldSignals {
public:
    HoldSignals() {
        sigset_t held;
        sigemptyset(&held);
        for (int s : cleanup_signals) sigaddset(&held, s);
        pthread_sigmask(SIG_BLOCK, &held, &before_);
    }
    ~HoldSignals() { pthread_sigmask(SIG_SETMASK, &before_, nullptr); }
    HoldSignals(const HoldSignals&) = delete;
    HoldSignals& operator=(const HoldSignals&) = delete;

private:
    sigset_t before_;
};

// The paths remembered since construction are forgotten at destruction, so
// the buffer does not grow with every write of a long-lived process. On
// failure (destruction without commit) the files and directories are removed.
class PartialSet {
public:
    PartialSet() : mark_(published.load()) {}
    ~PartialSet() {
        if (!committed_) {
            const std::size_t end = published.load();
            remove_remembered('f', mark_, end);
            remove_remembered('d', mark_, end);
        }
        published.store(mark_);
    }
    PartialSet(const PartialSet&) = delete;
    PartialSet& operator=(const PartialSet&) = delete;

    void file(const fs::path& p) { remember_for_cleanup('f', p); }
    // Creates `directory` and any missing parents, remembering each one made.
    void make_directories(const fs::path& directory) {
        std::vector<fs::path> missing;
        for (fs::path p = directory; !p.empty() && !fs::exists(fs::symlink_status(p)); p = p.parent_path()) {
            missing.push_back(p);
            if (p == p.parent_path()) break;
        }
        // Remembered before they exist (deepest first), so no interruption
        // falls between making one and remembering it.
        for (const fs::path& p : missing) remember_for_cleanup('d', p);
        for (auto it = missing.rbegin(); it != missing.rend(); ++it) {
            std::error_code ec;
            fs::create_directory(*it, ec);
            if (ec) throw std::runtime_error("cannot create output directory " + it->string() + ": " + ec.message());
        }
    }
    void commit() { committed_ = true; }

private:
    std::size_t mark_;
    bool committed_ = false;
};

fs::path partial_path(const fs::path& directory, const std::string& name) {
    return directory / ("." + name + ".partial");
}

// Writes `content` to a fresh file at `path`. Whatever was there is removed
// first and the file is created exclusively, so a symbolic link planted at a
// partial name is never followed.
void write_fresh(const fs::path& path, const std::string& content) {
    ::unlink(path.c_str());
    const int fd = ::open(path.c_str(), O_WRONLY | O_CREAT | O_EXCL | O_NOFOLLOW | O_CLOEXEC, 0666);
    if (fd < 0) throw std::runtime_error("cannot write " + path.string() + ": " + std::strerror(errno));
    std::size_t done = 0;
    while (done < content.size()) {
        const ssize_t n = ::write(fd, content.data() + done, content.size() - done);
        if (n < 0 && errno == EINTR) continue;
        if (n <= 0) {
            const std::string why = std::strerror(n < 0 ? errno : ENOSPC);
            ::close(fd);
            throw std::runtime_error("cannot write " + path.string() + ": " + why);
        }
        done += static_cast<std::size_t>(n);
    }
    if (::close(fd) != 0) throw std::runtime_error("cannot write " + path.string() + ": " + std::strerror(errno));
}

void move_into_place(const fs::path& from, const fs::path& to) {
    std::error_code ec;
    fs::rename(from, to, ec);
    if (ec) throw std::runtime_error("cannot move " + from.string() + " into place: " + ec.message());
}

// A manifest entry must name a file directly inside the directory.
bool plain_file_name(const std::string& name) {
    return !name.empty() && name.find('/') == std::string::npos && name.find("..") == std::string::npos &&
           name.find('\0') == std::string::npos && name != ".";
}

// The earlier run's file names, or nothing when the directory is missing or
// empty. Throws std::invalid_argument when tocsin should not write there.
std::optional<std::vector<std::string>> earlier_run(const fs::path& directory) {
    std::error_code ec;
    const fs::file_status status = fs::status(directory, ec);
    if (!fs::exists(status)) return std::nullopt;
    if (!fs::is_directory(status))
        throw std::invalid_argument("output directory " + directory.string() + " exists and is not a directory");
    if (fs::is_empty(directory, ec)) return std::nullopt;
    const fs::path manifest = directory / manifest_name;
    if (!fs::is_regular_file(fs::symlink_status(manifest)))
        throw std::invalid_argument("output directory " + directory.string() + " is not empty and holds no " +
                                    manifest_name + ", so tocsin did not write it; choose a new or empty directory");
    std::ifstream in(manifest, std::ios::binary);
    std::vector<std::string> names;
    int line_number = 0;
    for (std::string line; std::getline(in, line);) {
        ++line_number;
        if (line.empty() || line[0] == '#') continue;
        if (!plain_file_name(line))
            throw std::invalid_argument(manifest.string() + ":" + std::to_string(line_number) + ": '" + valid_utf8(line) +
                                        "' is not a plain file name inside the directory; tocsin will not touch it "
                                        "(fix or remove the manifest)");
        if (line != manifest_name) names.push_back(line);
    }
    if (in.bad()) throw std::runtime_error("cannot read " + manifest.string());
    return names;
}

std::string manifest_text(const std::vector<std::string>& names) {
    std::string text =
        "# tocsin output manifest: the files tocsin wrote into this directory. The next run\n"
        "# into it removes those it does not write again and touches nothing else.\n";
    for (const std::string& n : names) text += n + "\n";
    return text;
}

// A hook for the interruption test only: with TOCSIN_PAUSE_BEFORE_COMMIT=S
// the writer stops for S seconds once every partial file is written, which is
// the moment an interruption has the most to clean up.
void pause_for_test() {
    const char* seconds = std::getenv("TOCSIN_PAUSE_BEFORE_COMMIT");
    if (!seconds || !*seconds) return;
    std::cerr << "tocsin: every partial file written; pausing " << seconds << " s before renaming them" << std::endl;
    ::sleep(static_cast<unsigned>(std::strtoul(seconds, nullptr, 10)));
}

}  // namespace

void check_output_directory(const std::string& directory) { earlier_run(directory); }

void write_output_files(const std::string& directory_name, const std::vector<OutputFile>& files) {
    const fs::path directory(directory_name);
    std::vector<std::string> names;
    for (const OutputFile& f : files) {
        if (!plain_file_name(f.name) || f.name == manifest_name)
            throw std::logic_error("output file name '" + f.name + "' is not a plain file name");
        if (std::find(names.begin(), names.end(), f.name) != names.end())
            throw std::logic_error("output file " + f.name + " would be written twice");
        names.push_back(f.name);
    }
    const std::optional<std::vector<std::string>> earlier = earlier_run(directory);
    std::vector<std::string> stale;  // the earlier run's files this run does not write
    if (earlier)
        for (const std::string& n : *earlier)
            if (std::find(names.begin(), names.end(), n) == names.end()) stale.push_back(n);
    // Until the old files are gone, the manifest lists both runs, so even a
    // run killed outright (SIGKILL, power) leaves every file tocsin wrote listed.
    std::vector<std::string> both = names;
    both.insert(both.end(), stale.begin(), stale.end());

    PartialSet partials;
    partials.make_directories(directory);
    for (const OutputFile& f : files) partials.file(partial_path(directory, f.name));
    const fs::path manifest_partial = partial_path(directory, manifest_name);
    partials.file(manifest_partial);
    for (const OutputFile& f : files) write_fresh(partial_path(directory, f.name), f.content);
    write_fresh(manifest_partial, manifest_text(both));
    pause_for_test();

    const HoldSignals held;
    move_into_place(manifest_partial, directory / manifest_name);
    for (const OutputFile& f : files) move_into_place(partial_path(directory, f.name), directory / f.name);
    for (const std::string& n : stale) {
        // Only files and links: a directory under a listed name is not ours.
        // A partial file of the same name can only be left by a run killed
        // outright (SIGKILL, power), and goes too.
        for (const fs::path& p : {directory / n, partial_path(directory, n)}) {
            const fs::file_status s = fs::symlink_status(p);
            std::error_code ec;
            if (fs::is_regular_file(s) || fs::is_symlink(s)) fs::remove(p, ec);
        }
    }
    write_fresh(manifest_partial, manifest_text(names));
    move_into_place(manifest_partial, directory / manifest_name);
    partials.commit();
}

void write_output_file(const std::string& path_name, const std::string& content) {
    const fs::path path(path_name);
    const fs::path directory = path.has_parent_path() ? path.parent_path() : fs::path(".");
    PartialSet partials;
    partials.make_directories(directory);
    const fs::path partial = partial_path(directory, path.filename().string());
    partials.file(partial);
    write_fresh(partial, content);
    const HoldSignals held;
    move_into_place(partial, path);
    partials.commit();
}

void remove_partial_outputs_on_signals() {
    struct sigaction action {};
    action.sa_handler = remove_partials_and_die;
    sigemptyset(&action.sa_mask);
    for (int s : cleanup_signals) sigaddset(&action.sa_mask, s);
    for (int s : cleanup_signals) {
        struct sigaction previous {};
        sigaction(s, nullptr, &previous);
        if (previous.sa_handler == SIG_IGN) continue;  // e.g. SIGHUP under nohup
        sigaction(s, &action, nullptr);
    }
}

}  // namespace tocsin
