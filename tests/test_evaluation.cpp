// Evaluation on a population: labels at the encounter and prediction level,
// lead times, drift periods, calibration sums and reproducibility.
#include <doctest/doctest.h>

#include <cmath>
#include <stdexcept>
#include <string>
#include <vector>

#include <boost/random/uniform_int_distribution.hpp>

#include "analysis/evaluation.hpp"
#include "report/evaluation_tables.hpp"
#include "models/random_streams.hpp"

using namespace tocsin;

namespace {

const Instant march_1 = days_from_civil(2026, 3, 1) * 86400;  // 2026-03-01T00:00:00Z

struct Builder {
    Population pop;
    std::vector<Score> scores;
    std::vector<std::uint32_t> owner;

    std::uint32_t encounter(const std::string& id, Instant admitted, Instant discharged,
                            std::optional<Instant> outcome = std::nullopt) {
        pop.encounters.push_back({id, 0, admitted, discharged, outcome});
        return static_cast<std::uint32_t>(pop.encounters.size() - 1);
    }
    void score(std::uint32_t e, Instant available_at, double value) {
        scores.push_back({available_at, available_at, value});
        owner.push_back(e);
    }
    Population build() {
        pop.units = {"Ward A"};
        group_scores_by_encounter(pop, scores, owner);
        apply_score_exclusions(pop);
        default_period(pop);
        return pop;
    }
};

// Five encounters on one ward (times in hours after 2026-03-01 00:00 UTC):
//   A  case,     stay 0-48, time zero 30; scores 3 @2, 5 @10, 7 @20, 4 @27,
//                and 9 @31 (after time zero: excluded, counted)
//   B  non-case, stay 0-40;               scores 2 @1, 6 @12, 1 @36
//   C  case,     stay 5-9,  time zero 9;  score 8 @6
//   D  non-case, stay 0-20;               no score at all
//   E  non-case, admitted 1 April 00:00, stay 10 h; score 7.5 @ +3 h
Population five_encounters() {
    Builder b;
    const auto h = [](double x) { return march_1 + static_cast<Instant>(x * 3600); };
    const auto a = b.encounter("A", h(0), h(48), h(30));
    const auto bb = b.encounter("B", h(0), h(40));
    const auto c = b.encounter("C", h(5), h(9), h(9));
    b.encounter("D", h(0), h(20));
    const Instant april_1 = days_from_civil(2026, 4, 1) * 86400;
    const auto e = b.encounter("E", april_1, april_1 + hours(10));
    b.score(a, h(2), 3);
    b.score(a, h(10), 5);
    b.score(a, h(20), 7);
    b.score(a, h(27), 4);
    b.score(a, h(31), 9);
    b.score(bb, h(1), 2);
    b.score(bb, h(12), 6);
    b.score(bb, h(36), 1);
    b.score(c, h(6), 8);
    b.score(e, april_1 + hours(3), 7.5);
    return b.build();
}

double cell_number(const Table& t, std::size_t row, const std::string& column) {
    for (std::size_t c = 0; c < t.columns.size(); ++c)
        if (t.columns[c] == column) {
            const Cell& v = t.rows.at(row)[c];
            if (auto d = std::get_if<double>(&v)) return *d;
            if (auto i = std::get_if<std::int64_t>(&v)) return static_cast<double>(*i);
            return std::nan("");
        }
    FAIL("no column " << column);
    return 0;
}

}  // namespace

