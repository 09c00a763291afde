// The fit check: a fitted population set beside its log. On a log from
// tocsin's own generator the fit recovers the knobs and the fitted population
// reproduces the log's figures; on a log made otherwise (written here, with a
// rise of another shape and noise that carries over from score to score) the
// check says what the fit cannot reproduce.
#include <doctest/doctest.h>

#include <cmath>
#include <random>

#include "models/fit.hpp"
#include "models/generator.hpp"
#include "population_fixtures.hpp"
#include "report/fit_check_text.hpp"
#include "study/fit_check.hpp"
#include "study/scenario.hpp"
#include "test_support.hpp"

using namespace tocsin;
using namespace tocsin::testing;

namespace {

// Three paging plans on the points scale; no staff, so the figures are the notices' own.
Scenario paging_scenario() {
    return parse_scenario("scenario_schema: 1\n"
                          "name: fit check\n"
                          "time_zone: UTC\n"
                          "seed: 7\n"
                          "shifts:\n"
                          "  - {name: day, starts: \"08:00\"}\n"
                          "  - {name: night, starts: \"20:00\", night: true}\n"
                          "outcome: {window_hours: 24, min_lead_minutes: 60}\n"
                          "population:\n"
                          "  replay: {encounters: e.csv, scores: s.csv}\n"
                          "plans:\n"
                          "  - {name: page-35, rule: {threshold: 35, snooze_minutes: 240}}\n"
                          "  - {name: page-45, rule: {threshold: 45, snooze_minutes: 240}}\n"
                          "  - {name: page-55, rule: {threshold: 55, snooze_minutes: 240}}\n",
                          "fit-check.yaml", "");
}

const FitCheckRow& row(const FitCheck& check, const std::string& figure, const std::string& of = "") {
    for (const FitCheckRow& r : check.rows)
        if (r.figure == figure && r.of == of) return r;
    FAIL("no row " << figure << " of " << of);
    return check.rows.front();
}

}  // namespace

TEST_CASE("fit_check.rows_and_verdict") {
    // Hand-made check: one row inside, one benefit row outside.
    FitCheck check;
    check.replications = 40;
    check.rows.push_back({"outcome cases", "", FitCheckKind::population, 26, 24, 18, 31, 40, true});
    check.rows.push_back({"sensitivity", "page-45", FitCheckKind::benefit, 0.69, 0.87, 0.8, 0.93, 40, false});
    check.outside = 1;
    check.benefit_outside = {"page-45: sensitivity"};
    const std::string text = fit_check_text(check);
    CHECK(text.find("outcome cases") != std::string::npos);
    CHECK(text.find("18 to 31") != std::string::npos);
    CHECK(text.find("0.8 to 0.93") != std::string::npos);
    CHECK(text.find("NO\n") == text.rfind("NO\n"));  // one row outside
    CHECK(text.find("page-45") < text.find("NO\n"));
    CHECK(text.find("does not reproduce the log on 1 of 2 figures") != std::string::npos);
    CHECK(text.find("Warning: benefit figures differ between the log and the fitted population (page-45: sensitivity)") !=
          std::string::npos);
    CHECK(text.find("Warning: burden") == std::string::npos);
    check.rows[1].inside = true;
    check.outside = 0;
    check.benefit_outside.clear();
    CHECK(fit_check_verdict(check) == "Verdict: the fitted population reproduces the log: all 2 figures lie inside the fitted range.");
}

