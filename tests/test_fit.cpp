// Fitting the generator to a log: generate with known knobs, fit, recover.
#include <doctest/doctest.h>
#include <yaml-cpp/yaml.h>

#include <cmath>
#include <stdexcept>

#include "models/fit.hpp"
#include "models/generator.hpp"
#include "population_fixtures.hpp"

using namespace tocsin;
using namespace tocsin::testing;

namespace {

// Two wards, a year, busier 08-20 h (0.45/h) than at night (0.15/h), with
// room for everyone (80 beds; the fit cannot see arrivals turned away).
GeneratorConfig known_year() {
    GeneratorConfig c = two_wards(365);
    for (UnitConfig& u : c.units) {
        u.beds = 80;
        for (int h = 0; h < hours_per_week; ++h) u.arrivals_per_hour[h] = (h % 24 >= 8 && h % 24 < 20) ? 0.45 : 0.15;
    }
    c.outcome.probability = 0.10;
    return c;  // stay lognormal 72 h / 0.6; cadence 60 +/- 10 min; 5 % missing; latency 15 min / 0.5;
               // baseline 20, sds 6 and 6; drift 20 over an onset of 6-48 h (population_fixtures.hpp)
}

}  // namespace

TEST_CASE("fit.recovers_known_parameters") {
    // Generated and fitted once; each SUBCASE re-enters this test case.
    static const GeneratorFit fit = fit_generator(generate_population(known_year(), 1, 0));
    const GeneratorConfig& f = fit.config;
    const double n = static_cast<double>(fit.encounters_admitted);
    const double controls = n - static_cast<double>(fit.cases);
    REQUIRE(n > 4000);

    SUBCASE("arrivals: day and night rates within 3 Poisson SE") {
        // 52 weeks x 84 day hours x 0.45/h = 1966 admissions per ward by day;
        // the SE of a rate is sqrt(count) / exposure hours.
        for (const UnitConfig& u : f.units) {
            double day = 0, night = 0;
            for (int h = 0; h < hours_per_week; ++h) (h % 24 >= 8 && h % 24 < 20 ? day : night) += u.arrivals_per_hour[h];
            day /= 84;
            night /= 84;
            const double exposure = 84.0 * 365.0 / 7.0;
            CHECK(std::abs(day - 0.45) <= 3 * std::sqrt(0.45 * exposure) / exposure);
            CHECK(std::abs(night - 0.15) <= 3 * std::sqrt(0.15 * exposure) / exposure);
            CHECK(u.beds <= 80);  // highest census seen, a lower bound
        }
    }
    SUBCASE("stay: lognormal median and log sd within 3 SE") {
        // Mean of logs has SE sigma / sqrt(n); the sd of logs about sigma / sqrt(2 n).
        CHECK(std::abs(std::log(f.stay.median_hours / 72.0)) <= 3 * 0.6 / std::sqrt(controls));
        CHECK(std::abs(f.stay.log_sd - 0.6) <= 3 * 0.6 / std::sqrt(2 * controls));
    }
    SUBCASE("outcome: rate within 3 binomial SE; timing within 0.2") {
        CHECK(std::abs(f.outcome.probability - 0.10) <= 3 * std::sqrt(0.1 * 0.9 / n));
        // Moment estimator of the uniform timing range; over seeds 1-10 the
        // estimates spread with sd 0.05 around (0.1, 1.0): tolerance 4 sd.
        CHECK(std::abs(f.outcome.earliest_fraction - 0.1) <= 0.2);
        CHECK(std::abs(f.outcome.latest_fraction - 1.0) <= 0.2);
    }
    SUBCASE("cadence, jitter, missing scores, latency") {
        // About 450,000 gaps: sampling error is below 0.05 min; the tolerances
        // allow for whole-second rounding and for the unseen last missing slot.
        CHECK(f.scores.cadence_minutes == doctest::Approx(60).epsilon(0.005));
        CHECK(f.scores.jitter_minutes == doctest::Approx(10).epsilon(0.02));
        CHECK(std::abs(f.scores.missing_probability - 0.05) <= 0.0025);
        // Latencies are floored to whole seconds and the longest ones near the
        // end of a stay are cut: a slight downward bias, under 1 %.
        CHECK(f.scores.latency_median_minutes == doctest::Approx(15).epsilon(0.02));
        CHECK(f.scores.latency_log_sd == doctest::Approx(0.5).epsilon(0.02));
    }
    SUBCASE("score levels on controls") {
        // Baseline SE ~ sqrt(6^2 + 6^2 / 80) / sqrt(4700) = 0.09; tolerance 3 SE.
        CHECK(std::abs(f.scores.baseline - 20) <= 0.27);
        // Clamping at 0 points trims the lower tail a little (sd about 0.05
        // low over seeds 1-10); tolerances 0.3 points.
        CHECK(std::abs(f.scores.within_patient_sd - 6) <= 0.3);
        CHECK(std::abs(f.scores.between_patient_sd - 6) <= 0.3);
    }
    SUBCASE("pre-outcome rise") {
        // Over seeds 1-10: size sd 0.4, onset bounds sd about 1.5 h; tolerance ~4 sd.
        CHECK(std::abs(f.scores.drift_size - 20) <= 1.5);
        CHECK(std::abs(f.scores.drift_onset_min_hours - 6) <= 4);
        CHECK(std::abs(f.scores.drift_onset_max_hours - 48) <= 6);
    }
}

