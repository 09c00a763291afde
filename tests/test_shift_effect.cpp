// Before/after figures of a stress-test shift.
#include <doctest/doctest.h>

#include "study/shift_effect.hpp"
#include "report/study_answers.hpp"
#include "models/population_source.hpp"
#include "study/scenario.hpp"

using namespace tocsin;

namespace {

// Two wards over four weeks, every score checked against a low threshold;
// from 2026-01-19 (two weeks in) `shift` applies.
std::string scenario(const std::string& shift) {
    return "scenario_schema: 1\nname: test\ntime_zone: UTC\nseed: 5\nreplications: 8\n"
           "shifts:\n  - {name: day, starts: \"07:00\"}\n  - {name: night, starts: \"19:00\", night: true}\n"
           "outcome: {window_hours: 12}\n"
           "population:\n"
           "  generate:\n"
           "    start: 2026-01-05T00:00:00Z\n"
           "    end: 2026-02-02T00:00:00Z\n"
           "    units:\n"
           "      - {name: north, beds: 20, arrivals_per_hour: [0.25]}\n"
           "      - {name: south, beds: 20, arrivals_per_hour: [0.25]}\n"
           "  shift:\n    from: 2026-01-19T07:00:00Z\n" + shift +
           "plans:\n  - name: low\n    rule: {threshold: 35, snooze_minutes: 240}\n";
}

}  // namespace

TEST_CASE("shift_effect.raised_census_shows_as_more_notices") {
    // Three times the admissions on both wards from day 14: after a few days
    // the census is about three times higher (beds are not enforced), so
    // notices per unit per night rise well beyond the replication noise.
    const Scenario sc = parse_scenario(scenario("    census: [{unit: north, multiplier: 3}, {unit: south, multiplier: 3}]\n"),
                                       "s.yaml", "");
    const ShiftEffect effect = shift_effect(sc, population_factory(sc.population), 2);
    const Table table = shift_effect_table(effect);
    REQUIRE(table.rows.size() == 3);  // one plan x three metrics
    const auto& night = table.rows[0];
    CHECK(std::get<std::string>(night[1]) == "per_unit_night_mean");
    const double before = std::get<double>(night[2]), after = std::get<double>(night[5]);
    const double change_low = std::get<double>(night[9]);
    CHECK(after > 1.5 * before);
    CHECK(change_low > 0);
    CHECK(std::get<std::int64_t>(night[11]) == 8);
    CHECK(shift_effect_text(effect, sc.simulation.zone).find("notices per unit per night") != std::string::npos);
}

TEST_CASE("shift_effect.feed_outage_silences_its_hours") {
    // A feed outage covering every night after the start (14 days) leaves no
    // score available at night after the shift: notices at night drop to 0.
    const Scenario sc = parse_scenario(scenario("    outage_hours: 336\n"), "s.yaml", "");
    const ShiftEffect effect = shift_effect(sc, population_factory(sc.population), 1);
    const Table table = shift_effect_table(effect);
    const auto& night = table.rows[0];
    CHECK(std::get<double>(night[2]) > 0);
    CHECK(std::get<double>(night[5]) == 0);
}
