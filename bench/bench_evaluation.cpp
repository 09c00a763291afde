// Benchmark (not a test): the model-evaluation measures on a year of scores
// for a 1,000-bed hospital at a 15-minute cadence (about 35 million scores).
// Goal: every encounter-level measure plus prediction-level AUC at 3 horizons
// in under 10 s on one core. The encounter bootstrap (200 replicates, as
// `tocsin evaluate` does by default) is timed on 1 and 2 threads, beside the
// plain pass of one replicate at a time it replaces; calibration and drift
// are timed separately so their cost is visible.
//
// Usage: bench_evaluation [beds=1000] [days=365] [bootstrap_replicates=200]
#include <boost/random/bernoulli_distribution.hpp>
#include <boost/random/exponential_distribution.hpp>
#include <boost/random/normal_distribution.hpp>
#include <boost/random/uniform_real_distribution.hpp>
#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <ctime>
#include <string>

#include "analysis/encounter_bootstrap.hpp"
#include "analysis/evaluation.hpp"
#include "report/evaluation_tables.hpp"
#include "analysis/roc.hpp"
#include "models/random_streams.hpp"

using namespace tocsin;

namespace {

// Back-to-back stays on each bed (mean 4 days, at least 6 h); 6% end in the
// outcome at the end of the stay. Scores every 15 minutes, available 5 to 20
// minutes after they are taken; a case's score climbs over its last 24 h.
Population synthetic_year(int beds, int days_covered) {
    Population pop;
    pop.units = {"Medical", "Surgical", "Cardiac", "Elderly care"};
    const Instant start = days_from_civil(2025, 1, 1) * 86400;
    const Instant end = start + days(days_covered);
    pop.period_start = start;
    pop.period_end = end;
    pop.score_start.push_back(0);
    pop.scores.reserve(static_cast<std::size_t>(beds) * static_cast<std::size_t>(days_covered) * 96);
    for (int bed = 0; bed < beds; ++bed) {
        RandomEngine engine = make_stream(2025, 0, StreamPurpose::trajectory, static_cast<std::uint64_t>(bed));
        boost::random::exponential_distribution<double> stay_days(1.0 / 4.0);
        boost::random::bernoulli_distribution<double> is_case(0.06);
        boost::random::normal_distribution<double> noise(0.0, 1.0);
        boost::random::uniform_real_distribution<double> delay_minutes(5.0, 20.0);
        Instant admitted = start;
        while (admitted < end) {
            const Instant discharged = std::min(end, admitted + std::max(hours(6), static_cast<Seconds>(stay_days(engine) * 86400)));
            Encounter e;
            e.id = "B" + std::to_string(bed) + "-" + std::to_string(admitted);
            e.unit = static_cast<std::uint32_t>(bed % 4);
            e.admitted = admitted;
            e.discharged = discharged;
            const bool c = is_case(engine);
            if (c) e.outcome_at = discharged - minutes(10);
            const double baseline = 4.0 + 1.5 * noise(engine);
            for (Instant t = admitted; t < discharged; t += minutes(15)) {
                Score s;
                s.scored_at = t;
                s.available_at = t + static_cast<Seconds>(delay_minutes(engine) * 60);
                double v = baseline + noise(engine);
                if (c) {
                    const double hours_left = static_cast<double>(*e.outcome_at - t) / 3600.0;
                    if (hours_left < 24.0) v += 4.0 * (1.0 - hours_left / 24.0);
                }
                s.value = std::round(std::max(0.0, v) * 1000.0) / 1000.0;  // three decimals, as a log would hold
                if (s.available_at < Population::usable_until(e)) pop.scores.push_back(s);
            }
            pop.encounters.push_back(e);
            pop.score_start.push_back(pop.scores.size());
            admitted = discharged;
        }
    }
    return pop;
}

// Wall-clock and processor time since a mark. On a shared machine the wall
// clock includes waiting for a core; processor time is what the code costs.
struct Mark {
    std::chrono::steady_clock::time_point wall = std::chrono::steady_clock::now();
    std::clock_t cpu = std::clock();
};
struct Elapsed {
    double wall, cpu;
};
Elapsed since(const Mark& m) {
    return {std::chrono::duration<double>(std::chrono::steady_clock::now() - m.wall).count(),
            static_cast<double>(std::clock() - m.cpu) / CLOCKS_PER_SEC};
}

}  // namespace

