// A sweep of 100 plans x 20 replications on a generated 200-bed, 90-day
// hospital (hourly scores), run with 1 and with 2 threads: seconds taken and
// the speed-up. The two runs must give identical tables.
//   bench_sweep [--replications R] [--threads-max T]
#include <chrono>
#include <cstdio>
#include <string>
#include <thread>

#include "report/run_files.hpp"
#include "models/generator.hpp"

using namespace tocsin;

namespace {

GeneratorConfig hospital() {
    GeneratorConfig g;
    for (int u = 0; u < 8; ++u) {
        UnitConfig unit;
        unit.name = "unit " + std::to_string(u + 1);
        unit.beds = 25;
        // 25 beds, mean stay about 86 h: about 0.27 admissions per hour keeps them ~93% full.
        unit.arrivals_per_hour.fill(0.27);
        g.units.push_back(unit);
    }
    g.period_start = days_from_civil(2026, 1, 5) * 86400 + hours(7);
    g.period_end = g.period_start + days(90);
    g.stay.median_hours = 72;
    g.stay.log_sd = 0.6;
    g.outcome.probability = 0.06;
    g.scores.cadence_minutes = 60;
    g.scores.baseline = 25;
    g.scores.drift_size = 30;
    return g;
}

Scenario sweep_of_100(std::uint64_t replications) {
    Scenario sc;
    sc.name = "bench sweep";
    sc.simulation.shifts = ShiftPattern{{7 * 60, 19 * 60}, {"day", "night"}, {false, true}};
    sc.replications = replications;
    sc.analysis.window = hours(24);
    sc.analysis.min_lead = hours(1);
    for (int t = 0; t < 10; ++t)
        for (int s = 0; s < 10; ++s) {
            Plan p;
            p.name = "t" + std::to_string(40 + 4 * t) + " s" + std::to_string(30 * (s + 1));
            p.rule.threshold = 40 + 4 * t;
            p.rule.snooze = minutes(30 * (s + 1));
            p.rule.rise = 12;
            sc.simulation.plans.push_back(p);
        }
    return sc;
}

}  // namespace

int main(int argc, char** argv) {
    std::uint64_t replications = 20;
    unsigned threads_max = std::max(2u, std::thread::hardware_concurrency());
    for (int i = 1; i < argc; ++i) {
        const std::string a = argv[i];
        if (a == "--replications" && i + 1 < argc) replications = std::stoull(argv[++i]);
        else if (a == "--threads-max" && i + 1 < argc) threads_max = static_cast<unsigned>(std::stoi(argv[++i]));
    }
    const GeneratorConfig config = hospital();
    const Scenario sc = sweep_of_100(replications);
    const PopulationFactory factory = [&](std::uint64_t r) {
        return std::make_shared<const Population>(generate_population(config, 20261201, r));
    };
    std::string first;
    double one_thread = 0;
    for (unsigned threads = 1; threads <= threads_max; threads *= 2) {
        RunSettings settings;
        settings.threads = threads;
        const auto t0 = std::chrono::steady_clock::now();
        const RunOutput out = run_scenario(sc, factory, settings);
        const double s = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
        std::string tables;
        for (const OutputFile& f : run_output_files(sc, out, settings)) tables += f.content;
        if (threads == 1) {
            first = tables;
            one_thread = s;
        }
        std::printf("sweep: %zu plans x %llu replications, 200 beds x 90 days, %u thread%s: %.2f s (speed-up %.2fx)%s\n",
                    sc.simulation.plans.size(), static_cast<unsigned long long>(replications), threads, threads == 1 ? "" : "s", s,
                    one_thread / s, tables == first ? "" : "  TABLES DIFFER");
    }
    return 0;
}
