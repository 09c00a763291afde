// Bootstrap replications of a log are comparable to the log's steady state:
// they draw only from days whose census is complete (models/bootstrap.hpp,
// "Eligible days"), and each starts with a full census.
#include <doctest/doctest.h>

#include <cmath>
#include <cstdio>
#include <fstream>
#include <functional>
#include <numeric>

#include "models/bootstrap.hpp"
#include "models/generator.hpp"
#include "models/replay.hpp"
#include "population_fixtures.hpp"
#include "study/run.hpp"
#include "test_support.hpp"

using namespace tocsin;
using namespace tocsin::testing;

namespace {

std::string utc_text(Instant t) {
    const CivilTime c = civil_from_instant(t);
    char out[32];
    std::snprintf(out, sizeof out, "%04d-%02d-%02dT%02d:%02d:%02dZ", c.year, c.month, c.day, c.hour, c.minute, c.second);
    return out;
}

// What of a population a log extract keeps: every stay (`from` = `until` = 0),
// or only stays admitted in [from, until), cut off at `until` (scores and
// outcomes after it are lost, as in an extract taken at that instant).
struct Extract {
    Instant from = 0, until = 0;
};

// Writes `pop` as the two CSV files replay reads, in `dir`, and replays them.
Population write_and_replay(const Population& pop, const ScratchDir& dir, Extract extract = {}) {
    std::ofstream enc(dir.path("encounters.csv")), sc(dir.path("scores.csv"));
    enc << "encounter,unit,admitted,discharged,outcome_at\n";
    sc << "encounter,scored_at,available_at,score\n";
    const bool cut = extract.until > extract.from;
    char value[40];
    for (std::size_t e = 0; e < pop.encounters.size(); ++e) {
        const Encounter& x = pop.encounters[e];
        if (cut && (x.admitted < extract.from || x.admitted >= extract.until)) continue;
        const Instant discharged = cut ? std::min(x.discharged, extract.until) : x.discharged;
        const bool outcome = x.outcome_at && (!cut || *x.outcome_at < extract.until);
        enc << x.id << "," << pop.units[x.unit] << "," << utc_text(x.admitted) << "," << utc_text(discharged) << ","
            << (outcome ? utc_text(*x.outcome_at) : "") << "\n";
        for (const Score& s : pop.scores_of(e)) {
            if (cut && s.available_at >= extract.until) continue;
            std::snprintf(value, sizeof value, "%.17g", s.value);
            sc << x.id << "," << utc_text(s.scored_at) << "," << utc_text(s.available_at) << "," << value << "\n";
        }
    }
    enc.close();
    sc.close();
    ReplaySource source;
    source.encounters_path = dir.path("encounters.csv");
    source.scores_path = dir.path("scores.csv");
    return load_replay(source, TimeZone::utc());
}

// One page plan, day and night shifts, the reporting period given.
Scenario paging_scenario(std::uint64_t replications, Instant from, Instant until) {
    Scenario sc;
    sc.name = "bootstrap steady state";
    sc.simulation.shifts = ShiftPattern{{7 * 60, 19 * 60}, {"day", "night"}, {false, true}};
    sc.replications = replications;
    sc.analysis.window = hours(24);
    sc.analysis.period_start = from;
    sc.analysis.period_end = until;
    Plan p;
    p.name = "page";
    p.rule.threshold = 40;
    p.rule.snooze = hours(4);
    sc.simulation.plans = {p};
    return sc;
}

// Notices per unit per night shift, mean over the reporting period, in each replication.
std::vector<double> per_unit_night(const Scenario& sc, const PopulationFactory& make) {
    RunSettings settings;
    settings.evaluate = false;
    const RunOutput out = run_scenario(sc, make, settings);
    const auto values = out.figures.of(0, metric_index(*find_metric("per_unit_night_mean")));
    return {values.begin(), values.end()};
}

struct Summary {
    double mean = 0, sd = 0;
    std::size_t n = 0;
};
Summary summary(std::span<const double> v) {
    Summary s;
    s.n = v.size();
    for (double x : v) s.mean += x / static_cast<double>(s.n);
    for (double x : v) s.sd += (x - s.mean) * (x - s.mean) / static_cast<double>(s.n - 1);
    s.sd = std::sqrt(s.sd);
    return s;
}

// The eligible days of a log, as instants.
std::pair<Instant, Instant> eligible_window(const Population& log, const EligibleDays& d) {
    return {log.period_start + days(d.first_block), log.period_start + days(d.first_block + d.blocks)};
}

// One ward, an admission every 6 hours from midnight for `log_days` days, each
// stay 4 days with a score of 50 every hour from 30 minutes after admission.
// The extract is cut at the end of the last day: stays still open then end
// there. Every day is the same, so once the census has filled (16 beds) every
// night sees the same pages; the first 4 days fill from empty (ramp-up) and
// the stays admitted in the last 4 days are cut short.
Population clockwork_log(int log_days) {
    Population pop;
    pop.units = {"ward"};
    pop.period_start = midnight_utc(2026, 3, 2);
    pop.period_end = pop.period_start + days(log_days);
    std::vector<Score> scores;
    std::vector<std::uint32_t> owner;
    for (int i = 0; i < log_days * 4; ++i) {
        Encounter e;
        e.id = "P" + std::to_string(i);
        e.admitted = pop.period_start + hours(6 * i);
        e.discharged = std::min(pop.period_end, e.admitted + days(4));
        for (Instant t = e.admitted + 1800; t < e.discharged; t += hours(1)) {
            scores.push_back({t, t, 50.0});
            owner.push_back(static_cast<std::uint32_t>(pop.encounters.size()));
        }
        pop.encounters.push_back(e);
    }
    group_scores_by_encounter(pop, scores, owner);
    return pop;
}

}  // namespace