TEST_CASE("evaluation.encounter_level_uses_the_highest_usable_score") {
    const Population pop = five_encounters();
    // A's 9 at hour 31 is after time zero and is gone; D has no score.
    const auto s = encounter_level_scores(pop);
    REQUIRE(s.size() == 4);
    CHECK(s[0].highest_score == 7.0);  // A: max of 3, 5, 7, 4
    CHECK(s[0].is_case);
    CHECK(s[1].highest_score == 6.0);  // B
    CHECK(s[2].highest_score == 8.0);  // C
    CHECK(s[3].highest_score == 7.5);  // E
    // Cases {7, 8} against non-cases {6, 7.5}: 7 beats 6 (1), 8 beats both (2);
    // AUC = 3 / 4.
    const EncounterAuc t = encounter_level_auc(s, 0.95);
    CHECK(t.auc == doctest::Approx(0.75));
    CHECK(t.cases == 2);
    CHECK(t.non_cases == 2);

    const EvaluationCounts counts = evaluation_counts(pop);
    const auto excluded = counts.scores_excluded.find("available at or after the outcome (time zero)");
    REQUIRE(excluded != counts.scores_excluded.end());
    CHECK(excluded->second == 1);
    // The table says so under the same reason.
    bool saw_exclusion = false;
    for (const auto& row : evaluation_counts_table(counts).rows)
        if (std::get<std::string>(row[0]) == "scores excluded: available at or after the outcome (time zero)") {
            saw_exclusion = true;
            CHECK(std::get<std::int64_t>(row[1]) == 1);
        }
    CHECK(saw_exclusion);
}

TEST_CASE("evaluation.prediction_level_labels_by_horizon") {
    const Population pop = five_encounters();
    EvaluationOptions o;
    o.horizons_hours = {4, 12};
    o.bootstrap_replicates = 0;
    // Predictions (value, hours from available to time zero):
    //   A: 3 (28 h), 5 (20 h), 7 (10 h), 4 (3 h); C: 8 (3 h); B: 2, 6, 1; E: 7.5
    // 4 h:  positives {4, 8}; negatives {3, 5, 7, 2, 6, 1, 7.5}
    //       4 beats 3, 2, 1 -> 3; 8 beats all 7 -> 7; AUC = 10 / 14
    // 12 h: positives {7, 4, 8}; negatives {3, 5, 2, 6, 1, 7.5}
    //       7 beats 5 of them, 4 beats 3, 8 beats 6; AUC = 14 / 18
    const auto t = prediction_level_auc(pop, o);
    REQUIRE(t.size() == 2);
    CHECK(t[0].predictions == 9);
    CHECK(t[0].positive_predictions == 2);
    CHECK(t[0].encounters == 4);
    CHECK(t[0].encounters_with_positive == 2);
    CHECK(t[0].auc == doctest::Approx(10.0 / 14.0));
    CHECK(t[1].positive_predictions == 3);
    CHECK(t[1].auc == doctest::Approx(14.0 / 18.0));
    CHECK(std::isnan(t[0].interval.lower));  // no bootstrap asked for
    CHECK(std::isnan(cell_number(prediction_auc_table(t), 0, "auc_lower")));  // an empty cell

    // A horizon of exactly 3 h still counts time zero 3 h ahead (the interval
    // is (available_at, available_at + H]); 2.9 h does not.
    o.horizons_hours = {3, 2.9};
    const auto edge = prediction_level_auc(pop, o);
    CHECK(edge[0].positive_predictions == 2);
    CHECK(edge[1].positive_predictions == 0);
}

TEST_CASE("evaluation.lead_time_of_first_crossing") {
    const Population pop = five_encounters();
    // Threshold 5, window 24 h: A's window opens at hour 6, its first score
    // >= 5 after that is 5 @10 -> lead 20 h; C: 8 @6 -> lead 3 h.
    CHECK(first_crossing_lead_hours(pop, 5, 24) == std::vector<double>{20.0, 3.0});
    // Window 12 h: A's window opens at hour 18 -> 7 @20 -> 10 h.
    CHECK(first_crossing_lead_hours(pop, 5, 12) == std::vector<double>{10.0, 3.0});
    // Threshold 7.8: only C crosses.
    CHECK(first_crossing_lead_hours(pop, 7.8, 24) == std::vector<double>{3.0});

    // Min lead 4 h: C's 3 h is late; 1 of 2 cases.
    const auto t = lead_times_by_threshold(pop, {5.0}, 24, 4);
    REQUIRE(t.size() == 1);
    CHECK(t[0].cases == 2);
    CHECK(t[0].cases_crossed == 2);
    CHECK(t[0].cases_late == 1);
    REQUIRE(t[0].share_late);
    CHECK(*t[0].share_late == 0.5);
    CHECK(t[0].median_hours == doctest::Approx(11.5));  // type 7 between 3 and 20
}

