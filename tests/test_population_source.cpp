// Population sources from the scenario file: generate, bootstrap and shift
// keys, their errors, the fitted fragment loading back, and `tocsin fit`.
#include <doctest/doctest.h>

#include <filesystem>
#include <sstream>
#include <stdexcept>
#include <unistd.h>

#include "models/errors.hpp"
#include "models/fit.hpp"
#include "population_fixtures.hpp"
#include "models/population_source.hpp"
#include "study/scenario.hpp"
#include "test_support.hpp"

using namespace tocsin;

namespace {

const std::string head =
    "scenario_schema: 1\n"                             // 1
    "name: test\n"                                     // 2
    "time_zone: UTC\n"                                 // 3
    "seed: 3\n"                                        // 4
    "shifts:\n"                                        // 5
    "  - {name: day, starts: \"07:00\"}\n"             // 6
    "  - {name: night, starts: \"19:00\", night: true}\n"  // 7
    "outcome: {window_hours: 12}\n"                    // 8
    "plans:\n"                                         // 9
    "  - name: p\n"                                    // 10
    "    rule: {threshold: 60}\n";                     // 11

// Two small wards over four weeks; `extra` lands inside `population:`.
std::string generated(const std::string& units_extra = "", const std::string& extra = "") {
    return head +
           "population:\n"                                  // 12
           "  generate:\n"                                  // 13
           "    start: 2026-01-05T00:00:00Z\n"              // 14
           "    end: 2026-02-02T00:00:00Z\n"                // 15
           "    units:\n"                                   // 16
           "      - {name: north, beds: 20, arrivals_per_hour: [0.25]}\n"  // 17
           "      - name: south\n"                          // 18
           "        beds: 20\n"                             // 19
           "        arrivals_per_hour: [0.1, 0.1, 0.1, 0.1, 0.1, 0.1, 0.1, 0.1, 0.4, 0.4, 0.4, 0.4,\n"
           "                            0.4, 0.4, 0.4, 0.4, 0.4, 0.4, 0.4, 0.4, 0.1, 0.1, 0.1, 0.1]\n" +
           units_extra + "    scores: {cadence_minutes: 60, jitter_minutes: 5}\n" + extra;
}

InputError parse_error(const std::string& text) { return tocsin::testing::scenario_error(text); }

}  // namespace

TEST_CASE("population_source.generate_from_the_scenario") {
    const Scenario sc = parse_scenario(generated(), "s.yaml", "");
    REQUIRE(sc.population.source == PopulationSource::generate);
    REQUIRE(sc.population.generator.units.size() == 2);
    CHECK(sc.population.generator.units[0].arrivals_per_hour[100] == 0.25);  // one number: every hour
    CHECK(sc.population.generator.units[1].arrivals_per_hour[24 * 3 + 9] == 0.4);  // 24 numbers: Thursday 09 h
    CHECK(sc.population.generator.units[1].arrivals_per_hour[24 * 6 + 23] == 0.1);
    CHECK(sc.population.generator.period_start == testing::midnight_utc(2026, 1, 5));
    CHECK(sc.population.generator.scores.jitter_minutes == 5);

    const PreparedPopulation prepared = prepare_population(sc.population);
    const std::string first = testing::serialize(population_for(sc.population, prepared, 0));
    CHECK(first == testing::serialize(population_for(sc.population, prepared, 0)));
    CHECK(first != testing::serialize(population_for(sc.population, prepared, 1)));
    // The scenario's seed and replication are the generator's.
    CHECK(first == testing::serialize(generate_population(sc.population.generator, 3, 0)));
}

TEST_CASE("population_source.shift_from_the_scenario") {
    const Scenario sc = parse_scenario(generated("", "  shift:\n    from: 2026-01-19T00:00:00Z\n    outage_hours: 4\n"
                                                     "    census: [{unit: south, multiplier: 2}]\n"),
                                       "s.yaml", "");
    REQUIRE(sc.population.shift.has_value());
    CHECK(sc.population.shift->outage_start == sc.population.shift->from);  // defaults to the shift's start
    const Population pop = population_for(sc.population, prepare_population(sc.population), 0);
    CHECK(pop.excluded.scores_by_reason.at("feed outage (shift stress test)") > 0);
    CHECK(pop.excluded.notes.at("shift: extra admissions (census raised): south") > 0);
}

