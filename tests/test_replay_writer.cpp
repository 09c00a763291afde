// Writing a population as the replay CSVs: what load_replay reads back is the
// same population (encounters in order, units, instants to the second,
// outcomes, scores bit for bit), for generated, stress-tested and resampled
// populations, awkward text and numbers; what would not come back is refused.
#include <doctest/doctest.h>

#include <cmath>
#include <cstdio>
#include <limits>
#include <stdexcept>
#include <string>

#include "models/bootstrap.hpp"
#include "models/generator.hpp"
#include "models/population_source.hpp"
#include "models/replay.hpp"
#include "models/replay_writer.hpp"
#include "models/stress.hpp"
#include "population_fixtures.hpp"
#include "study/scenario.hpp"
#include "test_support.hpp"

using namespace tocsin;
using tocsin::testing::population_rows;
using tocsin::testing::ScratchDir;

namespace {

// Writes `pop` as the replay files in `dir` and reads them back with the
// settings that go with them.
Population round_trip(const Population& pop, const TimeZone& zone, const ScratchDir& dir, double low = 0,
                      double high = 100) {
    const ReplayText text = replay_csv(pop, zone);
    const ReplaySource source = replay_settings_for(pop, low, high, dir.file("encounters.csv", text.encounters),
                                                    dir.file("scores.csv", text.scores));
    // The zone the replaying scenario declares does not matter: every instant carries its offset.
    return load_replay(source, TimeZone::utc());
}

void check_nothing_dropped(const Population& replayed) {
    CHECK(replayed.excluded.scores_by_reason.empty());
    CHECK(replayed.excluded.encounters_by_reason.empty());
    CHECK(replayed.excluded.notes.empty());
    CHECK(replayed.excluded.rows_skipped.empty());
}

// Four weeks around the start of British Summer Time (29 March 2026).
GeneratorConfig london_wards() {
    GeneratorConfig c = testing::two_wards(28);
    c.period_start = testing::midnight_utc(2026, 3, 16);
    c.period_end = c.period_start + 28 * 86400;
    c.zone = TimeZone::load("Europe/London");
    return c;
}

}  // namespace

TEST_CASE("replay_writer.generated_population_comes_back") {
    const GeneratorConfig config = london_wards();
    ScratchDir dir;
    SUBCASE("points") {
        const Population pop = generate_population(config, 11, 0);
        REQUIRE(pop.scores.size() > 10000);
        const Population back = round_trip(pop, config.zone, dir);
        CHECK(population_rows(back) == population_rows(pop));
        CHECK(back.units == pop.units);  // already in name order
        check_nothing_dropped(back);
    }
    SUBCASE("probability scale: long decimals on the logit scale") {
        GeneratorConfig c = config;
        c.scores.scale = ScoreScale::probability;
        c.scores.baseline = -3;
        c.scores.between_patient_sd = 0.5;
        c.scores.within_patient_sd = 0.5;
        c.scores.drift_size = 2;
        const Population pop = generate_population(c, 11, 2);
        const Population back = round_trip(pop, c.zone, dir, 0, 1);
        CHECK(population_rows(back) == population_rows(pop));
        check_nothing_dropped(back);
    }
    SUBCASE("a stress test: raised census (copied stays), outage, offset scores") {
        ShiftStress shift;
        shift.from = config.period_start + 14 * 86400;
        shift.outage_start = shift.from + 3600;
        shift.outage_hours = 6;
        shift.score_offset = 7;
        shift.census_multiplier["ward-south"] = 1.5;
        const Population pop = apply_shift(generate_population(config, 11, 1), shift, 11, 1);
        const Population back = round_trip(pop, config.zone, dir);
        CHECK(population_rows(back) == population_rows(pop));
        check_nothing_dropped(back);
    }
    SUBCASE("a bootstrap replication of a log (ids carry the block suffix)") {
        const Population log = generate_population(config, 11, 0);
        const Population pop = bootstrap_population(log, BootstrapConfig{}, 11, 3);
        REQUIRE(population_rows(pop).find('~') != std::string::npos);
        const Population back = round_trip(pop, config.zone, dir);
        CHECK(population_rows(back) == population_rows(pop));
        check_nothing_dropped(back);
    }
}

