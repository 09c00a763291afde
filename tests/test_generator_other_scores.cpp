// A generated population's further scores (GeneratedOtherScore): their own
// streams, the declared correlation of the patients' levels, calibration to
// their own target AUC, and the scenario keys.
#include <doctest/doctest.h>

#include <cmath>
#include <string>
#include <vector>

#include "models/discrimination.hpp"
#include "models/generator.hpp"
#include "population_fixtures.hpp"
#include "study/scenario.hpp"
#include "test_support.hpp"

using namespace tocsin;
using namespace tocsin::testing;

namespace {

GeneratorConfig with_other(GeneratorConfig c, double correlation) {
    GeneratedOtherScore o;
    o.name = "bedside";
    o.level.baseline = 30;
    o.level.between_patient_sd = 8;
    o.level.within_patient_sd = 4;
    o.level.drift_size = 12;
    o.correlation = correlation;
    c.score_name = "candidate";
    c.other_scores.push_back(o);
    return c;
}

bool same_scores(std::span<const Score> a, std::span<const Score> b) {
    if (a.size() != b.size()) return false;
    for (std::size_t i = 0; i < a.size(); ++i)
        if (a[i].available_at != b[i].available_at || a[i].scored_at != b[i].scored_at || a[i].value != b[i].value)
            return false;
    return true;
}

double pearson(const std::vector<double>& x, const std::vector<double>& y) {
    double mx = 0, my = 0;
    for (std::size_t i = 0; i < x.size(); ++i) mx += x[i], my += y[i];
    mx /= static_cast<double>(x.size());
    my /= static_cast<double>(y.size());
    double sxy = 0, sxx = 0, syy = 0;
    for (std::size_t i = 0; i < x.size(); ++i) {
        sxy += (x[i] - mx) * (y[i] - my);
        sxx += (x[i] - mx) * (x[i] - mx);
        syy += (y[i] - my) * (y[i] - my);
    }
    return sxy / std::sqrt(sxx * syy);
}

}  // namespace

TEST_CASE("generator_other_scores.declaring_one_moves_no_draw_of_the_first") {
    const GeneratorConfig base = two_wards(40);
    const Population alone = generate_population(base, 7, 2);
    const Population pair = generate_population(with_other(base, 0.5), 7, 2);
    REQUIRE(alone.encounters.size() == pair.encounters.size());
    REQUIRE(pair.other_scores.size() == 1);
    CHECK(pair.score_name == "candidate");
    CHECK(pair.other_scores[0].name == "bedside");
    std::size_t differing = 0;
    for (std::size_t e = 0; e < alone.encounters.size(); ++e) {
        CHECK(alone.encounters[e].id == pair.encounters[e].id);
        CHECK(alone.encounters[e].discharged == pair.encounters[e].discharged);
        CHECK(same_scores(alone.scores_of(e), pair.scores_of(e)));  // the first score, bit for bit
        // The further score is scored at the very same instants (same rows missing) ...
        const auto first = pair.scores_of(e), other = pair.scores_of(e, 1);
        REQUIRE(first.size() == other.size());
        for (std::size_t i = 0; i < first.size(); ++i) {
            CHECK(first[i].available_at == other[i].available_at);
            CHECK(first[i].scored_at == other[i].scored_at);
            differing += first[i].value != other[i].value ? 1 : 0;
        }
    }
    CHECK(differing > 1000);  // ... with values of its own
    CHECK(pair.other_scores[0].excluded_by_reason == pair.excluded.scores_by_reason);
    // The streaming form without the others gives the first score alone, too.
    std::size_t e = 0;
    generate_streaming(with_other(base, 0.5), 7, 2, [&](const Encounter&, std::span<const Score> s) {
        CHECK(same_scores(s, alone.scores_of(e++)));
    });
    CHECK(e == alone.encounters.size());
}

TEST_CASE("generator_other_scores.correlation_one_and_equal_sds_give_equal_levels") {
    // No score-to-score noise, the same baseline, spread and rise: what is left
    // is the patient's own level, equal in both scores when the correlation is 1.
    GeneratorConfig c = two_wards(40);
    c.scores.within_patient_sd = 0;
    c.scores.baseline = 40;
    GeneratorConfig paired = with_other(c, 1.0);
    paired.other_scores[0].level.baseline = 40;
    paired.other_scores[0].level.between_patient_sd = c.scores.between_patient_sd;
    paired.other_scores[0].level.within_patient_sd = 0;
    paired.other_scores[0].level.drift_size = c.scores.drift_size;
    const Population pop = generate_population(paired, 3, 0);
    std::size_t compared = 0;
    for (std::size_t e = 0; e < pop.encounters.size(); ++e) {
        const auto a = pop.scores_of(e), b = pop.scores_of(e, 1);
        for (std::size_t i = 0; i < a.size(); ++i, ++compared) CHECK(a[i].value == b[i].value);
    }
    CHECK(compared > 10000);
    // Below 1 they part.
    paired.other_scores[0].correlation = 0.9;
    const Population apart = generate_population(paired, 3, 0);
    CHECK(apart.scores_of(0)[0].value != apart.scores_of(0, 1)[0].value);
}

