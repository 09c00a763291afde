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

// A population that is only a list of usable scores: all the scale looks at.
Population scores_only(const std::vector<double>& values) {
    Population pop;
    pop.units = {"ward"};
    pop.encounters.push_back({"e1", 0, 0, 86400, std::nullopt});
    for (std::size_t i = 0; i < values.size(); ++i)
        pop.scores.push_back({static_cast<Instant>(i) * 3600, static_cast<Instant>(i) * 3600, values[i]});
    pop.score_start = {0, pop.scores.size()};
    return pop;
}

// The same two wards on the probability scale: latent levels on the logit,
// baseline logit -3 (about 0.05), a rise of 2.5 (to about 0.38).
GeneratorConfig probability_wards() {
    GeneratorConfig c = two_wards(90);
    c.scores.scale = ScoreScale::probability;
    c.scores.baseline = -3;
    c.scores.between_patient_sd = 0.5;
    c.scores.within_patient_sd = 0.4;
    c.scores.drift_size = 2.5;
    return c;
}

}  // namespace

TEST_CASE("fit.scale_from_the_scores") {
    SUBCASE("all within 0 to 1, some strictly between: probability") {
        const ScaleEvidence e = score_scale_evidence(scores_only({0.0, 0.12, 0.5, 1.0}));
        CHECK(e.detected == ScoreScale::probability);
        CHECK(e.range.lowest == 0.0);
        CHECK(e.range.highest == 1.0);
        CHECK(e.strictly_between == 2);
        const ScaleChoice c = choose_score_scale(e, std::nullopt);
        CHECK(c.scale == ScoreScale::probability);
        CHECK(c.reason == "scale: probability, detected: every one of the 4 usable scores lies within 0 to 1 (from 0 to 1)");
    }
    SUBCASE("any score above 1: points") {
        // 1.5 is one score among probabilities; still no probability.
        const ScaleEvidence e = score_scale_evidence(scores_only({0.2, 0.4, 1.5}));
        CHECK(e.detected == ScoreScale::points);
        const ScaleChoice c = choose_score_scale(e, std::nullopt);
        CHECK(c.scale == ScoreScale::points);
        CHECK(c.reason == "scale: points, detected: the usable scores run from 0.2 to 1.5, outside 0 to 1, so they are not probabilities");
    }
    SUBCASE("a score below 0: points") {
        CHECK(score_scale_evidence(scores_only({-2, 0.5})).detected == ScoreScale::points);
    }
    SUBCASE("only 0s and 1s, or no scores: undecided, refused unless given") {
        for (const std::vector<double>& values : {std::vector<double>{0, 1, 1, 0}, std::vector<double>{1, 1}, std::vector<double>{}}) {
            const ScaleEvidence e = score_scale_evidence(scores_only(values));
            CHECK_FALSE(e.detected);
            const ScaleChoice c = choose_score_scale(e, std::nullopt);
            CHECK_FALSE(c.scale);
            CHECK(c.reason.find(values.empty() ? "no usable scores" : "is 0 or 1, which fits both scales") != std::string::npos);
            CHECK(choose_score_scale(e, ScoreScale::points).scale == ScoreScale::points);
            CHECK(choose_score_scale(e, ScoreScale::probability).scale == ScoreScale::probability);
        }
    }
    SUBCASE("probability given for scores above 1: refused") {
        const ScaleChoice c = choose_score_scale(score_scale_evidence(scores_only({3, 45, 97})), ScoreScale::probability);
        CHECK_FALSE(c.scale);
        CHECK(c.reason == "the probability scale was asked for, but the usable scores run from 3 to 97, outside 0 to 1, so they are not probabilities");
    }
    SUBCASE("points given for 0-1 scores: allowed, and the note says what the scores look like") {
        const ScaleChoice c = choose_score_scale(score_scale_evidence(scores_only({0.1, 0.3})), ScoreScale::points);
        CHECK(c.scale == ScoreScale::points);
        CHECK(c.reason.find("as asked, although every one of the 2 usable scores lies within 0 to 1") != std::string::npos);
    }
}