TEST_CASE("replay_writer.awkward_text_and_numbers_come_back") {
    Population pop;
    pop.units = {"Wärd \"B\", east", "ward A"};  // not in name order: the replay renumbers
    const Instant t0 = testing::midnight_utc(2026, 10, 24);
    pop.encounters = {{"a,1", 0, t0, t0 + 86400, t0 + 86400},  // outcome at discharge: its last instant
                      {"\"q\"", 1, t0 + 3600, t0 + 7200, std::nullopt},
                      {"no scores", 1, t0, t0 + 60, std::nullopt}};
    const double tiny = std::numeric_limits<double>::denorm_min();
    pop.scores = {{t0 + 10, t0, 0.1 + 0.2}, {t0 + 20, t0 + 20, -0.0}, {t0 + 30, t0 + 25, tiny},
                  {t0 + 40, t0 + 40, std::nextafter(100.0, 0.0)}, {t0 + 3601, t0 + 3600, 1.0 / 3}};
    pop.score_start = {0, 4, 5, 5};
    // Local mean time: Amsterdam's offset in 1900 had seconds (+00:19:32).
    const TimeZone zone = TimeZone::load("Europe/Amsterdam");
    ScratchDir dir;
    const Population now = round_trip(pop, zone, dir);
    CHECK(now.units == std::vector<std::string>{"Wärd \"B\", east", "ward A"});
    CHECK(population_rows(now) == population_rows(pop));
    CHECK(std::signbit(now.scores[1].value));

    Population old = pop;
    const Seconds back = t0 - testing::midnight_utc(1900, 1, 1);
    for (Encounter& e : old.encounters) {
        e.admitted -= back;
        e.discharged -= back;
        if (e.outcome_at) *e.outcome_at -= back;
    }
    for (Score& s : old.scores) {
        s.available_at -= back;
        s.scored_at -= back;
    }
    const ReplayText text = replay_csv(old, zone);
    CHECK(text.encounters.find("\"a,1\",\"Wärd \"\"B\"\", east\",1900-01-01T00:19:32+00:19:32,") != std::string::npos);
    CHECK(population_rows(round_trip(old, zone, dir)) == population_rows(old));
}

TEST_CASE("replay_writer.settings_widen_to_what_was_written") {
    Population pop;
    pop.units = {"ward"};
    const Instant t0 = testing::midnight_utc(2026, 1, 5);
    pop.encounters = {{"long", 0, t0, t0 + 400 * 86400 + 1, std::nullopt}, {"short", 0, t0, t0 + 3600, std::nullopt}};
    pop.scores = {{t0, t0, 250.5}, {t0 + 60, t0 + 60, -3}};
    pop.score_start = {0, 1, 2};
    const ReplaySource s = replay_settings_for(pop, 0, 100, "e.csv", "s.csv");
    CHECK(s.score_low == -3);
    CHECK(s.score_high == 250.5);
    CHECK(s.max_stay_days == 401);
    CHECK(s.far_out_fence_iqr == 0);
    ScratchDir dir;
    CHECK(population_rows(round_trip(pop, TimeZone::utc(), dir)) == population_rows(pop));

    // With the reader's defaults the same files would be refused.
    const ReplayText text = replay_csv(pop, TimeZone::utc());
    ReplaySource plain;
    plain.encounters_path = dir.file("e.csv", text.encounters);
    plain.scores_path = dir.file("s.csv", text.scores);
    CHECK_THROWS_AS(load_replay(plain, TimeZone::utc()), InputError);

    // The usual range is kept when every score lies inside it.
    pop.scores = {{t0, t0, 0.5}, {t0 + 60, t0 + 60, 0.25}};
    const ReplaySource p = replay_settings_for(pop, 0, 1, "e.csv", "s.csv");
    CHECK(p.score_low == 0);
    CHECK(p.score_high == 1);
}