TEST_CASE("evaluation.drift_by_month_and_calibration_sums") {
    const Population pop = five_encounters();
    EvaluationOptions o;
    o.horizons_hours = {12};
    o.bootstrap_replicates = 0;
    o.thresholds = {5};
    ProbabilityMapping m;
    m.kind = ProbabilityMapping::Kind::divide;
    m.divisor = 10;
    m.horizon_hours = 12;
    o.probability = m;
    o.decision_threshold_probabilities = {0.7};
    o.evaluations_per_case = {1.25};  // pt = 1 / 1.25 = 0.8
    const Evaluation ev = evaluate(pop, o);

    // Months (UTC): March holds A, B, C (8 predictions, 3 positive at 12 h);
    // April holds E's one negative prediction.
    REQUIRE(ev.drift.size() == 2);
    CHECK(ev.drift[0].label == "2026-03");
    CHECK(ev.drift[1].label == "2026-04");
    CHECK(ev.drift[0].predictions == 8);
    CHECK(ev.drift[0].positive_predictions == 3);
    CHECK(ev.drift[1].predictions == 1);
    // March without E's 7.5: 7 beats 3, 5, 2, 6, 1 (5), 4 beats 3, 2, 1 (3), 8 beats 5; AUC 13/15.
    CHECK(ev.drift[0].auc == doctest::Approx(13.0 / 15.0));
    CHECK(std::isnan(ev.drift[1].auc));  // no positive in April
    // Expected in March = (3 + 5 + 7 + 4 + 2 + 6 + 1 + 8) / 10 = 3.6; observed 3.
    REQUIRE(ev.drift[0].observed_expected);
    CHECK(ev.drift[0].observed_expected->expected == doctest::Approx(3.6));
    CHECK(ev.drift[0].observed_expected->ratio == doctest::Approx(3.0 / 3.6));

    // Whole population: expected 4.35 (adding E's 0.75), observed 3.
    REQUIRE(ev.calibration);
    CHECK(ev.calibration->observed_expected.expected == doctest::Approx(4.35));
    CHECK(ev.calibration->observed_expected.observed == 3);

    // Decision curve at the encounter level: probabilities A 0.7, B 0.6, C 0.8,
    // E 0.75.
    // pt = 0.7: act on A, C, E -> TP 2, FP 1 of 4; NB = 2/4 - 1/4 x 0.7/0.3 = -0.0833.
    // pt = 0.8 (N = 1.25): act on C -> TP 1, FP 0; NB = 1/4.
    REQUIRE(ev.decision_curve);
    const DecisionCurveResult& dc = *ev.decision_curve;
    REQUIRE(dc.points.size() == 2);
    CHECK(dc.points[0].net_benefit_model == doctest::Approx(0.5 - 0.25 * 0.7 / 0.3));
    CHECK(dc.source[1] == "evaluations_per_case");
    CHECK(dc.points[1].threshold_probability == doctest::Approx(0.8));
    CHECK(dc.points[1].net_benefit_model == doctest::Approx(0.25));
    // Treat all at 0.8: 2/4 - 2/4 x 4 = -1.5.
    CHECK(dc.points[1].net_benefit_treat_all == doctest::Approx(-1.5));
    // Every table has a stable name and the summary mentions the given threshold.
    for (const Table& t : evaluation_tables(ev)) CHECK_FALSE(t.name.empty());
    CHECK(evaluation_summary(ev).find("Threshold 5:") != std::string::npos);
}

TEST_CASE("evaluation.fixed_length_periods") {
    const Population pop = five_encounters();
    EvaluationOptions o;
    o.drift_period_days = 7;
    o.bootstrap_replicates = 0;
    const Evaluation ev = evaluate(pop, o);
    // Period origin is the population's start, 1 March 00:00; E on 1 April
    // falls in the fifth week (31 days = 4 weeks + 3 days). Weeks 2-4 are
    // empty but still listed, so a gap in the data shows up as a gap.
    REQUIRE(ev.drift.size() == 5);
    CHECK(ev.drift[4].label == "2026-03-29");
    CHECK(ev.drift[4].predictions == 1);
    CHECK(ev.drift[1].predictions == 0);
}

