// The whole command line, end to end, phase by phase: runs the built `tocsin`
// itself (`check`, then `run --phases --out`) on a scenario and prints, for
// each command, its wall and CPU time and peak memory, and for the run the
// phases it timed itself (read, prepare, simulate, staff, evaluate, write),
// with the same code a user's run uses.
//   bench_end_to_end [SCENARIO] [--threads T] [--repeat N] [--beds B] [--days D] [--dir PATH]
// Without a scenario it writes a modest hospital (B beds, default 200, D days,
// default 90, scored every 15 minutes, one staffed role, 4 page plans) as a
// replayed log through `tocsin generate`, and uses that. With --repeat N each
// command runs N times and the fastest is reported (a shared machine's noise).
#include <sys/resource.h>
#include <sys/wait.h>
#include <fcntl.h>
#include <spawn.h>
#include <unistd.h>

#include <chrono>
#include <cstdio>
#include <ctime>
#include <filesystem>
#include <fstream>
#include <iostream>
#include <sstream>
#include <string>
#include <vector>

extern char** environ;

namespace {

struct Measured {
    double wall = 0, user = 0, sys = 0;
    long peak_mib = 0;
    int status = 0;
};

// Runs argv with stdout to `out_path` and stderr to `err_path`; the child's own resources.
Measured run(const std::vector<std::string>& args, const std::string& out_path, const std::string& err_path) {
    std::vector<char*> argv;
    for (const std::string& a : args) argv.push_back(const_cast<char*>(a.c_str()));
    argv.push_back(nullptr);
    posix_spawn_file_actions_t actions;
    posix_spawn_file_actions_init(&actions);
    posix_spawn_file_actions_addopen(&actions, 1, out_path.c_str(), O_WRONLY | O_CREAT | O_TRUNC, 0644);
    posix_spawn_file_actions_addopen(&actions, 2, err_path.c_str(), O_WRONLY | O_CREAT | O_TRUNC, 0644);
    const auto start = std::chrono::steady_clock::now();
    pid_t pid = 0;
    Measured m;
    if (posix_spawn(&pid, argv[0], &actions, nullptr, argv.data(), environ) != 0) {
        m.status = -1;
        return m;
    }
    rusage u{};
    wait4(pid, &m.status, 0, &u);
    posix_spawn_file_actions_destroy(&actions);
    m.wall = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
    m.user = static_cast<double>(u.ru_utime.tv_sec) + static_cast<double>(u.ru_utime.tv_usec) * 1e-6;
    m.sys = static_cast<double>(u.ru_stime.tv_sec) + static_cast<double>(u.ru_stime.tv_usec) * 1e-6;
    m.peak_mib = u.ru_maxrss / 1024;
    return m;
}

std::string read_file(const std::string& path) {
    std::ifstream in(path);
    std::stringstream s;
    s << in.rdbuf();
    return s.str();
}

const std::string bench_start = "2025-01-01 07:00:00";
const std::string shifts_and_outcome =
    "shifts:\n  - {name: day, starts: \"07:00\"}\n  - {name: night, starts: \"19:00\", night: true}\n"
    "outcome:\n  window_hours: 24\n  min_lead_minutes: 60\n";

// `days` days after bench_start, in the same form.
std::string bench_end(int days) {
    std::tm t{};
    t.tm_year = 125;
    t.tm_mday = 1 + days;
    t.tm_hour = 7;
    timegm(&t);
    char buf[32];
    std::strftime(buf, sizeof buf, "%Y-%m-%d %H:%M:%S", &t);
    return buf;
}

// A generated hospital of `beds` beds over `days` days, scored every 15 minutes.
std::string generator_scenario(int beds, int days) {
    std::string text = "scenario_schema: 1\nname: bench hospital (invented)\ntime_zone: UTC\nseed: 7\n" + shifts_and_outcome +
                       "population:\n  generate:\n    start: \"" + bench_start + "\"\n    end: \"" + bench_end(days) + "\"\n";
    std::ostringstream units;
    units << "    units:\n";
    for (int u = 0; u < beds / 25; ++u)
        units << "      - {name: \"Unit " << (u < 9 ? "0" : "") << u + 1 << "\", beds: 25, arrivals_per_hour: [0.3]}\n";
    text += units.str();
    text += "    stay: {distribution: lognormal, median_hours: 72, log_sd: 0.6}\n"
            "    outcome: {probability: 0.06, earliest_fraction: 0.1, latest_fraction: 1}\n"
            "    scores: {scale: points, cadence_minutes: 15, jitter_minutes: 3, missing_probability: 0.02,\n"
            "             latency_median_minutes: 3, latency_log_sd: 0.5, baseline: 25, between_patient_sd: 8,\n"
            "             within_patient_sd: 7, drift_onset_min_hours: 4, drift_onset_max_hours: 36, drift_size: 25}\n"
            "plans:\n  - {name: page-70, channel: page, rule: {threshold: 70, snooze_minutes: 240}}\n";
    return text;
}

// The replayed log's scenario: a year.yaml-like run of 4 page plans and one staffed role.
std::string replay_scenario(const std::string& from, const std::string& until) {
    return "scenario_schema: 1\nname: bench replay (invented)\ntime_zone: UTC\nseed: 7\n" + shifts_and_outcome +
           "reporting:\n  from: \"" + from + "\"\n  until: \"" + until + "\"\n"
           "population:\n  replay:\n    encounters: encounters.csv\n    scores: scores.csv\n"
           "    score_range: [0, 100]\n    max_stay_days: 365\n"
           "roles:\n  - name: rapid response nurse\n    team: hospital\n    roster: {day: 4, night: 3}\n"
           "    minutes: {distribution: gamma, mean: 20, sd: 8}\n"
           "plans:\n"
           "  - {name: page-50, channel: page, role: rapid response nurse, rule: {threshold: 50, snooze_minutes: 240}}\n"
           "  - {name: page-55-rise, channel: page, role: rapid response nurse, rule: {threshold: 55, snooze_minutes: 240, rise: 10}}\n"
           "  - {name: page-60-persist, channel: page, role: rapid response nurse, rule: {threshold: 60, snooze_minutes: 240, persistence: 2}}\n"
           "  - {name: page-70, channel: page, role: rapid response nurse, rule: {threshold: 70, snooze_minutes: 240}}\n";
}

void print(const std::string& what, const Measured& m) {
    std::printf("%-28s wall %6.2f s  CPU %6.2f s (user %.2f + sys %.2f)  peak %5ld MiB%s\n", what.c_str(), m.wall,
                m.user + m.sys, m.user, m.sys, m.peak_mib, m.status == 0 ? "" : "  FAILED");
}

}  // namespace