TEST_CASE("population_source.errors_name_the_key") {
    SUBCASE("both sources") {
        const InputError e = parse_error(generated("", "  replay: {encounters: e.csv, scores: s.csv}\n"));
        CHECK(std::string(e.what()).find("exactly one population source") != std::string::npos);
    }
    SUBCASE("arrivals of the wrong length") {
        const InputError e = parse_error(generated("      - {name: east, beds: 4, arrivals_per_hour: [1, 2, 3]}\n"));
        CHECK(e.line == 22);
        CHECK(e.field == "population.generate.units[2].arrivals_per_hour");
        CHECK(std::string(e.what()).find("found 3 numbers") != std::string::npos);
    }
    SUBCASE("arrivals above the declared range") {
        const InputError e = parse_error(generated("      - {name: east, beds: 4, arrivals_per_hour: [2e6]}\n"));
        CHECK(e.field == "population.generate.units[2].arrivals_per_hour");
        CHECK(std::string(e.what()).find("'2e6' is out of range (expected 0 to 1000000 admissions per hour)") !=
              std::string::npos);
    }
    SUBCASE("bootstrap of a generated population") {
        const InputError e = parse_error(generated("", "  bootstrap: {block_days: 7}\n"));
        CHECK(std::string(e.what()).find("bootstrap resamples a replayed log") != std::string::npos);
    }
    SUBCASE("shift on an unknown unit") {
        const InputError e = parse_error(generated("", "  shift: {from: 2026-01-19T00:00:00Z, census: [{unit: west, multiplier: 2}]}\n"));
        CHECK(std::string(e.what()).find("unknown unit 'west' (units: north, south)") != std::string::npos);
    }
    SUBCASE("an AUC out of reach") {
        std::string text = generated();
        text.replace(text.find("jitter_minutes: 5}"), 18, "jitter_minutes: 5, within_patient_sd: 40, target_auc: 0.99}");
        const Scenario sc = parse_scenario(text, "s.yaml", "");
        try {
            prepare_population(sc.population);
            FAIL("expected an InputError");
        } catch (const InputError& e) {
            CHECK(e.field == "population.generate.scores.target_auc");
            CHECK(e.line == 22);
            CHECK(std::string(e.what()).find("cannot be reached") != std::string::npos);
        }
    }
}

TEST_CASE("population_source.fitted_fragment_loads_back") {
    // Fit a generated log, write the fragment, splice it into a scenario: the
    // loader must read back the same knobs (the writer and the key table agree).
    const GeneratorFit fit = fit_generator(generate_population(testing::two_wards(60), 4, 0));
    const Scenario sc = parse_scenario(head + scenario_fragment(fit.config, fit.notes), "s.yaml", "");
    const GeneratorConfig& a = fit.config;
    const GeneratorConfig& b = sc.population.generator;
    REQUIRE(b.units.size() == 2);
    CHECK(b.units[1].name == "ward-south");
    CHECK(b.units[1].beds == a.units[1].beds);
    for (int h = 0; h < hours_per_week; ++h)
        CHECK(b.units[0].arrivals_per_hour[h] == doctest::Approx(a.units[0].arrivals_per_hour[h]).epsilon(1e-5));
    CHECK(b.period_start == a.period_start);
    CHECK(b.stay.median_hours == doctest::Approx(a.stay.median_hours).epsilon(1e-5));
    CHECK(b.outcome.probability == doctest::Approx(a.outcome.probability).epsilon(1e-5));
    CHECK(b.scores.drift_size == doctest::Approx(a.scores.drift_size).epsilon(1e-5));
    CHECK(b.scores.latency_log_sd == doctest::Approx(a.scores.latency_log_sd).epsilon(1e-5));
}

TEST_CASE("population_source.bootstrap_of_the_demo_log") {
    Scenario sc = load_scenario(std::string(TOCSIN_SOURCE_DIR) + "/scenarios/fernhollow-replay.yaml");
    sc.population.bootstrap = BootstrapConfig{};
    const PreparedPopulation prepared = prepare_population(sc.population);
    CHECK(testing::serialize(population_for(sc.population, prepared, 0)) == testing::serialize(*prepared.log));
    const Population rep = population_for(sc.population, prepared, 1);
    CHECK(testing::serialize(rep) != testing::serialize(*prepared.log));
    CHECK(rep.units == prepared.log->units);
}