namespace {

// An independent invented log, not made by tocsin's generator: one ward,
// Poisson admissions with no bed limit, lognormal stays, 8 % reach the outcome
// (which ends the stay) uniformly in the stay; hourly scores in points, a
// patient level of 20 + N(0, 6), noise of sd 6 that carries over from score
// to score with correlation `carry` (AR(1)), and for cases a rise of 20
// points from an onset 4 to 30 h before time zero: linear to time zero like
// tocsin's, or (`early_rise`) approaching 20 points exponentially with a time
// constant of 6 h, so that cases are high long before time zero. Scores
// from 20:00 to 08:00 are `night_lift` points higher.
Population independent_log(double carry, bool early_rise, std::uint64_t seed, int days, double night_lift = 0) {
    std::mt19937_64 rng(seed);
    std::normal_distribution<double> z(0.0, 1.0);
    std::uniform_real_distribution<double> u(0.0, 1.0);
    std::exponential_distribution<double> gap_hours(0.6);
    Population pop;
    pop.units = {"Linden ward"};
    pop.period_start = midnight_utc(2026, 1, 5);
    pop.period_end = pop.period_start + days * 86400;
    pop.score_start = {0};
    double t = static_cast<double>(pop.period_start) - 20 * 86400.0;
    for (int n = 0;; ++n) {
        t += gap_hours(rng) * 3600.0;
        if (t >= static_cast<double>(pop.period_end)) break;
        Encounter e{"L" + std::to_string(n), 0, static_cast<Instant>(t), 0, std::nullopt};
        const double stay_hours = 70.0 * std::exp(0.6 * z(rng));
        e.discharged = e.admitted + static_cast<Instant>(stay_hours * 3600.0) + 60;
        if (u(rng) < 0.08) {
            e.outcome_at = e.admitted + static_cast<Instant>(u(rng) * static_cast<double>(e.discharged - e.admitted));
            e.discharged = *e.outcome_at + 1;
        }
        const double level = 20.0 + 6.0 * z(rng);
        const double onset_hours = 4.0 + 26.0 * u(rng);
        double noise = 6.0 * z(rng);
        for (Instant s = e.admitted + static_cast<Instant>(u(rng) * 3600.0); s < Population::usable_until(e); s += 3600) {
            noise = carry * noise + std::sqrt(1.0 - carry * carry) * 6.0 * z(rng);
            double value = level + noise;
            const Instant hour_of_day = (s % 86400) / 3600;
            if (hour_of_day >= 20 || hour_of_day < 8) value += night_lift;
            if (e.outcome_at) {
                const double since_onset = onset_hours - static_cast<double>(*e.outcome_at - s) / 3600.0;
                if (since_onset > 0)
                    value += early_rise ? 20.0 * (1.0 - std::exp(-since_onset / 6.0)) : 20.0 * since_onset / onset_hours;
            }
            pop.scores.push_back({s, s, std::clamp(value, 0.0, 100.0)});
        }
        if (e.discharged <= pop.period_start) {
            pop.scores.resize(pop.score_start.back());
            continue;
        }
        pop.encounters.push_back(e);
        pop.score_start.push_back(pop.scores.size());
    }
    return pop;
}

}  // namespace

TEST_CASE("fit_check.passes_where_the_fit_holds") {
    // The independent log with a linear rise and fresh noise each hour: what
    // tocsin's generator can represent, though not made by it. Admissions,
    // cases, AUC, burden and sensitivity should all be reproduced. Over seeds
    // 1-8 the log's sensitivity at 35 fell from 0.06 below to 0.04 above the
    // fitted mean (on average 0.006 below: no bias); seed 3's log falls just
    // outside the fitted range, as about one figure in 20 will by chance.
    const Scenario sc = paging_scenario();
    const Population log = independent_log(0.0, false, 1, 120);
    const FitCheck check = check_fit(sc, log, fit_generator(log).config, 40, 2);
    INFO(fit_check_text(check));  // shown when a check fails
    CHECK(row(check, "admissions", "Linden ward").inside);
    CHECK(row(check, "outcome cases").inside);
    CHECK(row(check, "encounter-level AUC").inside);
    for (const std::string plan : {"page-35", "page-45", "page-55"}) {
        CHECK(row(check, "sensitivity", plan).inside);
        CHECK(row(check, "notices per unit per night, mean", plan).inside);
    }
}

TEST_CASE("fit_check.noise_that_carries_over_is_fitted") {
    // Noise that carries over (correlation 0.9 from hour to hour) crosses a
    // threshold less often than noise drawn afresh at each score; fitted as
    // such (noise_carryover), the fitted population pages as the log does.
    // Without it, the log paged 9.7 times per night at 35 against a fitted
    // range of 13.2 to 16.3.
    const Scenario sc = paging_scenario();
    const Population log = independent_log(0.9, false, 3, 120);
    const GeneratorFit fit = fit_generator(log);
    // About 1,600 control stays of some 70 hourly scores: 100,000 pairs give
    // the lag-one correlation an SE near sqrt((1 - 0.81) / 100,000) = 0.0014;
    // the tolerance (0.027) leaves room for the approximate correction for
    // each stay's mean.
    CHECK(fit.config.scores.noise_carryover == doctest::Approx(0.9).epsilon(0.03));
    const FitCheck check = check_fit(sc, log, fit.config, 40, 2);
    INFO(fit_check_text(check));  // shown when a check fails
    // At 35 and 45; at 55 the log pages about once in 50 nights, too rarely to say much.
    for (const std::string plan : {"page-35", "page-45"}) {
        CHECK(row(check, "notices per unit per night, mean", plan).inside);
        CHECK(row(check, "sensitivity", plan).inside);
    }
}

