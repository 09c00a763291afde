// Throughput of the population generator: a 1,000-bed hospital-year at a
// 15-minute cadence (about 35 million scores), streamed so that the
// population never sits in memory at once. Goal (issue 5): under 5 s on one
// core. Usage: bench_generator [--in-memory]
#include <sys/resource.h>

#include <chrono>
#include <cstdio>
#include <cstring>

#include "models/generator.hpp"

using namespace tocsin;

namespace {

// CPU time of this process: steadier than wall time on a shared machine.
double cpu_seconds() {
    rusage usage{};
    getrusage(RUSAGE_SELF, &usage);
    return static_cast<double>(usage.ru_utime.tv_sec + usage.ru_stime.tv_sec) +
           static_cast<double>(usage.ru_utime.tv_usec + usage.ru_stime.tv_usec) / 1e6;
}

long peak_rss_mib() {
    rusage usage{};
    getrusage(RUSAGE_SELF, &usage);
    return usage.ru_maxrss / 1024;  // Linux reports KiB
}

GeneratorConfig thousand_beds() {
    GeneratorConfig c;
    // 40 wards of 25 beds. Mean stay = 72 h * exp(0.6^2 / 2) = 86 h, so
    // 25 / 86 = 0.29 admissions per hour would just fill a ward; offering
    // 0.6/h by day (08-20 h) and 0.3/h at night keeps wards about 93 % full
    // (arrivals that find no bed are turned away and counted), i.e. about
    // 1,000 x 0.93 x 8,760 h x 4 x 0.98 (2 % missing) = 32 million scores.
    for (int u = 0; u < 40; ++u) {
        UnitConfig unit;
        unit.name = "ward-" + std::to_string(u + 1);
        unit.beds = 25;
        for (int h = 0; h < hours_per_week; ++h) unit.arrivals_per_hour[h] = (h % 24 >= 8 && h % 24 < 20) ? 0.6 : 0.3;
        c.units.push_back(unit);
    }
    c.stay.median_hours = 72;
    c.stay.log_sd = 0.6;
    c.outcome.probability = 0.04;
    c.scores.cadence_minutes = 15;
    c.scores.jitter_minutes = 3;
    c.scores.missing_probability = 0.02;
    c.scores.latency_median_minutes = 5;
    c.scores.latency_log_sd = 0.5;
    c.period_start = days_from_civil(2026, 1, 5) * 86400;
    c.period_end = days_from_civil(2027, 1, 4) * 86400;
    return c;
}

}  // namespace

int main(int argc, char** argv) {
    const bool in_memory = argc > 1 && std::strcmp(argv[1], "--in-memory") == 0;
    const GeneratorConfig config = thousand_beds();
    const auto started = std::chrono::steady_clock::now();
    std::int64_t encounters = 0, scores = 0, cases = 0;
    double checksum = 0.0;
    if (in_memory) {
        Population pop = generate_population(config, 2026, 0);
        encounters = static_cast<std::int64_t>(pop.encounters.size());
        scores = static_cast<std::int64_t>(pop.scores.size());
        for (const Encounter& e : pop.encounters) cases += e.outcome_at ? 1 : 0;
        for (const Score& s : pop.scores) checksum += s.value;
    } else {
        GenerationSummary summary =
            generate_streaming(config, 2026, 0, [&](const Encounter& e, std::span<const Score> stream) {
                ++encounters;
                cases += e.outcome_at ? 1 : 0;
                scores += static_cast<std::int64_t>(stream.size());
                for (const Score& s : stream) checksum += s.value;
            });
        std::int64_t turned_away = 0;
        for (const auto& [reason, n] : summary.excluded.encounters_by_reason) turned_away += n;
        std::printf("arrivals turned away (unit full): %lld\n", static_cast<long long>(turned_away));
    }
    const double seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - started).count();
    std::printf("mode: %s\nencounters: %lld (cases %lld)\nscores: %lld\nchecksum: %.3f\n",
                in_memory ? "in memory" : "streaming", static_cast<long long>(encounters),
                static_cast<long long>(cases), static_cast<long long>(scores), checksum);
    std::printf("time: %.2f s wall, %.2f s CPU (%.1f M scores per CPU second)\npeak RSS: %ld MiB\n", seconds,
                cpu_seconds(), static_cast<double>(scores) / cpu_seconds() / 1e6, peak_rss_mib());
    return 0;
}