int main(int argc, char** argv) {
    std::string scenario, threads = "2";
    std::string dir = (std::filesystem::temp_directory_path() / "tocsin-bench-end-to-end").string();
    int repeat = 1, beds = 200, days = 90;
    for (int i = 1; i < argc; ++i) {
        const std::string a = argv[i];
        if (a == "--threads" && i + 1 < argc) threads = argv[++i];
        else if (a == "--repeat" && i + 1 < argc) repeat = std::max(1, std::stoi(argv[++i]));
        else if (a == "--beds" && i + 1 < argc) beds = std::stoi(argv[++i]);
        else if (a == "--days" && i + 1 < argc) days = std::stoi(argv[++i]);
        else if (a == "--dir" && i + 1 < argc) dir = argv[++i];
        else scenario = a;
    }
    const std::string tocsin = TOCSIN_BINARY;
    std::filesystem::create_directories(dir);
    if (scenario.empty()) {
        const std::string log_dir = dir + "/log";
        std::filesystem::remove_all(log_dir);
        std::ofstream(dir + "/generator.yaml") << generator_scenario(beds, days);
        const Measured g = run({tocsin, "generate", dir + "/generator.yaml", "--out", log_dir}, dir + "/generate.out",
                               dir + "/generate.err");
        if (g.status != 0) {
            std::cerr << "tocsin generate failed:\n" << read_file(dir + "/generate.err");
            return 1;
        }
        scenario = log_dir + "/scenario.yaml";
        std::ofstream(scenario) << replay_scenario(bench_start, bench_end(days));
        std::printf("generated %d beds x %d days (15-minute scores) in %s\n", beds, days, log_dir.c_str());
    }
    std::printf("scenario %s, --threads %s, best of %d\n", scenario.c_str(), threads.c_str(), repeat);
    Measured check, whole;
    std::string phases;
    for (int r = 0; r < repeat; ++r) {
        const Measured c = run({tocsin, "check", scenario}, dir + "/check.out", dir + "/check.err");
        if (r == 0 || c.wall < check.wall) check = c;
        const std::string out_dir = dir + "/out";
        std::filesystem::remove_all(out_dir);
        const Measured w = run({tocsin, "run", scenario, "--threads", threads, "--out", out_dir, "--phases"},
                               dir + "/run.out", dir + "/run.err");
        if (r == 0 || w.wall < whole.wall) {
            whole = w;
            phases = read_file(dir + "/run.err");
        }
    }
    print("tocsin check", check);
    print("tocsin run --threads " + threads, whole);
    std::printf("phases of that run (timed inside tocsin; peak memory is the process's so far):\n%s", phases.c_str());
    if (check.status != 0 || whole.status != 0) std::printf("see %s/*.err\n", dir.c_str());
    return check.status == 0 && whole.status == 0 ? 0 : 1;
}
