// Replications run on a pool of threads give the same results whatever the
// thread count, and every plan of a replication sees the same patients.
#include <doctest/doctest.h>

#include <boost/random/uniform_real_distribution.hpp>
#include <mutex>

#include "report/run_files.hpp"
#include "models/random_streams.hpp"

using namespace tocsin;

namespace {

Scenario two_plans(std::uint64_t replications) {
    Scenario sc;
    sc.name = "experiment test";
    sc.simulation.shifts = ShiftPattern{{7 * 60, 19 * 60}, {"day", "night"}, {false, true}};
    sc.replications = replications;
    sc.analysis.window = hours(12);
    Plan a;
    a.name = "a";
    a.rule.threshold = 60;
    a.rule.snooze = hours(2);
    Plan b = a;
    b.name = "b";
    b.rule.threshold = 50;
    sc.simulation.plans = {a, b};
    return sc;
}

// A small random population: 30 encounters on 2 units over 3 days, hourly
// scores, every fifth encounter a case whose scores climb before time zero.
Population small_population(std::uint64_t replication) {
    RandomEngine rng = make_stream(11, replication, StreamPurpose::trajectory, 0);
    boost::random::uniform_real_distribution<double> u(0, 1);
    Population pop;
    pop.units = {"u1", "u2"};
    const Instant start = days_from_civil(2026, 3, 2) * 86400 + hours(7);
    std::vector<Score> scores;
    std::vector<std::uint32_t> owner;
    for (std::uint32_t e = 0; e < 30; ++e) {
        Encounter enc;
        enc.id = "E" + std::to_string(e);
        enc.unit = e % 2;
        enc.admitted = start + static_cast<Instant>(u(rng) * 86400);
        enc.discharged = enc.admitted + hours(24) + static_cast<Instant>(u(rng) * 86400);
        if (e % 5 == 0) enc.outcome_at = enc.discharged - hours(2);
        for (Instant t = enc.admitted; t < enc.discharged; t += hours(1)) {
            double v = 30 + 30 * u(rng);
            if (enc.outcome_at && t > *enc.outcome_at - hours(10)) v += 25;
            scores.push_back({t, t, v});
            owner.push_back(e);
        }
        pop.encounters.push_back(enc);
    }
    group_scores_by_encounter(pop, scores, owner);
    apply_score_exclusions(pop);
    pop.period_start = start;
    pop.period_end = start + days(3);
    return pop;
}

std::string all_tables(const Scenario& sc, const RunOutput& out, const RunSettings& settings) {
    std::string s;
    for (const OutputFile& f : run_output_files(sc, out, settings)) s += f.name + "\n" + f.content;
    return s;
}

}  // namespace

// The same, as a run's population factory hands it out.
std::shared_ptr<const Population> shared_small_population(std::uint64_t replication) {
    return std::make_shared<const Population>(small_population(replication));
}

TEST_CASE("experiment.same_results_whatever_the_threads") {
    const Scenario sc = two_plans(7);
    RunSettings one, two;
    one.threads = 1;
    two.threads = 2;
    one.notice_log = two.notice_log = true;
    const RunOutput a = run_scenario(sc, shared_small_population, one);
    const RunOutput b = run_scenario(sc, shared_small_population, two);
    CHECK(all_tables(sc, a, one) == all_tables(sc, b, two));
    CHECK(a.figures.replications == 7);
    // Replications differ from each other (the factory is random per replication).
    const std::size_t notices = metric_index(*find_metric("notices"));
    CHECK(a.figures.of(0, notices)[0] != a.figures.of(0, notices)[1]);
}

TEST_CASE("experiment.plans_share_patients") {
    // Both plans are evaluated on the very same population object in each
    // replication: the observer sees one population per replication.
    const Scenario sc = two_plans(3);
    std::mutex lock;
    std::vector<std::size_t> populations_seen(3, 0);
    ExperimentOptions options;
    options.replications = 3;
    options.threads = 2;
    run_experiment(sc, shared_small_population, options,
                   [&](std::uint64_t r, const Population& pop, const ShiftCalendar&, const ReplicationRecord& rec) {
                       std::lock_guard<std::mutex> guard(lock);
                       ++populations_seen[r];
                       REQUIRE(rec.plans.size() == 2);
                       // Plan b (threshold 50) fires on a superset of the encounters plan a (60) fires on,
                       // which holds only when both saw the same scores.
                       std::vector<bool> a(pop.encounters.size()), b(pop.encounters.size());
                       for (const Notice& n : rec.plans[0].notices) a[n.encounter] = true;
                       for (const Notice& n : rec.plans[1].notices) b[n.encounter] = true;
                       for (std::size_t e = 0; e < a.size(); ++e) CHECK((!a[e] || b[e]));
                   });
    CHECK(populations_seen == std::vector<std::size_t>{1, 1, 1});
}

TEST_CASE("experiment.errors_surface") {
    const Scenario sc = two_plans(4);
    ExperimentOptions options;
    options.replications = 4;
    options.threads = 2;
    auto failing = [](std::uint64_t r) {
        if (r == 2) throw std::runtime_error("replication 2 failed");
        return shared_small_population(r);
    };
    CHECK_THROWS_WITH(run_experiment(sc, failing, options, [](auto, const auto&, const auto&, const auto&) {}),
                      "replication 2 failed");
}