TEST_CASE("generator_other_scores.patient_levels_correlate_as_declared") {
    // Without noise or rise each stay's scores sit at baseline + its own offset,
    // so the correlation of the stays' first values is that of the offsets.
    // Baselines of 50 with sds of 6 and 8 keep them inside 0-100 (no clamping).
    // The sample correlation's standard error is about (1 - rho^2) / sqrt(n)
    // (the delta method on Fisher's z, e.g. Kendall & Stuart); we allow 3.29 SE
    // (two-sided 0.1 %) for each declared value.
    for (double rho : {0.0, 0.6, 0.9}) {
        GeneratorConfig c = two_wards(365);
        c.scores.within_patient_sd = 0;
        c.scores.drift_size = 0;
        c.scores.baseline = 50;
        GeneratorConfig paired = with_other(c, rho);
        paired.other_scores[0].level.within_patient_sd = 0;
        paired.other_scores[0].level.drift_size = 0;
        paired.other_scores[0].level.baseline = 50;
        const Population pop = generate_population(paired, 19, 0);
        std::vector<double> x, y;
        for (std::size_t e = 0; e < pop.encounters.size(); ++e) {
            if (pop.scores_of(e).empty()) continue;
            x.push_back(pop.scores_of(e)[0].value);
            y.push_back(pop.scores_of(e, 1)[0].value);
        }
        const double n = static_cast<double>(x.size());
        const double r = pearson(x, y), se = (1 - rho * rho) / std::sqrt(n);
        INFO("declared " << rho << ", found " << r << " over " << n << " stays, SE " << se);
        CHECK(n > 4000);
        CHECK(std::abs(r - rho) <= 3.29 * std::max(se, 1 / n));
    }
}

TEST_CASE("generator_other_scores.target_aucs_reached") {
    const GeneratorConfig c = with_other(two_wards(180), 0.5);
    const AucCalibration first = calibrate_to_auc(c, 0.78, 0.08, 21);
    // The first score's calibration does not depend on the other score.
    GeneratorConfig alone = c;
    alone.other_scores.clear();
    CHECK(calibrate_to_auc(alone, 0.78, 0.08, 21).drift_size == first.drift_size);

    GeneratorConfig both = first.config;
    both.other_scores[0].target_auc = 0.70;
    const OtherScoresCalibration fit = calibrate_other_scores(both, 21);
    REQUIRE(fit.reached.size() == 1);
    const OtherScoreReached& r = fit.reached[0];
    CHECK(std::abs(r.achieved_auc - 0.70) <= 0.002);  // the bisection's tolerance
    CHECK(fit.calibration_period_end == first.calibration_period_end);
    CHECK(fit.config.scores.drift_size == first.drift_size);

    // The reported figures, recomputed from the calibration population in memory.
    GeneratorConfig calibration = fit.config;
    calibration.period_end = fit.calibration_period_end;
    Population pop = generate_population(calibration, 21, 0);
    std::vector<double> a, b;
    for (std::size_t e = 0; e < pop.encounters.size(); ++e) {
        const auto x = pop.scores_of(e), y = pop.scores_of(e, 1);
        if (x.empty() || y.empty()) continue;
        double hx = x[0].value, hy = y[0].value;
        for (const Score& s : x) hx = std::max(hx, s.value);
        for (const Score& s : y) hy = std::max(hy, s.value);
        a.push_back(hx);
        b.push_back(hy);
    }
    CHECK(r.stays == static_cast<std::int64_t>(a.size()));
    CHECK(r.maxima_rank_correlation == doctest::Approx(spearman_rank_correlation(a, b)).epsilon(1e-12));
    CHECK(r.maxima_rank_correlation > 0.2);  // a shared patient level shows in the maxima
    swap_first_score(pop, 1);
    const EncounterMaxima m = encounter_maxima(pop);
    CHECK(r.achieved_auc == doctest::Approx(mann_whitney_auc(m.cases, m.controls)).epsilon(1e-12));
}