TEST_CASE("population_source.cli_fit") {
    testing::ScratchDir dir;
    const auto r = testing::run_tocsin("fit " + std::string(TOCSIN_SOURCE_DIR) + "/scenarios/fernhollow-replay.yaml --by-hour-of-day -o " +
                                       dir.path("fitted.yaml"));
    INFO(r.output);
    REQUIRE(r.exit_code == 0);
    const std::string fragment = testing::read_file(dir.path("fitted.yaml"));
    CHECK(fragment.find("population:\n  generate:\n") != std::string::npos);
    CHECK(fragment.find("keep `time_zone: America/Chicago`") != std::string::npos);
    CHECK_NOTHROW(parse_scenario(head + fragment, "fitted.yaml", ""));
}

// The demo's invented log with every score mapped by `rescale`, replayed by a
// small scenario in `dir` (s.yaml).
template <typename Rescale>
std::string rescaled_demo_log(const testing::ScratchDir& dir, Rescale rescale) {
    const std::string source = testing::read_file(std::string(TOCSIN_SOURCE_DIR) + "/scenarios/demo/scores.csv");
    std::istringstream in(source);
    std::string line, out;
    std::getline(in, line);
    out = line + "\n";
    while (std::getline(in, line)) {
        const std::size_t comma = line.rfind(',');
        std::ostringstream value;
        value << rescale(std::stod(line.substr(comma + 1)));
        out += line.substr(0, comma + 1) + value.str() + "\n";
    }
    dir.file("demo/scores.csv", out);
    dir.file("demo/encounters.csv", testing::read_file(std::string(TOCSIN_SOURCE_DIR) + "/scenarios/demo/encounters.csv"));
    return dir.file("s.yaml", head + "population:\n  replay:\n    encounters: demo/encounters.csv\n    scores: demo/scores.csv\n");
}

TEST_CASE("population_source.cli_fit_detects_the_scale") {
    SUBCASE("a 0-1 log is fitted on the probability scale, and the output says why") {
        testing::ScratchDir dir;
        const std::string scenario = rescaled_demo_log(dir, [](double v) { return v / 100; });
        const auto r = testing::run_tocsin("fit " + scenario);
        INFO(r.output);
        REQUIRE(r.exit_code == 0);
        CHECK(r.output.find("# note: scale: probability, detected: every one of the ") != std::string::npos);
        CHECK(r.output.find(" usable scores lies within 0 to 1 (from ") != std::string::npos);
        CHECK(r.output.find("      scale: probability\n") != std::string::npos);
        CHECK_NOTHROW(parse_scenario(head + r.output, "fitted.yaml", ""));
        const auto written = testing::run_tocsin("fit " + scenario + " -o " + dir.path("fitted.yaml"));
        CHECK(written.exit_code == 0);
        CHECK(written.output.find("\nScale: probability, detected: ") != std::string::npos);
    }
    SUBCASE("--scale probability on a points log: refused, nothing written") {
        const auto r = testing::run_tocsin("fit " + std::string(TOCSIN_SOURCE_DIR) +
                                           "/scenarios/fernhollow-replay.yaml --scale probability -o " + "/tmp/never-written-" +
                                           std::to_string(::getpid()) + ".yaml");
        INFO(r.output);
        CHECK(r.exit_code == 2);
        CHECK(r.output.find("demo/scores.csv: --scale: the probability scale was asked for, but the usable scores run from ") !=
              std::string::npos);
        CHECK(r.output.find("leave --scale out") != std::string::npos);
        CHECK_FALSE(std::filesystem::exists("/tmp/never-written-" + std::to_string(::getpid()) + ".yaml"));
    }
    SUBCASE("a log of 0s and 1s only: refused until --scale is given") {
        testing::ScratchDir dir;
        const std::string scenario = rescaled_demo_log(dir, [](double v) { return v >= 50 ? 1 : 0; });
        const auto r = testing::run_tocsin("fit " + scenario + " -o " + dir.path("fitted.yaml"));
        INFO(r.output);
        CHECK(r.exit_code == 2);
        CHECK(r.output.find("scores.csv: --scale: every one of the ") != std::string::npos);
        CHECK(r.output.find("is 0 or 1, which fits both scales (points and probability); give --scale points or --scale probability") !=
              std::string::npos);
        CHECK_FALSE(std::filesystem::exists(dir.path("fitted.yaml")));
        const auto given = testing::run_tocsin("fit " + scenario + " --scale points");
        CHECK(given.exit_code == 0);
        CHECK(given.output.find("# note: scale: points, as asked (every one of the ") != std::string::npos);
    }
}