TEST_CASE("bootstrap_steady_state.clockwork_log_with_ramp_up_and_cut_off_tail") {
    // (b) Hand-worked. Stay rule: 4-day stays (the cut ones shorter) put more
    // than 5% of patient time beyond 3 days, none beyond 4: x = 4. Census rule:
    // day means 2.5, 6.5, 10.5, 14.5, then 16 (the cut stays stay in bed to the
    // end): 90% of 16 is 14.4, first reached on day 4 (1-based), last on day 30,
    // so warm-up max(4, 4) = 4 days and tail max(4, 1) = 4 days: days 5 to 26
    // are drawn from, and their stays all end by the end of the log.
    const Population log = clockwork_log(30);
    const EligibleDays eligible = find_eligible_days(log, {});
    CHECK(eligible.stay_days == 4);
    CHECK(eligible.typical_census == doctest::Approx(16));
    CHECK(eligible.census_warm_up_days == 4);
    CHECK(eligible.census_tail_days == 1);
    CHECK(eligible.warm_up_days == 4);
    CHECK(eligible.tail_days == 4);
    CHECK(eligible.first_block == 4);
    CHECK(eligible.blocks == 22);
    CHECK(describe_eligible_days(eligible, log, {}, TimeZone::utc()).find("days 5 to 26 of the 30-day log") !=
          std::string::npos);

    // Every eligible day is the same, so every replication has the steady
    // census from its first day to its last, and exactly the log's steady
    // pages per night: no sampling error, so no tolerance.
    auto make = [&](const BootstrapConfig& c) -> PopulationFactory {
        const EligibleDays d = find_eligible_days(log, c);
        return [&log, c, d](std::uint64_t r) { return std::make_shared<const Population>(bootstrap_population(log, c, d, 3, r)); };
    };
    const Instant start = log.period_start;
    const Scenario steady_nights = paging_scenario(21, start + days(5), start + days(29));
    const std::vector<double> fixed = per_unit_night(steady_nights, make({}));
    const double as_logged = fixed[0];
    CHECK(as_logged > 0);
    for (std::size_t r = 1; r < fixed.size(); ++r) CHECK(fixed[r] == as_logged);
    // Over the whole period the log runs low (its ramp-up); replications do not.
    const std::vector<double> whole_period = per_unit_night(paging_scenario(21, start, log.period_end), make({}));
    CHECK(whole_period[0] < as_logged);
    for (std::size_t r = 1; r < whole_period.size(); ++r) CHECK(whole_period[r] == as_logged);
    for (std::uint64_t r = 1; r <= 5; ++r) {
        const Population rep = bootstrap_population(log, {}, eligible, 3, r);
        for (Instant t = start; t < log.period_end; t += hours(1)) {
            int census = 0;
            for (const Encounter& e : rep.encounters) census += e.admitted <= t && t < e.discharged;
            REQUIRE(census == 16);
        }
    }

    // Drawing from every day, as before (warm_up_days: 0, tail_days: 0): days
    // whose stays were cut short land in the middle of replications, and the
    // first days start from an empty ward; the mean runs low.
    BootstrapConfig every_day;
    every_day.warm_up_days = every_day.tail_days = 0;
    const std::vector<double> old = per_unit_night(steady_nights, make(every_day));
    CHECK(old[0] == as_logged);
    const Summary o = summary(std::span(old).subspan(1));
    MESSAGE("clockwork log: " << as_logged << " pages per night as logged; drawing from every day " << o.mean);
    CHECK(o.mean < as_logged);
}