int main(int argc, char** argv) {
    const int beds = argc > 1 ? std::atoi(argv[1]) : 1000;
    const int days_covered = argc > 2 ? std::atoi(argv[2]) : 365;
    const int replicates = argc > 3 ? std::atoi(argv[3]) : 200;

    Mark mark;
    const Population pop = synthetic_year(beds, days_covered);
    std::size_t cases = 0;
    for (const Encounter& e : pop.encounters) cases += e.outcome_at.has_value();
    std::printf("population: %zu encounters (%zu cases), %zu scores; generated in %.2f s\n", pop.encounters.size(), cases,
                pop.scores.size(), since(mark).wall);

    EvaluationOptions o;
    o.thresholds = {6.0, 7.0, 8.0};
    o.horizons_hours = {4.0, 12.0, 24.0};
    o.bootstrap_replicates = 0;

    // Encounter level: counts, AUC with DeLong CI, threshold table (21 grid +
    // 3 given thresholds, Wilson CIs), lead times at the same 24 thresholds.
    mark = Mark();
    const EvaluationCounts counts = evaluation_counts(pop);
    const auto encounter_scores = encounter_level_scores(pop);
    const EncounterAuc auc = encounter_level_auc(encounter_scores, o.confidence);
    const ThresholdList thresholds = evaluation_thresholds(encounter_scores, o);
    const auto by_threshold = encounter_threshold_measures(encounter_scores, thresholds, o.confidence);
    const auto lead = lead_times_by_threshold(pop, thresholds.values, o.window_hours, o.min_lead_hours);
    const Elapsed encounter = since(mark);

    mark = Mark();
    const auto prediction = prediction_level_auc(pop, o);
    const Elapsed predictions = since(mark);

    std::printf("encounter level (AUC + DeLong, %zu thresholds with Wilson CIs, lead times): wall %.2f s, cpu %.2f s\n",
                thresholds.values.size(), encounter.wall, encounter.cpu);
    std::printf("prediction-level AUC at 3 horizons (incl. ranking %zu scores): wall %.2f s, cpu %.2f s\n",
                pop.scores.size(), predictions.wall, predictions.cpu);
    std::printf("TOTAL encounter level + prediction AUC: wall %.2f s, cpu %.2f s (goal < 10 s)\n",
                encounter.wall + predictions.wall, encounter.cpu + predictions.cpu);

    // The bootstrap alone, on the ranking it shares with the other measures.
    const RankedPredictions ranked = rank_predictions(pop);
    std::vector<std::int32_t> limits;
    for (double h : o.horizons_hours) limits.push_back(horizon_limit_seconds(h));
    o.bootstrap_replicates = replicates;
    for (unsigned threads : {1u, 2u}) {
        o.threads = threads;
        mark = Mark();
        const auto sums = bootstrap_auc_sums(ranked, limits, pop.encounters.size(), o);
        const Elapsed batched = since(mark);
        std::printf("encounter bootstrap, %d replicates x 3 horizons, %u thread(s): wall %.2f s, cpu %.2f s "
                    "(%.4f s cpu per replicate)\n",
                    replicates, threads, batched.wall, batched.cpu, replicates > 0 ? batched.cpu / replicates : 0.0);
        (void)sums;
    }
    const int plain_replicates = std::min(replicates, 5);
    mark = Mark();
    for (int b = 0; b < plain_replicates; ++b)
        auc_sums_by_horizon(ranked, limits, bootstrap_multiplicities(ranked.encounters_used, pop.encounters.size(), o, b));
    const Elapsed plain = since(mark);
    if (plain_replicates > 0)
        std::printf("the plain pass, one replicate at a time (first %d): cpu %.4f s per replicate\n", plain_replicates,
                    plain.cpu / plain_replicates);
    o.threads = 2;
    const auto boot = prediction_level_auc(pop, o);

    ProbabilityMapping m;
    m.kind = ProbabilityMapping::Kind::logistic;
    m.intercept = -9.0;
    m.slope = 0.7;
    m.horizon_hours = 24.0;
    o.probability = m;
    o.bootstrap_replicates = 0;
    mark = Mark();
    const Evaluation all = evaluate(pop, o);
    const Elapsed full = since(mark);
    std::printf("full evaluate() with calibration, drift and decision curve, no bootstrap: wall %.2f s, cpu %.2f s\n",
                full.wall, full.cpu);

    std::printf("\n%s\n%s\n%s\n", to_text(encounter_auc_table(auc), 4).c_str(),
                to_text(prediction_auc_table(prediction), 4).c_str(), to_text(prediction_auc_table(boot), 4).c_str());
    std::printf("%s\n", evaluation_summary(all).c_str());
    (void)counts;
    (void)by_threshold;
    (void)lead;
    return 0;
}