TEST_CASE("fit_check.flags_scores_higher_at_night") {
    // Scores 4 points higher from 20:00 to 08:00: the generator has no clock
    // in its scores, so the fitted population pages less at night than the
    // log, and the check says so.
    const Scenario sc = paging_scenario();
    const Population log = independent_log(0.0, false, 3, 120, 4.0);
    const FitCheck check = check_fit(sc, log, fit_generator(log).config, 40, 2);
    INFO(fit_check_text(check));  // shown when a check fails
    const FitCheckRow& burden = row(check, "notices per unit per night, mean", "page-35");
    CHECK(burden.log_value > burden.fitted_high);
    CHECK_FALSE(check.burden_outside.empty());
    const std::string text = fit_check_text(check);
    CHECK(text.find("does not reproduce the log") != std::string::npos);
    CHECK(text.find("Warning: burden figures differ") != std::string::npos);
}

TEST_CASE("fit_check.flags_a_rise_of_another_shape") {
    // Cases high long before time zero (an early, exponential rise) are paged
    // earlier than the fitted linear rise allows: the log's median lead at 55
    // lies above the fitted range, a benefit figure the check warns about.
    const Scenario sc = paging_scenario();
    const Population log = independent_log(0.0, true, 3, 120);
    const FitCheck check = check_fit(sc, log, fit_generator(log).config, 40, 2);
    INFO(fit_check_text(check));  // shown when a check fails
    const FitCheckRow& lead = row(check, "median lead, hours", "page-55");
    CHECK(lead.log_value > lead.fitted_high);
    CHECK_FALSE(check.benefit_outside.empty());
    CHECK(fit_check_text(check).find("Warning: benefit figures differ") != std::string::npos);
}

TEST_CASE("fit_check.recovers_knobs_and_figures_of_a_generated_log") {
    // Known knobs: two busy wards (0.3 admissions an hour keep about 26 of 28
    // beds filled, so arrivals are turned away), 120 days, 8 % cases, a rise
    // of 20 points whose size varies from case to case with sd 8.
    GeneratorConfig truth = two_wards(120);
    truth.scores.drift_size_sd = 8;
    const Population log = generate_population(truth, 11, 0);
    const GeneratorFit fit = fit_generator(log);
    const GeneratorConfig& f = fit.config;
    const double cases = static_cast<double>(fit.cases);
    REQUIRE(cases > 100);
    // The rise: over seeds 1-10 of this log the fitted size averaged 20.5
    // (sd 1.2) and the fitted spread 8.0 (sd 2.4; it rests on the log's AUC,
    // whose SE with about 130 cases is 0.02); tolerances 3 sd.
    CHECK(std::abs(f.scores.drift_size - 20) <= 3 * 1.2);
    CHECK(std::abs(f.scores.drift_size_sd - 8) <= 3 * 2.4);
    // Outcome rate within 3 binomial SE.
    const double n = static_cast<double>(fit.encounters_admitted);
    CHECK(std::abs(f.outcome.probability - 0.08) <= 3 * std::sqrt(0.08 * 0.92 / n));
    // Rates are raised above the true 0.3 only as far as the beds the fit sees
    // (the highest census, at most 28) turn arrivals away; not below the truth
    // by more than 3 Poisson SE of the log's admissions.
    for (const UnitConfig& u : f.units) {
        double mean_rate = 0;
        for (double r : u.arrivals_per_hour) mean_rate += r / hours_per_week;
        CHECK(mean_rate >= 0.3 - 3 * std::sqrt(0.3 * 120 * 24) / (120 * 24));
    }
    const FitCheck check = check_fit(paging_scenario(), log, f, 40, 2);
    INFO(fit_check_text(check));  // shown when a check fails
    for (const std::string unit : {"ward-north", "ward-south"}) CHECK(row(check, "admissions", unit).inside);
    CHECK(row(check, "outcome cases").inside);
    CHECK(row(check, "encounter-level AUC").inside);
    for (const std::string plan : {"page-35", "page-45", "page-55"}) CHECK(row(check, "sensitivity", plan).inside);
}