TEST_CASE("fit.detects_the_probability_scale_and_fits_on_it") {
    const Population log = generate_population(probability_wards(), 3, 0);
    const GeneratorFit fit = fit_generator(log);
    CHECK(fit.config.scores.scale == ScoreScale::probability);
    REQUIRE_FALSE(fit.notes.empty());
    CHECK(fit.notes.front().rfind("scale: probability, detected:", 0) == 0);
    // On the logit: baseline SE about 0.5 / sqrt(1400 controls) = 0.013; read as
    // points it would be near 0.05, the size near 0.3 instead of 2.5.
    CHECK(std::abs(fit.config.scores.baseline + 3) <= 0.1);
    CHECK(std::abs(fit.config.scores.drift_size - 2.5) <= 0.5);
    // The fragment says so, as a note and as the key.
    const std::string text = scenario_fragment(fit.config, fit.notes);
    CHECK(text.find("# note: scale: probability, detected:") != std::string::npos);
    CHECK(YAML::Load(text)["population"]["generate"]["scores"]["scale"].as<std::string>() == "probability");
    // Asked for probability on points scores: refused, never fitted.
    FitOptions wrong;
    wrong.scale = ScoreScale::probability;
    CHECK_THROWS_WITH_AS(fit_generator(generate_population(two_wards(30), 1, 0), wrong),
                         doctest::Contains("the probability scale was asked for"), std::invalid_argument);
}

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
    FitOptions points;  // given, so the scale is not what is refused
    points.scale = ScoreScale::points;
    CHECK_THROWS_WITH_AS(fit_generator(empty, points), doctest::Contains("no encounter is admitted"), std::invalid_argument);
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

TEST_CASE("fit.counts_admissions_where_the_log_records_them") {
    // A log of 60 days whose last 20 hold only the stays running out, with no
    // admission (as a log extract ends): counted over all 60 days the rates
    // come out a third low; over the 40 complete days (the scenario's
    // reporting period) they are right. Two wards at 0.3 an hour for 40 days:
    // 288 admissions each, Poisson SE of the rate sqrt(288) / 960 h = 0.018.
    const Population whole = generate_population(two_wards(60), 4, 0);
    const Instant cut = whole.period_start + 40 * 86400;
    Population log;
    log.units = whole.units;
    log.period_start = whole.period_start;
    log.period_end = whole.period_end;
    log.score_start = {0};
    for (std::size_t e = 0; e < whole.encounters.size(); ++e) {
        if (whole.encounters[e].admitted >= cut) continue;
        log.encounters.push_back(whole.encounters[e]);
        for (const Score& s : whole.scores_of(e)) log.scores.push_back(s);
        log.score_start.push_back(log.scores.size());
    }
    auto mean_rate = [](const GeneratorFit& fit) {
        double sum = 0;
        for (const UnitConfig& u : fit.config.units)
            for (double r : u.arrivals_per_hour) sum += r / hours_per_week;
        return sum / static_cast<double>(fit.config.units.size());
    };
    FitOptions complete;
    complete.complete_until = cut;
    const GeneratorFit counted_where_complete = fit_generator(log, complete);
    const GeneratorFit counted_over_all = fit_generator(log);
    // The rates are raised for arrivals turned away, so only a lower bound holds for the truth.
    CHECK(mean_rate(counted_where_complete) >= 0.3 - 3 * 0.018);
    // Diluted over 60 days: about 40 / 60 of it (a little more, as fewer arrivals are turned away at the lower rate).
    CHECK(mean_rate(counted_over_all) < 0.8 * mean_rate(counted_where_complete));
    CHECK(counted_where_complete.admissions_until == cut);
    CHECK(counted_where_complete.notes.size() == counted_over_all.notes.size() + 1);
}

TEST_CASE("fit.noise_that_carries_over") {
    // The two wards with noise carried over from hour to hour (0.6): the
    // carry-over and both spreads come back. About 2,800 control stays of some
    // 80 scores: the lag-one correlation's SE is about sqrt((1 - 0.36) /
    // 200,000) = 0.002, but over seeds 5-8 the estimate sat 0.012 to 0.015
    // above the truth (the correction for each stay's mean is approximate):
    // tolerance 0.03. The sds as in "score levels on controls" above (seeds
    // 5-8: within 5.94 to 5.98, between 5.84 to 5.94), the noise's variance
    // now resting on fewer independent scores.
    GeneratorConfig truth = two_wards(240);
    truth.scores.noise_carryover = 0.6;
    const GeneratorFit fit = fit_generator(generate_population(truth, 5, 0));
    CHECK(std::abs(fit.config.scores.noise_carryover - 0.6) <= 0.03);
    CHECK(std::abs(fit.config.scores.within_patient_sd - 6) <= 0.3);
    CHECK(std::abs(fit.config.scores.between_patient_sd - 6) <= 0.4);
}