TEST_CASE("bootstrap_steady_state.stationary_log_replayed") {
    // (a) A stationary population, 20 weeks on two wards (generated with its
    // own warm-up; every stay whole), written out as a log and replayed. The
    // replayed log starts with the admissions of the patients present on the
    // first generated day (ten days of thin admissions) and ends with the
    // discharges of the last ones: those are its warm-up and tail.
    const GeneratorConfig config = two_wards(140);
    const Population generated = generate_population(config, 21, 0);
    ScratchDir dir;
    const Population log = write_and_replay(generated, dir);
    CHECK(log.period_start < config.period_start - days(7));  // the log does start with thin days
    CHECK(log.period_end > config.period_end + days(7));      // and ends with its last discharges
    const EligibleDays eligible = find_eligible_days(log, {});
    INFO(describe_eligible_days(eligible, log, {}, TimeZone::utc()));
    CHECK(log.period_start + days(eligible.first_block) >= config.period_start);
    CHECK(log.period_start + days(eligible.first_block + eligible.blocks) <= config.period_end);
    // The log's own figure over the days drawn from, and R = 100 replications.
    const auto [from, until] = eligible_window(log, eligible);
    const std::uint64_t R = 100;
    const Scenario sc = paging_scenario(R + 1, from, until);
    auto boot = [&](const BootstrapConfig& c, const EligibleDays& d) -> PopulationFactory {
        return [&, c, d](std::uint64_t r) { return std::make_shared<const Population>(bootstrap_population(log, c, d, 5, r)); };
    };
    const std::vector<double> steady = per_unit_night(sc, boot({}, eligible));
    BootstrapConfig every_day;
    every_day.warm_up_days = every_day.tail_days = 0;
    const std::vector<double> old = per_unit_night(sc, boot(every_day, find_eligible_days(log, every_day)));
    // The generator's own expectation, from 20 more generated periods.
    const std::uint64_t G = 20;
    const std::vector<double> gen = per_unit_night(paging_scenario(G, config.period_start, config.period_end),
                                                   [&](std::uint64_t r) { return std::make_shared<const Population>(generate_population(config, 21, r + 1)); });
    const double as_logged = steady[0];
    REQUIRE(old[0] == as_logged);  // replication 0 is the log either way
    const Summary s = summary(std::span(steady).subspan(1)), o = summary(std::span(old).subspan(1)), g = summary(gen);
    MESSAGE("stationary log: " << as_logged << " pages per unit per night as logged; replications " << s.mean << " (sd "
                               << s.sd << "); drawing from every day " << o.mean << " (sd " << o.sd
                               << "); generator " << g.mean << " (sd " << g.sd << ")");
    // Tolerance. The replication mean differs from the log's own figure by
    // Monte Carlo error, sd s / sqrt(R) (s: sd across replications, the
    // bootstrap's estimate of the log's sampling error), and by where the
    // bootstrap is centred: runs of blocks that do not wrap around draw the
    // first days of the eligible span less often, shifting about one run of
    // weight out of W weeks, of the order of s / sqrt(W). Three times the
    // combined sd of the two.
    const double weeks = static_cast<double>(eligible.blocks) / 7.0;
    const double tolerance = 3 * s.sd * std::sqrt(1.0 / static_cast<double>(R) + 1.0 / weeks);
    CHECK(std::abs(s.mean - as_logged) <= tolerance);
    // Drawing from every day of the log, as before, runs low by more than that.
    CHECK(as_logged - o.mean > tolerance);
    // Near the generator's expectation: the log is one draw of a 20-week period
    // (sd g.sd across generated periods), g.mean has Monte Carlo sd
    // g.sd / sqrt(G) and the replication mean s / sqrt(R). Three times the
    // combined sd.
    CHECK(std::abs(s.mean - g.mean) <=
          3 * std::sqrt(g.sd * g.sd * (1 + 1.0 / static_cast<double>(G)) + s.sd * s.sd / static_cast<double>(R)));
}