TEST_CASE("evaluation.bootstrap_is_reproducible") {
    // Forty encounters, each a case with probability 1/4 by construction
    // (every fourth), with scores that rise towards time zero for cases.
    Builder b;
    for (int e = 0; e < 40; ++e) {
        const bool is_case = e % 4 == 0;
        const Instant admitted = march_1 + hours(e);
        const auto id = b.encounter("P" + std::to_string(e), admitted, admitted + hours(30),
                                    is_case ? std::optional<Instant>(admitted + hours(24)) : std::nullopt);
        for (int k = 0; k < 24; ++k) b.score(id, admitted + hours(k), (e * 7 + k * 3) % 11 + (is_case ? k * 0.3 : 0.0));
    }
    const Population pop = b.build();
    EvaluationOptions o;
    o.horizons_hours = {4, 8};
    o.bootstrap_replicates = 50;
    o.seed = 5;
    const std::string first = to_csv(prediction_auc_table(prediction_level_auc(pop, o)));
    CHECK(first == to_csv(prediction_auc_table(prediction_level_auc(pop, o))));
    o.seed = 6;
    CHECK(first != to_csv(prediction_auc_table(prediction_level_auc(pop, o))));
    const auto t = prediction_level_auc(pop, o);
    CHECK(t[0].interval.lower < t[0].interval.upper);
}

TEST_CASE("evaluation.bootstrap_replicate_is_the_resampled_population") {
    // One replicate resamples whole encounters with replacement. Its AUC must
    // equal the AUC of a population built by copying each drawn encounter,
    // which we build here from the documented stream: (seed, replication,
    // evaluation_bootstrap, entity = replicate index), one uniform draw per
    // encounter with scores. With one replicate the percentile interval is
    // that single value.
    Builder b;
    for (int e = 0; e < 12; ++e) {
        const bool is_case = e % 3 == 0;
        const Instant admitted = march_1 + hours(2 * e);
        const auto id = b.encounter("P" + std::to_string(e), admitted, admitted + hours(20),
                                    is_case ? std::optional<Instant>(admitted + hours(18)) : std::nullopt);
        for (int k = 0; k < 16; ++k) b.score(id, admitted + hours(k), (e * 5 + k * 7) % 13 + (is_case ? k * 0.25 : 0.0));
    }
    const Population pop = b.build();
    EvaluationOptions o;
    o.horizons_hours = {6};
    o.bootstrap_replicates = 1;
    o.seed = 17;
    o.replication = 2;
    const auto boot = prediction_level_auc(pop, o);

    RandomEngine engine = make_stream(17, 2, StreamPurpose::evaluation_bootstrap, 0);
    boost::random::uniform_int_distribution<std::size_t> pick(0, pop.encounters.size() - 1);
    Builder copy;
    for (std::size_t d = 0; d < pop.encounters.size(); ++d) {
        const std::size_t e = pick(engine);
        const Encounter& enc = pop.encounters[e];
        const auto id = copy.encounter(enc.id + "#" + std::to_string(d), enc.admitted, enc.discharged, enc.outcome_at);
        for (const Score& s : pop.scores_of(e)) copy.score(id, s.available_at, s.value);
    }
    o.bootstrap_replicates = 0;
    const auto resampled = prediction_level_auc(copy.build(), o);
    CHECK(boot[0].interval.lower == doctest::Approx(resampled[0].auc).epsilon(1e-12));
    CHECK(boot[0].interval.upper == boot[0].interval.lower);
}