TEST_CASE("fit.no_rise_when_there_is_none") {
    // Cases scored like everyone else: the fitted rise must be small. Its SE is
    // about within_sd / sqrt(case scores in the last day) = 6 / sqrt(10,000) = 0.06 points.
    GeneratorConfig truth = known_year();
    truth.scores.drift_size = 0;
    const GeneratorFit fit = fit_generator(generate_population(truth, 2, 0));
    CHECK(std::abs(fit.config.scores.drift_size) < 1.0);
}

TEST_CASE("fit.scenario_fragment_is_yaml_with_the_fitted_values") {
    const GeneratorFit fit = fit_generator(generate_population(known_year(), 1, 0));
    const std::string text = scenario_fragment(fit.config, fit.notes);
    const YAML::Node root = YAML::Load(text);
    const YAML::Node g = root["population"]["generate"];
    REQUIRE(g.IsMap());
    CHECK(g["start"].as<std::string>() == "2026-01-05T00:00:00Z");
    CHECK(text.find("keep `time_zone: UTC` at the top") != std::string::npos);
    REQUIRE(g["units"].size() == 2);
    CHECK(g["units"][1]["name"].as<std::string>() == "ward-south");
    CHECK(g["units"][1]["beds"].as<int>() == fit.config.units[1].beds);
    REQUIRE(g["units"][0]["arrivals_per_hour"].size() == 7);
    CHECK(g["units"][0]["arrivals_per_hour"][6].size() == 24);
    // Sunday 23:00 is hour of week 167.
    CHECK(g["units"][0]["arrivals_per_hour"][6][23].as<double>() ==
          doctest::Approx(fit.config.units[0].arrivals_per_hour[167]).epsilon(1e-5));
    CHECK(g["stay"]["distribution"].as<std::string>() == "lognormal");
    CHECK(g["scores"]["drift_size"].as<double>() == doctest::Approx(fit.config.scores.drift_size).epsilon(1e-5));
    CHECK(g["outcome"]["ends_stay"].as<bool>());
    CHECK(text.find("# note: beds = highest census seen") != std::string::npos);
}

TEST_CASE("fit.refuses_a_population_too_small") {
    Population empty;
    empty.units = {"ward"};
    empty.period_start = midnight_utc(2026, 1, 5);
    empty.period_end = empty.period_start + 86400;
    empty.score_start = {0};
    CHECK_THROWS_WITH_AS(fit_generator(empty), doctest::Contains("no encounter is admitted"), std::invalid_argument);
}

TEST_CASE("fit.arrivals_by_hour_of_day") {
    // Pooling the weekdays: every day gets the same 24 rates. The 10-11 h rate
    // rests on 365 such hours: Poisson SE = sqrt(0.45 x 365) / 365 = 0.035; tolerance 3 SE.
    FitOptions pooled;
    pooled.arrivals_by_hour_of_day = true;
    const GeneratorFit fit = fit_generator(generate_population(known_year(), 1, 0), pooled);
    const WeeklyRate& r = fit.config.units[0].arrivals_per_hour;
    for (int h = 0; h < hours_per_week; ++h) CHECK(r[h] == r[h % 24]);
    CHECK(std::abs(r[10] - 0.45) <= 3 * std::sqrt(0.45 * 365) / 365);
    CHECK(std::abs(r[2] - 0.15) <= 3 * std::sqrt(0.15 * 365) / 365);
}