TEST_CASE("generator_other_scores.scenario_keys") {
    const std::string head = R"(scenario_schema: 1
name: t
time_zone: UTC
score_name: candidate
shifts: [{name: day, starts: "07:00"}]
outcome: {window_hours: 24}
plans:
  - {name: p, score: bedside, rule: {threshold: 5}}
)";
    const std::string generated = R"(population:
  generate:
    start: 2026-01-05T00:00:00Z
    end: 2026-02-05T00:00:00Z
    units: [{name: w, beds: 10, arrivals_per_hour: [0.1]}]
  other_scores:
)";
    const Scenario sc = parse_scenario(
        head + generated + "    - name: bedside\n      generate: {correlation: 0.4, baseline: 3, target_auc: 0.7}\n",
        "s.yaml", "");
    REQUIRE(sc.population.generator.other_scores.size() == 1);
    CHECK(sc.population.generator.other_scores[0].correlation == 0.4);
    CHECK(sc.population.generator.other_scores[0].level.baseline == 3);
    CHECK(sc.population.generator.other_scores[0].target_auc == 0.7);
    CHECK(sc.population.generator.score_name == "candidate");

    const auto replay_key = scenario_error(head + generated + "    - {name: bedside, column: b, generate: {}}\n");
    CHECK(replay_key.field.find("column") != std::string::npos);
    CHECK(replay_key.line == 15);
    const auto no_generate = scenario_error(head + generated + "    - {name: bedside}\n");
    CHECK(std::string(no_generate.what()).find("generate section") != std::string::npos);
    const auto out_of_range =
        scenario_error(head + generated + "    - {name: bedside, generate: {correlation: 1.5}}\n");
    CHECK(out_of_range.field.find("correlation") != std::string::npos);
    const auto on_replay = scenario_error(head + R"(population:
  replay: {encounters: e.csv, scores: s.csv}
  other_scores:
    - {name: bedside, column: bedside, generate: {correlation: 0.4}}
)");
    CHECK(on_replay.field.find("generate") != std::string::npos);
    CHECK(on_replay.line == 12);
}

TEST_CASE("generator_other_scores.example_runs_and_compares_the_scores") {
    // The generated two-score example end to end: the comparison is printed,
    // what the further score reached is among the report's assumptions, and
    // the comparison's table is the same on one thread as on two.
    ScratchDir dir;
    const std::string scenario = std::string(TOCSIN_SOURCE_DIR) + "/scenarios/generated-two-scores.yaml";
    const auto two = run_tocsin("run " + scenario + " --threads 2 --out " + dir.path("two"));
    INFO(two.output);
    REQUIRE(two.exit_code == 0);
    CHECK(two.output.find("Two scores on the same stays") != std::string::npos);
    CHECK(two.output.find("candidate against bedside") != std::string::npos);
    CHECK(two.output.find("Other score 'bedside': encounter-level AUC 0.7") != std::string::npos);
    CHECK(read_file(dir.path("two/report.html")).find("Other score &#39;bedside&#39;: encounter-level AUC") !=
          std::string::npos);
    const auto one = run_tocsin("run " + scenario + " --threads 1 --out " + dir.path("one"));
    REQUIRE(one.exit_code == 0);
    const std::string table = read_file(dir.path("two/score_comparison_auc.csv"));
    CHECK(table.find("bedside") != std::string::npos);
    CHECK(table == read_file(dir.path("one/score_comparison_auc.csv")));
}

TEST_CASE("generator_other_scores.unreachable_target_names_the_key") {
    const std::string yaml = R"(scenario_schema: 1
name: t
time_zone: UTC
shifts: [{name: day, starts: "07:00"}]
outcome: {window_hours: 24}
plans:
  - {name: p, rule: {threshold: 5}}
population:
  generate:
    start: 2026-01-05T00:00:00Z
    end: 2026-02-05T00:00:00Z
    units: [{name: w, beds: 10, arrivals_per_hour: [0.1]}]
  other_scores:
    - name: bedside
      generate: {within_patient_sd: 40, between_patient_sd: 40, target_auc: 0.999}
)";
    const Scenario sc = parse_scenario(yaml, "s.yaml", "");
    try {
        prepare_population(sc.population);
        FAIL("expected an InputError");
    } catch (const InputError& e) {
        CHECK(e.field == "population.other_scores");
        CHECK(e.line == 14);
        CHECK(std::string(e.what()).find("other score 'bedside'") != std::string::npos);
        CHECK(std::string(e.what()).find("cannot be reached") != std::string::npos);
    }
}