TEST_CASE("evaluation.rejects_bad_options") {
    const Population pop = five_encounters();
    EvaluationOptions o;
    o.horizons_hours = {0};
    CHECK_THROWS_AS(evaluate(pop, o), std::invalid_argument);
    o = {};
    ProbabilityMapping m;
    m.kind = ProbabilityMapping::Kind::logistic;
    m.slope = -1;
    o.probability = m;
    CHECK_THROWS_AS(evaluate(pop, o), std::invalid_argument);
    o = {};
    o.evaluations_per_case = {1};
    CHECK_THROWS_AS(evaluate(pop, o), std::invalid_argument);
}

namespace {

// Eight stays (hours after 2026-03-01), scores out of 10, mapped by divide:10:
//   S1..S4 highest 2 (p = 0.2): S1 a case whose later 9 comes after time zero
//          (excluded, so its highest is still 2); S2..S4 quiet.
//   S5..S8 highest 5 (p = 0.5): S5..S7 cases; S8 quiet, with a 1 before its 5.
// Observed 4 of 8, expected 4 x 0.2 + 4 x 0.5 = 2.8.
Population eight_stays() {
    Builder b;
    const auto h = [](double x) { return march_1 + static_cast<Instant>(x * 3600); };
    const auto s1 = b.encounter("S1", h(0), h(30), h(10));
    b.score(s1, h(2), 2);
    b.score(s1, h(11), 9);
    for (const char* id : {"S2", "S3", "S4"}) b.score(b.encounter(id, h(0), h(30)), h(3), 2);
    for (const char* id : {"S5", "S6", "S7"}) b.score(b.encounter(id, h(0), h(30), h(20)), h(4), 5);
    const auto s8 = b.encounter("S8", h(0), h(30));
    b.score(s8, h(1), 1);
    b.score(s8, h(5), 5);
    return b.build();
}

double expit(double x) { return 1.0 / (1.0 + std::exp(-x)); }

}  // namespace

TEST_CASE("evaluation.stay_level_calibration_by_hand") {
    ProbabilityMapping m;
    m.kind = ProbabilityMapping::Kind::divide;
    m.divisor = 10;
    const StayCalibration c = stay_level_calibration(encounter_level_scores(eight_stays()), m, 2, 0.95);

    CHECK(c.observed_expected.predictions == 8);
    CHECK(c.observed_expected.observed == 4);
    CHECK(c.observed_expected.expected == doctest::Approx(2.8));
    CHECK(c.observed_expected.ratio == doctest::Approx(4.0 / 2.8));

    // Two distinct probabilities make the two-parameter fit saturated: it
    // reproduces each group's observed share (1/4 at p = 0.2, 3/4 at p = 0.5),
    //   a + b logit(0.2) = logit(1/4) = -ln 3,  a + b logit(0.5) = a = ln 3,
    // so b = 2 ln 3 / ln 4 and a = ln 3.
    const LogisticRecalibration& fit = c.recalibration;
    REQUIRE(fit.converged);
    CHECK(fit.slope == doctest::Approx(2 * std::log(3.0) / std::log(4.0)).epsilon(1e-9));
    CHECK(fit.intercept == doctest::Approx(std::log(3.0)).epsilon(1e-9));
    // Calibration-in-the-large (slope fixed at 1) solves its score equation:
    // the refitted probabilities sum to the observed count.
    const double citl = fit.calibration_in_the_large;
    const double refitted = 4 * expit(citl + std::log(0.2 / 0.8)) + 4 * expit(citl);
    CHECK(refitted == doctest::Approx(4.0).epsilon(1e-9));
    CHECK(citl > 0);  // more outcomes than predicted

    // Two groups of four stays, in order of probability.
    REQUIRE(c.bins.size() == 2);
    CHECK(c.bins[0].predictions == 4);
    CHECK(c.bins[0].outcomes == 1);
    CHECK(c.bins[0].mean_predicted == doctest::Approx(0.2));
    CHECK(c.bins[1].outcomes == 3);
    CHECK(c.bins[1].mean_predicted == doctest::Approx(0.5));
}