TEST_CASE("fit_check.command") {
    // `tocsin fit --check` on the invented Fernhollow log: the fragment stays
    // YAML (the check follows as comments) and the verdict ends it.
    const std::string scenario = std::string(TOCSIN_SOURCE_DIR) + "/scenarios/fernhollow-replay.yaml";
    const CommandResult r = run_tocsin("fit " + scenario + " --check --check-replications 8");
    REQUIRE(r.exit_code == 0);
    CHECK(r.output.find("population:\n  generate:") != std::string::npos);
    CHECK(r.output.find("\n# Fit check: the log beside 8 replications") != std::string::npos);
    CHECK(r.output.find("\n# encounter-level AUC") != std::string::npos);
    CHECK(r.output.find("\n# Verdict: the fitted population") != std::string::npos);
    // fit_check_record, as the fragment carries it when benefit or burden rows lie outside.
    FitCheck found;
    found.benefit_outside = {"page-45: sensitivity"};
    found.burden_outside = {"page-45: notices per unit per night, mean"};
    CHECK(fit_check_record(found) == "benefit figures differ (page-45: sensitivity); burden figures differ (page-45: notices per unit per night, mean)");
    CHECK(fit_check_record(FitCheck{}).empty());
    CHECK(run_tocsin("fit " + scenario + " --check --check-replications 1").exit_code != 0);  // a range needs 2
}

TEST_CASE("fit_check.same_whatever_the_thread_count") {
    const Population log = independent_log(0.0, false, 2, 40);
    const GeneratorConfig fitted = fit_generator(log).config;
    const FitCheck one = check_fit(paging_scenario(), log, fitted, 6, 1);
    const FitCheck two = check_fit(paging_scenario(), log, fitted, 6, 2);
    REQUIRE(one.rows.size() == two.rows.size());
    for (std::size_t i = 0; i < one.rows.size(); ++i) {
        CHECK(one.rows[i].fitted_low == two.rows[i].fitted_low);
        CHECK(one.rows[i].fitted_high == two.rows[i].fitted_high);
    }
    CHECK(fit_check_text(one) == fit_check_text(two));
}

TEST_CASE("fit_check.run_repeats_the_record") {
    // A scenario made from `fit --check`'s fragment carries what the check
    // found (population.generate.fit_check); `run` says it before the figures,
    // and says nothing of the kind without it. The fit writes it; here it is
    // written by hand, so that the test does not rest on what a check finds.
    const ScratchDir dir;
    const std::string head = "scenario_schema: 1\nname: fitted\ntime_zone: UTC\nseed: 3\n"
                             "shifts:\n  - {name: day, starts: \"08:00\"}\n  - {name: night, starts: \"20:00\", night: true}\n"
                             "outcome: {window_hours: 24}\n"
                             "plans:\n  - {name: page-45, rule: {threshold: 45, snooze_minutes: 240}}\n"
                             "population:\n  generate:\n    start: \"2026-01-05 00:00:00\"\n    end: \"2026-01-19 00:00:00\"\n"
                             "    units: [{name: ward, beds: 20, arrivals_per_hour: [0.2]}]\n";
    const std::string record = "    fit_check: \"benefit figures differ (page-45: sensitivity)\"\n";
    const CommandResult with = run_tocsin("run " + dir.file("with.yaml", head + record) + " --replications 1");
    REQUIRE(with.exit_code == 0);
    CHECK(with.output.find("Warning: this population was fitted to a log whose figures it does not reproduce "
                           "(tocsin fit --check): benefit figures differ (page-45: sensitivity).") != std::string::npos);
    const CommandResult without = run_tocsin("run " + dir.file("without.yaml", head) + " --replications 1");
    REQUIRE(without.exit_code == 0);
    CHECK(without.output.find("fit --check") == std::string::npos);
}
