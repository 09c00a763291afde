// Bootstrap replications from a replayed population, by whole days or weeks per unit.
#include <doctest/doctest.h>

#include <cmath>
#include <stdexcept>
#include <map>

#include "models/bootstrap.hpp"
#include "models/generator.hpp"
#include "population_fixtures.hpp"

using namespace tocsin;
using namespace tocsin::testing;

namespace {

// A 9-week "silent-mode log" stands in for a replayed one.
const Population& nine_week_log() {
    static const Population log = generate_population(two_wards(63), 5, 0);
    return log;
}

std::string source_id(const std::string& id) { return id.substr(0, id.find('~')); }

}  // namespace

TEST_CASE("bootstrap.replication_zero_is_the_log") {
    const Population& log = nine_week_log();
    CHECK(serialize(bootstrap_population(log, {}, 1, 0)) == serialize(log));
}

TEST_CASE("bootstrap.reproducible") {
    const Population& log = nine_week_log();
    const std::string first = serialize(bootstrap_population(log, {}, 1, 1));
    CHECK(first == serialize(bootstrap_population(log, {}, 1, 1)));
    CHECK(first != serialize(bootstrap_population(log, {}, 1, 2)));
    CHECK(first != serialize(bootstrap_population(log, {}, 2, 1)));
    CHECK(first != serialize(log));
}

TEST_CASE("bootstrap.copies_whole_stays_by_whole_days") {
    // Every encounter of a replication is a copy of one in the log, moved by a
    // whole number of weeks (day blocks that keep the weekday), with the same
    // stay, the same time to outcome and the same scores moved alike.
    const Population& log = nine_week_log();
    std::map<std::string, std::size_t> by_id;
    for (std::size_t e = 0; e < log.encounters.size(); ++e) by_id[log.encounters[e].id] = e;
    const Population rep = bootstrap_population(log, {}, 3, 1);
    std::int64_t initial = 0;
    for (std::size_t e = 0; e < rep.encounters.size(); ++e) {
        const Encounter& copy = rep.encounters[e];
        REQUIRE(by_id.count(source_id(copy.id)) == 1);
        const std::size_t o = by_id[source_id(copy.id)];
        const Encounter& original = log.encounters[o];
        const Seconds shift = copy.admitted - original.admitted;
        CHECK(shift % days(7) == 0);
        CHECK(copy.unit == original.unit);
        CHECK(copy.discharged - shift == original.discharged);
        CHECK(copy.outcome_at.has_value() == original.outcome_at.has_value());
        if (copy.outcome_at) CHECK(*copy.outcome_at - shift == *original.outcome_at);
        const auto a = rep.scores_of(e), b = log.scores_of(o);
        REQUIRE(a.size() == b.size());
        for (std::size_t i = 0; i < a.size(); ++i) {
            CHECK(a[i].scored_at - shift == b[i].scored_at);
            CHECK(a[i].available_at - shift == b[i].available_at);
            CHECK(a[i].value == b[i].value);
        }
        if (copy.admitted < rep.period_start) {
            // The initial census: the stays present when an eligible day of
            // the same weekday began, moved to the period start.
            ++initial;
            CHECK(copy.id == original.id + "~census");
            CHECK(copy.discharged > rep.period_start);
        } else {
            CHECK(copy.admitted < rep.period_end);
        }
    }
    CHECK(initial > 0);
}

TEST_CASE("bootstrap.block_plans") {
    RandomEngine engine = make_stream(1, 1, StreamPurpose::bootstrap, 0);
    SUBCASE("moving blocks: runs of 7 consecutive days") {
        BootstrapConfig c;
        c.scheme = BlockScheme::moving_block;
        c.mean_run_blocks = 7;
        const std::vector<int> plan = plan_blocks(30, 28, c, engine);
        for (int t = 0; t < 28; ++t) {
            CHECK((plan[t] - t) % 7 == 0);  // weekday kept
            if (t % 7 != 0) CHECK(plan[t] == plan[t - 1] + 1);
        }
    }
    SUBCASE("stationary: geometric runs with the declared mean") {
        // 20,000 target days jump (start a new run) with probability 1/5 each:
        // 4,000 runs expected, binomial SE sqrt(20000 x 0.2 x 0.8) = 57. Two
        // small biases: forced jumps at the log's last day add about
        // 20000 / 365 = 55; a jump that happens to land on the next day (1 in
        // 52 same-weekday candidates) is not seen, removing about 77.
        // Tolerance 4 SE + 77.
        BootstrapConfig c;
        c.mean_run_blocks = 5;
        const std::vector<int> plan = plan_blocks(365, 20000, c, engine);
        int runs = 1;
        for (std::size_t t = 1; t < plan.size(); ++t) {
            CHECK((plan[t] - static_cast<int>(t)) % 7 == 0);
            runs += plan[t] != plan[t - 1] + 1 ? 1 : 0;
        }
        INFO("runs " << runs);
        CHECK(std::abs(runs - 4000) <= 4 * 57 + 77);
    }
    SUBCASE("week blocks") {
        BootstrapConfig c;
        c.block_days = 7;
        c.mean_run_blocks = 2;
        const std::vector<int> plan = plan_blocks(9, 9, c, engine);
        for (int s : plan) CHECK((s >= 0 && s < 9));
    }
}