TEST_CASE("replay_writer.refuses_what_would_not_come_back") {
    Population pop;
    pop.units = {"ward"};
    const Instant t0 = testing::midnight_utc(2026, 1, 5);
    pop.encounters = {{"x", 0, t0, t0 + 86400, std::nullopt}, {"y", 0, t0, t0 + 86400, t0 + 3600}};
    pop.scores = {{t0 + 60, t0, 10}, {t0 + 120, t0 + 120, 20}};
    pop.score_start = {0, 2, 2};
    REQUIRE_NOTHROW(replay_csv(pop, TimeZone::utc()));
    std::string expected;
    SUBCASE("repeated id") {
        pop.encounters[1].id = "x";
        expected = "encounter 'x' cannot be written as a log that replays the same: the id is repeated";
    }
    SUBCASE("control character in a unit name") {
        pop.units[0] = "ward\t2";
        expected = "encounter 'x' cannot be written as a log that replays the same: unit name: control character U+0009";
    }
    SUBCASE("empty id") {
        pop.encounters[1].id = "";
        expected = "encounter '' cannot be written as a log that replays the same: empty id";
    }
    SUBCASE("a stay that ends as it starts") {
        pop.encounters[1].discharged = t0;
        expected = "the stay does not end after it starts";
    }
    SUBCASE("outcome after discharge") {
        pop.encounters[1].outcome_at = t0 + 2 * 86400;
        expected = "the outcome lies outside the stay";
    }
    SUBCASE("two scores at one scored_at") {
        pop.scores[1].scored_at = t0;
        expected = "encounter 'x' cannot be written as a log that replays the same: two scores have the same scored_at";
    }
    SUBCASE("a score the reader would not use") {
        pop.scores[1].available_at = t0 + 86400;
        expected = "a score is available outside the stay";
    }
    SUBCASE("a score that is not a number") {
        pop.scores[0].value = std::nan("");
        expected = "a score is not a finite number";
    }
    CHECK_THROWS_WITH_AS(replay_csv(pop, TimeZone::utc()), doctest::Contains(expected.c_str()), std::invalid_argument);
}

TEST_CASE("replay_writer.fragment_loads_as_the_replay") {
    const GeneratorConfig config = london_wards();
    const Population pop = generate_population(config, 5, 0);
    ScratchDir dir;
    const ReplayText text = replay_csv(pop, config.zone);
    dir.file("encounters.csv", text.encounters);
    dir.file("scores.csv", text.scores);
    const ReplaySource settings = replay_settings_for(pop, 0, 100, "encounters.csv", "scores.csv");
    ReplayFragmentInfo info{"a test, replication 0", "Europe/London", config.period_start, config.period_end};
    const std::string fragment = replay_scenario_fragment(settings, info, config.zone);
    CHECK(fragment.find("from: \"2026-03-16T00:00:00+00:00\"") != std::string::npos);
    CHECK(fragment.find("until: \"2026-04-13T01:00:00+01:00\"") != std::string::npos);
    CHECK(fragment.find("encounter ids") != std::string::npos);

    const std::string scenario = "scenario_schema: 1\nname: replay of a written population\nseed: 5\n"
                                 "shifts:\n  - {name: day, starts: \"08:00\"}\n  - {name: night, starts: \"20:00\", night: true}\n"
                                 "outcome: {window_hours: 24}\nplans:\n  - name: p\n    rule: {threshold: 60}\n" + fragment;
    const Scenario sc = parse_scenario(scenario, dir.path("s.yaml"), dir.path());
    CHECK(sc.time_zone_name == "Europe/London");
    CHECK(sc.analysis.period_start == config.period_start);
    CHECK(sc.analysis.period_end == config.period_end);
    CHECK(sc.population.replay.score_low == settings.score_low);
    CHECK(sc.population.replay.score_high == settings.score_high);
    CHECK(sc.population.replay.max_stay_days == settings.max_stay_days);
    CHECK(sc.population.replay.far_out_fence_iqr == 0);
    CHECK(population_rows(population_for(sc.population, prepare_population(sc.population), 0)) == population_rows(pop));
}