TEST_CASE("population_source.plans_do_not_move_patients") {
    // Common random numbers: adding a plan or changing who answers leaves every
    // patient and score of a replication exactly as it was.
    const Scenario one = parse_scenario(generated(), "s.yaml", "");
    std::string text = generated();
    text.replace(text.find("    rule: {threshold: 60}\n"), 26,
                 "    role: charge nurse\n    rule: {threshold: 60}\n  - name: q\n    rule: {threshold: 40, snooze_minutes: 60}\n");
    const Scenario two = parse_scenario(text, "s.yaml", "");
    REQUIRE(two.simulation.plans.size() == 2);
    for (std::uint64_t r : {0, 5})
        CHECK(testing::serialize(population_for(one.population, prepare_population(one.population), r)) ==
              testing::serialize(population_for(two.population, prepare_population(two.population), r)));
}

TEST_CASE("population_source.generated_run_same_bytes_whatever_the_threads") {
    // The generated example with its stress test, 6 replications, on 1 and on
    // 2 threads: every output file identical.
    testing::ScratchDir dir;
    const std::string scenario = std::string(TOCSIN_SOURCE_DIR) + "/scenarios/generated.yaml";
    const auto one = testing::run_tocsin("run " + scenario + " -r 6 -j 1 --out " + dir.path("one"));
    const auto two = testing::run_tocsin("run " + scenario + " -r 6 -j 2 --out " + dir.path("two"));
    INFO(one.output);
    REQUIRE(one.exit_code == 0);
    REQUIRE(two.exit_code == 0);
    CHECK(one.output.find("Stress test from") != std::string::npos);
    int compared = 0;
    for (const auto& entry : std::filesystem::directory_iterator(dir.path("one"))) {
        const std::string name = entry.path().filename().string();
        if (name == "run_record.json") continue;  // records the thread count and time taken, by design
        CHECK_MESSAGE(testing::read_file(entry.path().string()) == testing::read_file(dir.path("two/" + name)), name);
        ++compared;
    }
    CHECK(compared > 5);
    CHECK(std::filesystem::exists(dir.path("one/shift_effect.csv")));
}

TEST_CASE("population_source.bootstrap_warm_up_and_tail_keys") {
    // population.bootstrap.warm_up_days / tail_days: a number of days, or
    // "auto" (also when left out); a warm-up that leaves no day is refused at
    // the key, saying what to declare.
    const std::string dir = std::string(TOCSIN_SOURCE_DIR) + "/scenarios";
    const std::string text = testing::read_file(dir + "/fernhollow-replay.yaml");
    auto with = [&](const std::string& bootstrap) {
        std::string t = text;
        t.replace(t.find("population:\n"), 12, "population:\n  bootstrap: " + bootstrap + "\n");
        return t;
    };
    const Scenario declared = parse_scenario(with("{warm_up_days: 3, tail_days: auto}"), "s.yaml", dir);
    REQUIRE(declared.population.bootstrap);
    CHECK(declared.population.bootstrap->warm_up_days == 3);
    CHECK_FALSE(declared.population.bootstrap->tail_days);
    const Scenario automatic = parse_scenario(with("{}"), "s.yaml", dir);
    CHECK_FALSE(automatic.population.bootstrap->warm_up_days);
    const PreparedPopulation prepared = prepare_population(automatic.population);
    REQUIRE(prepared.bootstrap_days);
    CHECK(prepared.bootstrap_days->warm_up_found);
    CHECK(describe_prepared(automatic.population, prepared).find("Bootstrap draws from days ") != std::string::npos);
    try {
        parse_scenario(with("{warm_up_days: -1}"), "s.yaml", dir);
        FAIL("a negative warm-up was accepted");
    } catch (const InputError& e) {
        CHECK(std::string(e.what()).find("warm_up_days") != std::string::npos);
    }
    const Scenario too_long = parse_scenario(with("{warm_up_days: 40, tail_days: 10}"), "s.yaml", dir);
    try {
        prepare_population(too_long.population);
        FAIL("a bootstrap with no eligible day was accepted");
    } catch (const InputError& e) {
        CHECK(std::string(e.what()).find("population.bootstrap") != std::string::npos);
        CHECK(std::string(e.what()).find("declare warm_up_days and tail_days") != std::string::npos);
    }
}