TEST_CASE("bootstrap.census_and_outcome_rate_stay_realistic") {
    // Over 40 replications, the mean number of admissions, cases and occupied
    // bed-hours per unit should match the log: each target day draws a source
    // day of the same weekday uniformly, so every replication total is
    // unbiased when the period is whole weeks. Tolerance: 4 x (sd across
    // replications) / sqrt(40).
    const Population& log = nine_week_log();
    struct Totals {
        double admissions = 0, cases = 0, bed_hours = 0;
    };
    auto totals = [](const Population& p, std::uint32_t unit) {
        Totals t;
        for (const Encounter& e : p.encounters) {
            if (e.unit != unit) continue;
            const Instant from = std::max(e.admitted, p.period_start), to = std::min(e.discharged, p.period_end);
            if (to > from) t.bed_hours += static_cast<double>(to - from) / 3600.0;
            if (e.admitted < p.period_start) continue;
            t.admissions += 1;
            t.cases += e.outcome_at ? 1 : 0;
        }
        return t;
    };
    // A generated population's census is complete from its first to its last
    // day (generated with a warm-up, stays kept whole past the end), so every
    // day is declared eligible; the log's initial census is then kept.
    for (BlockScheme scheme : {BlockScheme::stationary, BlockScheme::moving_block}) {
        BootstrapConfig c;
        c.scheme = scheme;
        c.warm_up_days = c.tail_days = 0;
        std::vector<Population> replications;
        for (std::uint64_t r = 1; r <= 40; ++r) replications.push_back(bootstrap_population(log, c, 9, r));
        for (std::uint32_t unit = 0; unit < 2; ++unit) {
            const Totals original = totals(log, unit);
            std::vector<Totals> reps;
            for (const Population& p : replications) reps.push_back(totals(p, unit));
            auto check_mean = [&](double Totals::*field, const char* what) {
                double m = 0, ss = 0;
                for (const Totals& t : reps) m += t.*field / 40;
                for (const Totals& t : reps) ss += (t.*field - m) * (t.*field - m);
                const double sd = std::sqrt(ss / 39);
                INFO(what << " unit " << unit << ": log " << original.*field << ", replications " << m << " (sd " << sd << ")");
                CHECK(sd > 0);  // replications really differ
                CHECK(std::abs(m - original.*field) <= 4 * sd / std::sqrt(40.0));
            };
            check_mean(&Totals::admissions, "admissions");
            check_mean(&Totals::cases, "cases");
            check_mean(&Totals::bed_hours, "occupied bed-hours");
        }
    }
}

TEST_CASE("bootstrap.refuses_a_log_shorter_than_a_block") {
    Population three_days = generate_population(two_wards(3), 1, 0);
    BootstrapConfig weeks;
    weeks.block_days = 7;
    CHECK_THROWS_WITH_AS(bootstrap_population(three_days, weeks, 1, 1), doctest::Contains("less than one block of 7 days"),
                         std::invalid_argument);
    BootstrapConfig bad;
    bad.block_days = 0;
    CHECK_THROWS_WITH_AS(validate(bad), doctest::Contains("block_days"), std::invalid_argument);
}

TEST_CASE("bootstrap.keeps_the_initial_census_without_a_warm_up") {
    // warm_up_days: 0 says the log's census is complete at its start: its own
    // initial census is kept as it is, and every whole day is a source.
    const Population& log = nine_week_log();
    BootstrapConfig c;
    c.warm_up_days = c.tail_days = 0;
    const EligibleDays d = find_eligible_days(log, c);
    CHECK(d.first_block == 0);
    CHECK(d.blocks == 63);
    CHECK_FALSE(d.warm_up_found);
    const Population rep = bootstrap_population(log, c, 3, 1);
    std::int64_t kept = 0, in_log = 0;
    for (const Encounter& e : log.encounters) in_log += e.admitted < log.period_start;
    for (const Encounter& e : rep.encounters)
        if (e.admitted < rep.period_start) {
            ++kept;
            CHECK(e.id.find('~') == std::string::npos);
        }
    CHECK(kept == in_log);
}

