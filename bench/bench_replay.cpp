// Ingest and replay at the scale of a large health system: a one-year log for
// 1,000 beds scored every 15 minutes (about 35 million score rows). Writes the
// log to a scratch directory, then reports ingest rows/s, replay score
// evaluations/s for 4 plans, and the peak resident memory.
//   bench_replay [--beds N] [--days D] [--dir PATH] [--threads T] [--keep]
#include <sys/resource.h>

#include <chrono>
#include <cstdio>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <iostream>
#include <string>
#include <thread>

#include <boost/random/uniform_real_distribution.hpp>

#include "analysis/results.hpp"
#include "report/run_tables.hpp"
#include "models/random_streams.hpp"
#include "models/replay.hpp"
#include "sim/simulate.hpp"
#include "study/scenario.hpp"

using namespace tocsin;

namespace {

double seconds_since(std::chrono::steady_clock::time_point t0) {
    return std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
}

long peak_rss_mib() {
    rusage u{};
    getrusage(RUSAGE_SELF, &u);
    return u.ru_maxrss / 1024;
}

// Writes "YYYY-MM-DDTHH:MM:SSZ" into out (20 chars).
void put_time(char* out, Instant t) {
    static thread_local std::int64_t cached_day = INT64_MIN;
    static thread_local char day_text[11];
    const std::int64_t day = t / 86400;
    if (day != cached_day) {
        const CivilTime c = civil_from_instant(t);
        std::snprintf(day_text, sizeof day_text, "%04d-%02d-%02d", c.year, c.month, c.day);
        cached_day = day;
    }
    std::memcpy(out, day_text, 10);
    const int s = static_cast<int>(t - day * 86400);
    const int h = s / 3600, m = (s / 60) % 60, sec = s % 60;
    out[10] = 'T';
    out[11] = static_cast<char>('0' + h / 10); out[12] = static_cast<char>('0' + h % 10); out[13] = ':';
    out[14] = static_cast<char>('0' + m / 10); out[15] = static_cast<char>('0' + m % 10); out[16] = ':';
    out[17] = static_cast<char>('0' + sec / 10); out[18] = static_cast<char>('0' + sec % 10); out[19] = 'Z';
}

std::size_t write_log(const std::string& dir, int beds, int days) {
    const Instant start = days_from_civil(2025, 1, 1) * 86400, end = start + days * 86400LL;
    RandomEngine rng = make_stream(7, 0, StreamPurpose::trajectory, 0);
    boost::random::uniform_real_distribution<double> u(0.0, 1.0);
    std::ofstream enc(dir + "/encounters.csv"), sc(dir + "/scores.csv");
    std::vector<char> ebuf(1 << 20), sbuf(1 << 24);
    enc.rdbuf()->pubsetbuf(ebuf.data(), static_cast<std::streamsize>(ebuf.size()));
    sc.rdbuf()->pubsetbuf(sbuf.data(), static_cast<std::streamsize>(sbuf.size()));
    enc << "encounter,unit,admitted,discharged,outcome_at\n";
    sc << "encounter,scored_at,available_at,score\n";
    std::size_t rows = 0, serial = 0;
    char line[128];
    for (int bed = 0; bed < beds; ++bed) {
        const int unit = bed / 40;
        Instant t = start - static_cast<Instant>(u(rng) * 4 * 86400);
        while (t < end) {
            const Instant stay = static_cast<Instant>((1.0 + 6.0 * u(rng)) * 86400);
            const bool outcome = u(rng) < 0.05;
            const Instant admitted = t, discharged = t + stay;
            const Instant t0 = admitted + stay * 9 / 10;
            char id[16];
            std::snprintf(id, sizeof id, "E%07zu", ++serial);
            char a[21] = {}, d[21] = {}, o[21] = {};
            put_time(a, admitted);
            put_time(d, discharged);
            if (outcome) put_time(o, t0);
            enc << id << ",U" << unit << "," << a << "," << d << "," << (outcome ? o : "") << "\n";
            const double base = 20 + 20 * u(rng);
            for (Instant s = admitted + 600; s < discharged; s += 900) {
                if (s < start || s >= end) continue;
                double v = base + 20 * u(rng);
                if (outcome && s > t0 - 12 * 3600 && s < t0) v += 40.0 * static_cast<double>(s - (t0 - 12 * 3600)) / 43200.0;
                char* p = line;
                const std::size_t n = std::strlen(id);
                std::memcpy(p, id, n); p += n; *p++ = ',';
                put_time(p, s); p += 20; *p++ = ',';
                put_time(p, s + 120); p += 20; *p++ = ',';
                const int tenths = static_cast<int>(v * 10);
                p += std::snprintf(p, 16, "%d.%d\n", tenths / 10, tenths % 10);
                sc.write(line, p - line);
                ++rows;
            }
            t = discharged + static_cast<Instant>(u(rng) * 6 * 3600);
        }
    }
    return rows;
}

Scenario bench_scenario(const std::string& dir) {
    Scenario sc;
    sc.name = "benchmark";
    sc.simulation.shifts = ShiftPattern{{7 * 60, 19 * 60}, {"day", "night"}, {false, true}};
    sc.population.replay = ReplaySource{dir + "/encounters.csv", dir + "/scores.csv", 0};
    sc.analysis.window = hours(24);
    sc.analysis.min_lead = hours(1);
    const double thresholds[] = {50, 55, 60, 70};
    for (int i = 0; i < 4; ++i) {
        Plan p;
        p.name = "plan" + std::to_string(i);
        p.rule.threshold = thresholds[i];
        p.rule.snooze = hours(4);
        if (i == 1) p.rule.rise = 10;
        if (i == 2) { p.rule.persistence = 2; p.rule.rearm_below = 45; p.rule.max_per_shift = 2; }
        if (i == 3) p.staffing.discipline = QueueDiscipline::priority_by_score;
        sc.simulation.plans.push_back(p);
    }
    return sc;
}

// Ward nurses on each unit, a charge nurse on each unit, a hospital rapid-response team.
std::vector<Role> bench_roles() {
    auto role = [](std::string name, bool per_unit, std::vector<int> by_shift, ServiceTime minutes) {
        Role r;
        r.name = std::move(name);
        r.per_unit = per_unit;
        r.roster.by_shift = std::move(by_shift);
        r.minutes_per_task = std::move(minutes);
        return r;
    };
    return {role("ward nurse", true, {5, 3}, GammaMinutes{15, 8}),
            role("charge nurse", true, {1, 1}, LognormalMinutes{10, 1.5}),
            role("rapid response nurse", false, {2, 2}, ExponentialMinutes{30})};
}

}  // namespace

