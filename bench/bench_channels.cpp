// The four channels at the scale of a large hospital: 1,000 beds for a year,
// stays of about 4 days, a score every hour (about 8.8 million scores). Builds
// the population in memory (ingest is bench_replay's job) and reports, per
// channel, the seconds one replication of one plan takes, with the notices it
// produced, and the peak resident memory.
//   bench_channels [--beds N] [--days D] [--threads T]
#include <sys/resource.h>

#include <chrono>
#include <cstdio>
#include <cstring>
#include <string>
#include <thread>

#include <boost/random/uniform_int_distribution.hpp>
#include <boost/random/uniform_real_distribution.hpp>

#include "models/random_streams.hpp"
#include "sim/simulate.hpp"

using namespace tocsin;

namespace {

double seconds_since(std::chrono::steady_clock::time_point t0) {
    return std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
}

Population make_population(int beds, int days) {
    Population pop;
    const int units = std::max(1, beds / 25);
    for (int u = 0; u < units; ++u) pop.units.push_back("unit " + std::to_string(100 + u));
    const Instant start = days_from_civil(2025, 1, 1) * 86400, end = start + days * 86400LL;
    RandomEngine rng = make_stream(7, 0, StreamPurpose::stay, 0);
    boost::random::uniform_int_distribution<int> stay_hours(24, 168);
    boost::random::uniform_real_distribution<double> u01(0.0, 1.0);
    std::vector<Score> scores;
    std::vector<std::uint32_t> owner;
    for (int bed = 0; bed < beds; ++bed) {
        for (Instant t = start + bed * 97; t < end;) {
            Encounter e;
            e.id = "B" + std::to_string(bed) + "-" + std::to_string(t);
            e.unit = static_cast<std::uint32_t>(bed % units);
            e.admitted = t;
            e.discharged = t + hours(stay_hours(rng));
            if (u01(rng) < 0.05) e.outcome_at = e.discharged - hours(2);
            const auto id = static_cast<std::uint32_t>(pop.encounters.size());
            double level = 20 + 30 * u01(rng);
            for (Instant s = t + 600; s < e.discharged; s += 3600) {
                level += (e.outcome_at ? 1.5 : 0.0) + 6 * (u01(rng) - 0.5);
                scores.push_back({s, s, level});
                owner.push_back(id);
            }
            pop.encounters.push_back(e);
            t = e.discharged + hours(2);
        }
    }
    group_scores_by_encounter(pop, scores, owner);
    apply_score_exclusions(pop);
    default_period(pop);
    return pop;
}

}  // namespace

int main(int argc, char** argv) {
    int beds = 1000, days = 365;
    unsigned threads = std::max(1u, std::thread::hardware_concurrency());
    for (int i = 1; i + 1 < argc; i += 2) {
        if (!std::strcmp(argv[i], "--beds")) beds = std::atoi(argv[i + 1]);
        else if (!std::strcmp(argv[i], "--days")) days = std::atoi(argv[i + 1]);
        else if (!std::strcmp(argv[i], "--threads")) threads = static_cast<unsigned>(std::atoi(argv[i + 1]));
    }
    auto t0 = std::chrono::steady_clock::now();
    const Population pop = make_population(beds, days);
    std::printf("bench_channels: %d beds, %d days: %zu encounters, %zu scores, built in %.2f s\n", beds, days,
                pop.encounters.size(), pop.scores.size(), seconds_since(t0));

    SimulationSetup base;
    base.zone = TimeZone::load("America/Chicago");
    base.shifts = ShiftPattern{{7 * 60, 19 * 60}, {"day", "night"}, {false, true}};
    ChartOpeningRole nurse;
    nurse.name = "nurse";
    nurse.clinicians_per_unit = 5;
    nurse.openings_per_hour.fill(0.8);
    base.chart_openings = ChartOpeningSource{{nurse}, ""};
    const ShiftCalendar cal = calendar_for(base, pop, std::nullopt, std::nullopt);

    Plan page;
    page.name = "page";
    page.rule.threshold = 60;
    page.rule.snooze = hours(4);
    Plan chart = page;
    chart.name = "chart";
    chart.channel = Channel::chart_interruption;
    chart.chart.acceptance_probability = 0.6;
    Plan handoff = page;
    handoff.name = "handoff";
    handoff.channel = Channel::handoff_list;
    handoff.rule.snooze.reset();
    handoff.handoff.follow_up_probability = 0.8;
    Plan review = handoff;
    review.name = "review";
    review.channel = Channel::ranked_review;
    review.rule.threshold = 40;
    review.review.skip_reviewed = hours(12);
    review.review.times_minutes = {8 * 60, 20 * 60};
    review.review.top_n = 5;
    for (const Plan& plan : {page, chart, handoff, review}) {
        SimulationSetup sc = base;
        sc.plans = {plan};
        t0 = std::chrono::steady_clock::now();
        const ReplicationRecord r = simulate_replication(sc, pop, cal, 0, threads);
        std::printf("  %-8s %8zu notices, %9lld occasions, %6.2f s (%u threads)\n", plan.name.c_str(),
                    r.plans[0].notices.size(), static_cast<long long>(r.plans[0].occasions), seconds_since(t0), threads);
    }
    rusage u{};
    getrusage(RUSAGE_SELF, &u);
    std::printf("  peak resident memory %ld MiB\n", u.ru_maxrss / 1024);
    return 0;
}