TEST_CASE("evaluation.stay_calibration_in_evaluate_and_its_tables") {
    EvaluationOptions o;
    o.bootstrap_replicates = 0;
    o.calibration_groups = 2;
    ProbabilityMapping m;
    m.kind = ProbabilityMapping::Kind::divide;
    m.divisor = 10;
    m.horizon_hours = 6;  // the prediction level uses it; the stay level does not
    o.probability = m;
    const Evaluation ev = evaluate(eight_stays(), o);
    REQUIRE(ev.stay_calibration);
    CHECK(ev.stay_calibration->observed_expected.observed == 4);
    // The prediction level counts every usable score (ten less S1's 9 after
    // time zero), the stay level stays.
    REQUIRE(ev.calibration);
    CHECK(ev.calibration->observed_expected.predictions == 9);

    const Table stay = stay_calibration_table(ev.stay_calibration);
    CHECK(stay.name == "evaluation_calibration_stay");
    REQUIRE(stay.rows.size() == 1);
    CHECK(cell_number(stay, 0, "stays") == 8);
    CHECK(cell_number(stay, 0, "calibration_slope") ==
          doctest::Approx(2 * std::log(3.0) / std::log(4.0)).epsilon(1e-9));
    CHECK(cell_number(stay, 0, "calibration_in_the_large") ==
          doctest::Approx(ev.stay_calibration->recalibration.calibration_in_the_large));
    const Table bins = stay_calibration_bins_table(ev.stay_calibration);
    CHECK(bins.name == "evaluation_calibration_stay_bins");
    CHECK(bins.rows.size() == 2);
    bool listed = false;
    for (const Table& t : evaluation_tables(ev)) listed = listed || t.name == "evaluation_calibration_stay_bins";
    CHECK(listed);

    // The terminal names calibration-in-the-large and the slope plainly, at both
    // levels, and never a bare "intercept".
    const std::string summary = evaluation_summary(ev);
    CHECK(summary.find("Calibration, prediction level (every score; outcome within 6 h)") != std::string::npos);
    CHECK(summary.find("Calibration, stay level") != std::string::npos);
    CHECK(summary.find("calibration-in-the-large") != std::string::npos);
    CHECK(summary.find("calibration slope") != std::string::npos);
    CHECK(summary.find("intercept") == std::string::npos);

    // Without a mapping there is no stay calibration and its tables have no row.
    EvaluationOptions plain = o;
    plain.probability.reset();
    const Evaluation without = evaluate(eight_stays(), plain);
    CHECK_FALSE(without.stay_calibration);
    CHECK(stay_calibration_table(without.stay_calibration).rows.empty());
    CHECK(stay_calibration_bins_table(without.stay_calibration).rows.empty());
}

TEST_CASE("evaluation.drift_says_which_outcome_its_auc_uses") {
    // Without a mapping the AUC's outcome is the first horizon; with one it is
    // the mapping's (here: before discharge), and every row and the summary say so.
    EvaluationOptions o;
    o.bootstrap_replicates = 0;
    o.horizons_hours = {8, 24};
    const Evaluation first = evaluate(five_encounters(), o);
    REQUIRE_FALSE(first.drift.empty());
    for (const DriftPeriod& d : first.drift) {
        CHECK(d.horizon_hours == 8);
        CHECK(d.horizon_source == std::string(drift_horizon_first));
    }
    CHECK(evaluation_summary(first).find("each period's AUC uses the outcome within 8 h (the first horizon)") !=
          std::string::npos);

    ProbabilityMapping m;
    m.kind = ProbabilityMapping::Kind::divide;
    m.divisor = 10;
    o.probability = m;
    const Evaluation mapped = evaluate(five_encounters(), o);
    const Table t = drift_table(mapped.drift);
    REQUIRE(t.columns.back() == "horizon_source");
    for (std::size_t r = 0; r < t.rows.size(); ++r) {
        CHECK(std::get<std::string>(t.rows[r][2]) == "before discharge");
        CHECK(std::get<std::string>(t.rows[r].back()) == drift_horizon_mapping);
    }
    CHECK(evaluation_summary(mapped).find("use the outcome before discharge (the probability mapping's horizon)") !=
          std::string::npos);
}