int main(int argc, char** argv) {
    int beds = 1000, days = 365;
    unsigned threads = std::max(1u, std::thread::hardware_concurrency());
    std::string dir = (std::filesystem::temp_directory_path() / "tocsin-bench-replay").string();
    bool keep = false;
    for (int i = 1; i < argc; ++i) {
        std::string a = argv[i];
        if (a == "--beds" && i + 1 < argc) beds = std::stoi(argv[++i]);
        else if (a == "--days" && i + 1 < argc) days = std::stoi(argv[++i]);
        else if (a == "--dir" && i + 1 < argc) dir = argv[++i];
        else if (a == "--threads" && i + 1 < argc) threads = static_cast<unsigned>(std::stoi(argv[++i]));
        else if (a == "--keep") keep = true;
    }
    std::filesystem::create_directories(dir);
    const bool have = std::filesystem::exists(dir + "/scores.csv") && keep;
    auto t = std::chrono::steady_clock::now();
    if (!have) {
        const std::size_t rows = write_log(dir, beds, days);
        std::printf("wrote %zu score rows for %d beds x %d days in %.1f s\n", rows, beds, days, seconds_since(t));
    }
    const Scenario sc = bench_scenario(dir);
    t = std::chrono::steady_clock::now();
    const Population pop = load_replay(sc.population.replay, TimeZone::utc());
    const double ingest = seconds_since(t);
    const double rows = static_cast<double>(pop.scores.size() + pop.excluded.total_scores());
    std::printf("ingest: %.0f score rows + %zu encounters in %.2f s = %.2f million rows/s; peak RSS so far %ld MiB\n",
                rows, pop.encounters.size(), ingest, rows / ingest / 1e6, peak_rss_mib());
    t = std::chrono::steady_clock::now();
    const ShiftCalendar cal = calendar_for(sc, pop);
    const ReplicationRecord rec = simulate_replication(sc.simulation, pop, cal, 0, threads);
    const double replay = seconds_since(t);
    std::size_t notices = 0;
    for (const auto& p : rec.plans) notices += p.notices.size();
    std::printf("replay: 4 plans x %zu scores in %.2f s (%u threads) = %.1f million score evaluations/s; %zu notices\n",
                pop.scores.size(), replay, threads, 4.0 * static_cast<double>(pop.scores.size()) / replay / 1e6, notices);
    t = std::chrono::steady_clock::now();
    const RunTables tables = run_tables(replication_results(sc.simulation, sc.analysis, pop, cal, rec, false), sc.simulation.zone);
    std::printf("results: tables in %.2f s; replay + results %.2f s\n", seconds_since(t), replay + seconds_since(t));
    // The same replay with staff and escalation (issue 3's speed goal: under 2x the time without).
    Scenario staffed = sc;
    staffed.simulation.roles = bench_roles();
    const std::vector<std::string> role_names = {"ward nurse", "charge nurse", "rapid response nurse"};
    const std::vector<EscalationEdge> edges = {{"ward nurse", "charge nurse", 10},
                                               {"charge nurse", "rapid response nurse", 15}};
    staffed.simulation.escalation = build_escalation_graph(role_names, edges, roles_ever_staffed(staffed.simulation.roles));
    // Best of five runs each, alternating, so a busy machine hurts both alike;
    // each record is freed outside the timed region.
    double without_staff = replay, with_staff = 1e300;
    ReplicationRecord staffed_rec;
    for (int repeat = 0; repeat < 5; ++repeat) {
        t = std::chrono::steady_clock::now();
        ReplicationRecord with = simulate_replication(staffed.simulation, pop, cal, 0, threads);
        with_staff = std::min(with_staff, seconds_since(t));
        staffed_rec = std::move(with);
        t = std::chrono::steady_clock::now();
        const ReplicationRecord again = simulate_replication(sc.simulation, pop, cal, 0, threads);
        without_staff = std::min(without_staff, seconds_since(t));
    }
    std::size_t tasks = 0;
    for (const auto& p : staffed_rec.plans) tasks += p.staff->tasks.size();
    std::printf("replay with staff and escalation: %.2f s = %.2fx the replay without (%.2f s; best of 5 each); "
                "%zu tasks, staff part %.2f s\n",
                with_staff, with_staff / without_staff, without_staff, tasks, with_staff - without_staff);
    t = std::chrono::steady_clock::now();
    const RunTables staffed_tables =
        run_tables(replication_results(staffed.simulation, staffed.analysis, pop, cal, staffed_rec, false), staffed.simulation.zone);
    std::printf("results with staff tables: %.2f s\n", seconds_since(t));
    std::printf("peak RSS: %ld MiB\n", peak_rss_mib());
    if (!keep) std::filesystem::remove_all(dir);
    return 0;
}