TEST_CASE("bootstrap.draws_only_eligible_days") {
    // Declared edges: 10 days of warm-up and 12 of tail leave days 11 to 51
    // of the 63; every copied admission comes from them.
    const Population& log = nine_week_log();
    BootstrapConfig c;
    c.warm_up_days = 10;
    c.tail_days = 12;
    const EligibleDays d = find_eligible_days(log, c);
    CHECK(d.first_block == 10);
    CHECK(d.blocks == 41);
    std::map<std::string, const Encounter*> by_id;
    for (const Encounter& e : log.encounters) by_id[e.id] = &e;
    const Instant from = log.period_start + days(10), until = log.period_start + days(51);
    for (std::uint64_t r = 1; r <= 3; ++r)
        for (const Encounter& copy : bootstrap_population(log, c, d, 4, r).encounters) {
            const Encounter& original = *by_id.at(source_id(copy.id));
            if (copy.id.ends_with("~census")) {
                // present when an eligible day began
                const Instant began = original.admitted + (log.period_start - copy.admitted);
                CHECK(began >= from);
                CHECK(began < until);
                CHECK(original.admitted < began);
                CHECK(original.discharged > began);
            } else {
                CHECK(original.admitted >= from);
                CHECK(original.admitted < until);
            }
        }
    // Nothing left: refused, saying what to declare.
    c.warm_up_days = 40;
    c.tail_days = 30;
    CHECK_THROWS_WITH_AS(find_eligible_days(log, c), doctest::Contains("declare warm_up_days and tail_days"),
                         std::invalid_argument);
}

TEST_CASE("bootstrap.stay_rule") {
    // 19 stays of 2 days for each of 12 days: 50 days of patient time per
    // 20 stays; 5% is 2.5. Beyond 9 days: 3 > 2.5; beyond 10: 2 <= 2.5. So
    // x = 10, not the longest stay (12).
    Population pop;
    pop.units = {"ward"};
    pop.period_start = midnight_utc(2026, 3, 2);
    for (int i = 0; i < 20; ++i) {
        Encounter e;
        e.id = "S" + std::to_string(i);
        e.admitted = pop.period_start + hours(i);
        e.discharged = e.admitted + days(i == 0 ? 12 : 2);
        pop.encounters.push_back(e);
    }
    pop.period_end = pop.period_start + days(40);
    pop.score_start.assign(pop.encounters.size() + 1, 0);
    BootstrapConfig c;
    c.warm_up_days = 0;  // the tail is found, so the stay rule runs
    const EligibleDays d = find_eligible_days(pop, c);
    CHECK(d.stay_days == 10);
    CHECK(d.warm_up_days == 0);
    CHECK(d.tail_found);
}

TEST_CASE("bootstrap.admits_nobody_after_the_logs_last_admission") {
    // A log that follows its patients to discharge but stops admitting 10 days
    // before its end: with a tail, replications stop admitting where it does
    // (so whole-period counts stay comparable); drawing from every day as
    // before (tail_days: 0) fills those days with admissions.
    Population log = nine_week_log();
    const Instant stop = log.period_end - days(10);
    std::vector<Score> scores;
    std::vector<std::uint32_t> owner;
    Population cut;
    cut.units = log.units;
    cut.period_start = log.period_start;
    cut.period_end = log.period_end;
    Instant last = log.period_start;
    for (std::size_t e = 0; e < log.encounters.size(); ++e) {
        if (log.encounters[e].admitted >= stop) continue;
        last = std::max(last, log.encounters[e].admitted);
        for (const Score& s : log.scores_of(e)) {
            scores.push_back(s);
            owner.push_back(static_cast<std::uint32_t>(cut.encounters.size()));
        }
        cut.encounters.push_back(log.encounters[e]);
    }
    group_scores_by_encounter(cut, scores, owner);
    const EligibleDays found = find_eligible_days(cut, {});
    CHECK(found.tail_days >= 10);  // the census rule sees the drain
    BootstrapConfig every_day;
    every_day.warm_up_days = every_day.tail_days = 0;
    for (std::uint64_t r = 1; r <= 3; ++r) {
        Instant latest = cut.period_start, latest_before = cut.period_start;
        for (const Encounter& e : bootstrap_population(cut, {}, found, 2, r).encounters) latest = std::max(latest, e.admitted);
        for (const Encounter& e : bootstrap_population(cut, every_day, 2, r).encounters)
            latest_before = std::max(latest_before, e.admitted);
        CHECK(latest <= last);
        CHECK(latest > last - days(1));
        CHECK(latest_before > stop);
    }
}
