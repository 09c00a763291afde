// Shift stress tests: a population changed from a given instant on.
#include <doctest/doctest.h>

#include <cmath>
#include <algorithm>
#include <map>
#include <stdexcept>

#include "models/generator.hpp"
#include "models/stress.hpp"
#include "population_fixtures.hpp"

using namespace tocsin;
using namespace tocsin::testing;

namespace {

const Population& ninety_days() {
    static const Population pop = generate_population(two_wards(90), 8, 0);
    return pop;
}

Instant day(int n) { return midnight_utc(2026, 1, 5) + days(n); }

struct AfterShift {
    double admitted = 0, cases = 0;
};
AfterShift after(const Population& p, std::uint32_t unit, Instant from) {
    AfterShift a;
    for (const Encounter& e : p.encounters)
        if (e.unit == unit && e.admitted >= from) {
            a.admitted += 1;
            a.cases += e.outcome_at ? 1 : 0;
        }
    return a;
}

std::map<std::string, std::size_t> index_by_id(const Population& p) {
    std::map<std::string, std::size_t> m;
    for (std::size_t e = 0; e < p.encounters.size(); ++e) m[p.encounters[e].id] = e;
    return m;
}

}  // namespace

TEST_CASE("stress.patients_before_the_shift_are_unchanged") {
    // Every knob at once from day 45; before day 45 nothing may move.
    const Population& pop = ninety_days();
    ShiftStress s;
    s.from = day(45);
    s.outcome_rate_multiplier = 2;
    s.score_scale = 1.1;
    s.score_offset = 5;
    s.cadence_minutes = 120;
    s.outage_start = day(50);
    s.outage_hours = 6;
    s.census_multiplier["ward-north"] = 1.5;
    const Population shifted = apply_shift(pop, s, 4, 1);
    CHECK(serialize(shifted) == serialize(apply_shift(pop, s, 4, 1)));
    CHECK(serialize(shifted) != serialize(apply_shift(pop, s, 4, 2)));

    const auto in_shifted = index_by_id(shifted);
    std::int64_t checked_scores = 0;
    for (std::size_t e = 0; e < pop.encounters.size(); ++e) {
        const Encounter& before = pop.encounters[e];
        if (before.admitted >= s.from) continue;
        REQUIRE(in_shifted.count(before.id) == 1);
        const std::size_t f = in_shifted.at(before.id);
        const Encounter& now = shifted.encounters[f];
        CHECK(now.admitted == before.admitted);
        CHECK(now.discharged == before.discharged);
        CHECK(now.outcome_at == before.outcome_at);
        std::vector<Score> early_before, early_now;
        for (const Score& x : pop.scores_of(e)) if (x.available_at < s.from) early_before.push_back(x);
        for (const Score& x : shifted.scores_of(f)) if (x.available_at < s.from) early_now.push_back(x);
        REQUIRE(early_before.size() == early_now.size());
        for (std::size_t i = 0; i < early_now.size(); ++i) {
            CHECK(early_now[i].value == early_before[i].value);
            CHECK(early_now[i].scored_at == early_before[i].scored_at);
            ++checked_scores;
        }
    }
    CHECK(checked_scores > 10000);
}

TEST_CASE("stress.feed_outage") {
    const Population& pop = ninety_days();
    ShiftStress s;
    s.from = day(30);
    s.outage_start = day(30) + hours(20);  // 20:00 to 02:00 UTC
    s.outage_hours = 6;
    const Instant outage_end = s.outage_start + hours(6);
    std::int64_t in_window = 0;
    for (const Score& x : pop.scores) in_window += x.available_at >= s.outage_start && x.available_at < outage_end;
    REQUIRE(in_window > 100);  // ~56 patients scored hourly for 6 h
    const Population shifted = apply_shift(pop, s, 1, 1);
    for (const Score& x : shifted.scores) CHECK_FALSE((x.available_at >= s.outage_start && x.available_at < outage_end));
    CHECK(shifted.excluded.scores_by_reason.at("feed outage (shift stress test)") == in_window);
    CHECK(shifted.scores.size() + static_cast<std::size_t>(in_window) == pop.scores.size());
}

TEST_CASE("stress.score_offset_and_scale") {
    // One patient scored at 10:00 and 14:00 UTC; the shift starts at 12:00.
    Population pop;
    pop.units = {"ward"};
    pop.period_start = day(0);
    pop.period_end = day(1);
    pop.encounters = {Encounter{"p1", 0, day(0) + hours(9), day(0) + hours(20), std::nullopt}};
    SUBCASE("points: x 1.5 + 10, clamped at 100") {
        pop.scores = {Score{day(0) + hours(10), day(0) + hours(10), 40}, Score{day(0) + hours(14), day(0) + hours(14), 40},
                      Score{day(0) + hours(15), day(0) + hours(15), 70}};
        pop.score_start = {0, 3};
        ShiftStress s;
        s.from = day(0) + hours(12);
        s.score_scale = 1.5;
        s.score_offset = 10;
        const Population shifted = apply_shift(pop, s, 1, 1);
        CHECK(shifted.scores[0].value == 40);   // before the shift
        CHECK(shifted.scores[1].value == 70);   // 40 x 1.5 + 10
        CHECK(shifted.scores[2].value == 100);  // 70 x 1.5 + 10 = 115, clamped
    }
    SUBCASE("probability: an offset of ln 2 doubles the odds") {
        pop.scores = {Score{day(0) + hours(10), day(0) + hours(10), 0.2}, Score{day(0) + hours(14), day(0) + hours(14), 0.2}};
        pop.score_start = {0, 2};
        ShiftStress s;
        s.from = day(0) + hours(12);
        s.scale = ScoreScale::probability;
        s.score_offset = std::log(2.0);
        const Population shifted = apply_shift(pop, s, 1, 1);
        CHECK(shifted.scores[0].value == 0.2);
        CHECK(shifted.scores[1].value == doctest::Approx(1.0 / 3.0));  // odds 0.25 -> 0.5
    }
}

TEST_CASE("stress.outcome_rate_multiplier") {
    // From day 30, about 1,100 admissions per ward with ~8 % cases. Doubling:
    // each control becomes a case with r = (2p - p) / (1 - p), so the count of
    // cases after the shift is n_cases + Binomial(n_controls, r): tolerance 4 sd.
    // Halving: each case stays with probability 1/2: Binomial(n_cases, 1/2).
    const Population& pop = ninety_days();
    for (double m : {2.0, 0.5}) {
        ShiftStress s;
        s.from = day(30);
        s.outcome_rate_multiplier = m;
        const Population shifted = apply_shift(pop, s, 3, 1);
        for (std::uint32_t u = 0; u < 2; ++u) {
            const AfterShift a = after(pop, u, s.from), b = after(shifted, u, s.from);
            CHECK(b.admitted == a.admitted);  // replaced, not added
            const double p = a.cases / a.admitted;
            double sd;
            if (m > 1) {
                const double r = (m * p - p) / (1 - p);
                sd = std::sqrt((a.admitted - a.cases) * r * (1 - r));
            } else {
                sd = std::sqrt(a.cases * 0.25);
            }
            INFO("multiplier " << m << ", unit " << u << ": cases " << a.cases << " -> " << b.cases);
            CHECK(std::abs(b.cases - m * a.cases) <= 4 * sd);
        }
        CHECK(after(shifted, 0, 0).cases - after(shifted, 0, s.from).cases ==
              after(pop, 0, 0).cases - after(pop, 0, s.from).cases);  // before: same cases
    }
}

TEST_CASE("stress.census_raised_on_one_unit") {
    // x 1.5 on ward-north: one extra admission with probability 1/2 per
    // admission after the shift: extra ~ Binomial(n, 1/2), tolerance 4 sd.
    const Population& pop = ninety_days();
    ShiftStress s;
    s.from = day(60);
    s.census_multiplier["ward-north"] = 1.5;
    const Population shifted = apply_shift(pop, s, 5, 1);
    const double n = after(pop, 0, s.from).admitted;
    const double extra = after(shifted, 0, s.from).admitted - n;
    CHECK(std::abs(extra - 0.5 * n) <= 4 * std::sqrt(n * 0.25));
    CHECK(shifted.excluded.notes.at("shift: extra admissions (census raised): ward-north") == extra);
    CHECK(after(shifted, 1, 0).admitted == after(pop, 1, 0).admitted);  // ward-south untouched
    for (const Encounter& e : shifted.encounters)
        if (e.id.find("+extra") != std::string::npos) CHECK(e.admitted >= s.from);
}

TEST_CASE("stress.slower_cadence") {
    // The log scores hourly (+/- 10 min). From day 30, at most one score per
    // encounter per 2-hour window: about half the scores go.
    const Population& pop = ninety_days();
    ShiftStress s;
    s.from = day(30);
    s.cadence_minutes = 120;
    const Population shifted = apply_shift(pop, s, 1, 1);
    std::int64_t before = 0, now = 0;
    for (const Score& x : pop.scores) before += x.scored_at >= s.from;
    for (std::size_t e = 0; e < shifted.encounters.size(); ++e) {
        std::vector<Instant> windows;
        for (const Score& x : shifted.scores_of(e))
            if (x.scored_at >= s.from) {
                windows.push_back((x.scored_at - s.from) / hours(2));
                ++now;
            }
        std::sort(windows.begin(), windows.end());
        CHECK(std::adjacent_find(windows.begin(), windows.end()) == windows.end());
    }
    // Expected, recomputed from the log: one score per occupied 2-hour window.
    std::int64_t occupied_windows = 0;
    for (std::size_t e = 0; e < pop.encounters.size(); ++e) {
        std::vector<Instant> windows;
        for (const Score& x : pop.scores_of(e))
            if (x.scored_at >= s.from) windows.push_back((x.scored_at - s.from) / hours(2));
        std::sort(windows.begin(), windows.end());
        occupied_windows += std::unique(windows.begin(), windows.end()) - windows.begin();
    }
    CHECK(now == occupied_windows);
    // Two hourly scores per window, plus part-filled windows at the ends of stays.
    CHECK(now > 0.45 * static_cast<double>(before));
    CHECK(now < 0.6 * static_cast<double>(before));
    CHECK(shifted.excluded.scores_by_reason.at("not scored under the slower cadence (shift stress test)") == before - now);
}

TEST_CASE("stress.validation") {
    const Population& pop = ninety_days();
    ShiftStress s;
    s.census_multiplier["ward-east"] = 2;
    CHECK_THROWS_WITH_AS(apply_shift(pop, s, 1, 1), doctest::Contains("unknown unit \"ward-east\" (units: ward-north, ward-south)"),
                         std::invalid_argument);
    ShiftStress early;
    early.from = day(10);
    early.outage_start = day(9);
    early.outage_hours = 2;
    CHECK_THROWS_WITH_AS(validate(early, pop), doctest::Contains("outage_start"), std::invalid_argument);
}
