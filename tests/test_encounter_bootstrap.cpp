// The encounter bootstrap of prediction-level AUC, fast path against the
// plain definition: each replicate's resample built by copying the drawn
// encounters, its AUC counted pair by pair (Mann-Whitney, ties one half).
// The reference is written here from the definition, not from the code it
// checks; the sums are integers, so they must agree exactly, and the AUCs
// (one division each) to 1e-12.
#include <doctest/doctest.h>

#include <algorithm>
#include <boost/random/uniform_int_distribution.hpp>
#include <cmath>
#include <cstdint>
#include <vector>

#include "analysis/encounter_bootstrap.hpp"
#include "analysis/roc.hpp"
#include "analysis/value_ranks.hpp"
#include "models/random_streams.hpp"

using namespace tocsin;

namespace {

const Instant day_one = days_from_civil(2026, 3, 1) * 86400;

// Random stays with heavy ties: scores are whole numbers 0..`levels`-1 (plus
// a few one-decimal values), cases' scores drift up towards time zero. Some
// encounters have no usable score, so `used` is not every encounter.
Population random_population(std::uint64_t seed, int encounters, int levels) {
    RandomEngine engine = make_stream(seed, 0, StreamPurpose::trajectory, 0);
    boost::random::uniform_int_distribution<int> scores_per_stay(0, 12), level(0, levels - 1), coin(0, 3), tenth(0, 9);
    Population pop;
    pop.units = {"Ward A"};
    std::vector<Score> scores;
    std::vector<std::uint32_t> owner;
    for (int e = 0; e < encounters; ++e) {
        const Instant admitted = day_one + hours(e);
        const bool is_case = coin(engine) == 0;
        const Instant discharged = admitted + hours(30);
        pop.encounters.push_back({"E" + std::to_string(e), 0, admitted, discharged,
                                  is_case ? std::optional<Instant>(admitted + hours(26)) : std::nullopt});
        const int k = scores_per_stay(engine);
        for (int j = 0; j < k; ++j) {
            const Instant at = admitted + hours(2 * j) + minutes(7);
            double v = level(engine) + (is_case ? j / 4 : 0);
            if (coin(engine) == 0) v += tenth(engine) / 10.0;
            scores.push_back({at, at, v});
            owner.push_back(static_cast<std::uint32_t>(e));
        }
    }
    group_scores_by_encounter(pop, scores, owner);
    apply_score_exclusions(pop);
    default_period(pop);
    return pop;
}

// The definition: copy each drawn encounter's predictions, then compare every
// positive with every negative.
AucSums resampled_pairwise(const Population& pop, const std::vector<std::uint32_t>& drawn, std::int32_t limit) {
    std::vector<double> pos, neg;
    for (std::uint32_t e : drawn) {
        const Encounter& enc = pop.encounters[e];
        for (const Score& s : pop.scores_of(e)) {
            const bool positive = enc.outcome_at && *enc.outcome_at - s.available_at <= limit;
            (positive ? pos : neg).push_back(s.value);
        }
    }
    AucSums sums;
    sums.positives = static_cast<std::int64_t>(pos.size());
    sums.negatives = static_cast<std::int64_t>(neg.size());
    for (double p : pos)
        for (double q : neg) sums.twice_u += p > q ? 2 : p == q ? 1 : 0;
    return sums;
}

// Replicate b's draws, from the stream the bootstrap documents.
std::vector<std::uint32_t> drawn_encounters(const Population& pop, const EvaluationOptions& o, int b) {
    std::vector<std::uint32_t> used;
    for (std::size_t e = 0; e < pop.encounters.size(); ++e)
        if (!pop.scores_of(e).empty()) used.push_back(static_cast<std::uint32_t>(e));
    RandomEngine engine = make_stream(o.seed, o.replication, StreamPurpose::evaluation_bootstrap, static_cast<std::uint64_t>(b));
    boost::random::uniform_int_distribution<std::size_t> pick(0, used.size() - 1);
    std::vector<std::uint32_t> drawn;
    for (std::size_t d = 0; d < used.size(); ++d) drawn.push_back(used[pick(engine)]);
    return drawn;
}

void check_same(const AucSums& fast, const AucSums& reference) {
    CHECK(fast.twice_u == reference.twice_u);
    CHECK(fast.positives == reference.positives);
    CHECK(fast.negatives == reference.negatives);
    if (reference.positives && reference.negatives) CHECK(fast.auc() == doctest::Approx(reference.auc()).epsilon(1e-12));
}

}  // namespace

TEST_CASE("encounter_bootstrap.every_replicate_equals_the_resample_counted_pair_by_pair") {
    // 70 replicates: two batches of 35 lanes on 2 threads, a full batch of 64
    // and a short one on 1 thread; four limits, one of them the whole stay,
    // two of them equal.
    for (const int levels : {3, 8, 40}) {
        const Population pop = random_population(static_cast<std::uint64_t>(levels), 60, levels);
        const RankedPredictions ranked = rank_predictions(pop);
        const std::vector<std::int32_t> limits = {horizon_limit_seconds(4), horizon_limit_seconds(12),
                                                  horizon_limit_seconds(4), horizon_limit_seconds(0)};
        EvaluationOptions o;
        o.bootstrap_replicates = 70;
        o.seed = 11;
        o.replication = 3;
        o.threads = 2;
        const auto two = bootstrap_auc_sums(ranked, limits, pop.encounters.size(), o);
        o.threads = 1;
        const auto one = bootstrap_auc_sums(ranked, limits, pop.encounters.size(), o);
        REQUIRE(two.size() == 70);
        REQUIRE(one.size() == 70);
        for (int b = 0; b < o.bootstrap_replicates; ++b) {
            const auto drawn = drawn_encounters(pop, o, b);
            REQUIRE(two[b].size() == limits.size());
            REQUIRE(one[b].size() == limits.size());
            for (std::size_t h = 0; h < limits.size(); ++h) {
                const AucSums reference = resampled_pairwise(pop, drawn, limits[h]);
                check_same(two[b][h], reference);
                check_same(one[b][h], reference);
            }
        }
    }
}

TEST_CASE("encounter_bootstrap.figures_do_not_depend_on_threads_or_batches") {
    const Population pop = random_population(5, 80, 6);
    const RankedPredictions ranked = rank_predictions(pop);
    const std::vector<std::int32_t> limits = {horizon_limit_seconds(6), horizon_limit_seconds(24)};
    EvaluationOptions o;
    o.bootstrap_replicates = 150;
    o.threads = 1;
    const auto one = bootstrap_auc_sums(ranked, limits, pop.encounters.size(), o);
    for (unsigned threads : {2u, 3u, 7u}) {
        o.threads = threads;
        const auto many = bootstrap_auc_sums(ranked, limits, pop.encounters.size(), o);
        for (std::size_t b = 0; b < one.size(); ++b)
            for (std::size_t h = 0; h < limits.size(); ++h) {
                CHECK(many[b][h].twice_u == one[b][h].twice_u);
                CHECK(many[b][h].positives == one[b][h].positives);
                CHECK(many[b][h].negatives == one[b][h].negatives);
            }
    }
}

TEST_CASE("encounter_bootstrap.large_multiplicities_and_many_horizons_take_the_plain_pass") {
    // A multiplicity above 255 does not fit a row; more than 63 distinct
    // limits do not fit the class mask. Both must give the plain pass's sums.
    const Population pop = random_population(9, 40, 5);
    const RankedPredictions ranked = rank_predictions(pop);
    std::vector<std::uint32_t> heavy(pop.encounters.size(), 1), light(pop.encounters.size(), 0);
    heavy[ranked.encounters_used.front()] = 300;
    light[ranked.encounters_used.back()] = 2;
    light[ranked.encounters_used.front()] = 1;
    const std::vector<std::int32_t> few = {horizon_limit_seconds(3), horizon_limit_seconds(8)};
    std::vector<std::int32_t> many;
    for (int m = 1; m <= 70; ++m) many.push_back(m * 1800);
    for (const auto& limits : {few, many}) {
        const auto fast = weighted_auc_sums(ranked, limits, {heavy, light, {}}, 2);
        const std::vector<std::vector<std::uint32_t>> weightings = {heavy, light, {}};
        for (std::size_t j = 0; j < weightings.size(); ++j) {
            const auto plain = auc_sums_by_horizon(ranked, limits, weightings[j]);
            for (std::size_t h = 0; h < limits.size(); ++h) check_same(fast[j][h], plain[h]);
        }
    }
}

TEST_CASE("encounter_bootstrap.long_tie_groups_do_not_overflow_the_lanes") {
    // One score value for everyone: a single tie group of 20,000 predictions,
    // longer than the 16-bit lanes hold before they are emptied.
    Population pop;
    pop.units = {"Ward A"};
    std::vector<Score> scores;
    std::vector<std::uint32_t> owner;
    for (int e = 0; e < 400; ++e) {
        const Instant admitted = day_one + minutes(e);
        pop.encounters.push_back({"E" + std::to_string(e), 0, admitted, admitted + days(3),
                                  e % 5 == 0 ? std::optional<Instant>(admitted + hours(26)) : std::nullopt});
        for (int j = 0; j < 50; ++j) {
            scores.push_back({admitted + minutes(30 * j + 1), admitted + minutes(30 * j + 1), 1.5});
            owner.push_back(static_cast<std::uint32_t>(e));
        }
    }
    group_scores_by_encounter(pop, scores, owner);
    apply_score_exclusions(pop);
    default_period(pop);
    const RankedPredictions ranked = rank_predictions(pop);
    REQUIRE(ranked.value.size() == 20000);
    std::vector<std::uint32_t> weights(pop.encounters.size());
    for (std::size_t e = 0; e < weights.size(); ++e) weights[e] = static_cast<std::uint32_t>(e % 255 + 1);
    const std::vector<std::int32_t> limits = {horizon_limit_seconds(6)};
    const auto fast = weighted_auc_sums(ranked, limits, {weights}, 1);
    check_same(fast[0][0], auc_sums_by_horizon(ranked, limits, weights)[0]);
    CHECK(fast[0][0].auc() == 0.5);
}

TEST_CASE("encounter_bootstrap.ranking_is_a_stable_sort_with_few_or_many_distinct_values") {
    // Few distinct values take the counting sort, more than 65,536 the radix
    // sort; both must give the stable ascending order of the scores, the
    // counting sort also when split over threads.
    for (const int levels : {7, 1000000000}) {
        Population pop;
        pop.units = {"Ward A"};
        std::vector<Score> scores;
        std::vector<std::uint32_t> owner;
        RandomEngine engine = make_stream(21, 0, StreamPurpose::trajectory, 1);
        boost::random::uniform_int_distribution<int> value(0, levels - 1);
        for (int e = 0; e < 1000; ++e) {
            const Instant admitted = day_one + minutes(e);
            pop.encounters.push_back({"E" + std::to_string(e), 0, admitted, admitted + days(2), std::nullopt});
            for (int j = 0; j < 80; ++j) {
                scores.push_back({admitted + minutes(20 * j + 1), admitted + minutes(20 * j + 1), value(engine) / 8.0 - 3.0});
                owner.push_back(static_cast<std::uint32_t>(e));
            }
        }
        group_scores_by_encounter(pop, scores, owner);
        apply_score_exclusions(pop);
        default_period(pop);
        std::vector<std::uint32_t> order(pop.scores.size()), encounter_of(pop.scores.size());
        for (std::size_t e = 0; e < pop.encounters.size(); ++e)
            for (std::size_t s = pop.score_start[e]; s < pop.score_start[e + 1]; ++s) encounter_of[s] = static_cast<std::uint32_t>(e);
        for (std::size_t i = 0; i < order.size(); ++i) order[i] = static_cast<std::uint32_t>(i);
        std::stable_sort(order.begin(), order.end(),
                         [&](std::uint32_t a, std::uint32_t b) { return pop.scores[a].value < pop.scores[b].value; });
        std::vector<double> values;
        for (const Score& s : pop.scores) values.push_back(s.value);
        CHECK(distinct_value_ranks(values.size(), [&](std::size_t i) { return values[i]; }, std::size_t{1} << 16).has_value() ==
              (levels < 65536));
        CHECK(ascending_order(values) == order);
        for (unsigned threads : {1u, 3u}) {
            const RankedPredictions ranked = rank_predictions(pop, threads);
            bool same = ranked.value.size() == order.size();
            for (std::size_t i = 0; same && i < order.size(); ++i)
                same = ranked.value[i] == pop.scores[order[i]].value && ranked.encounter[i] == encounter_of[order[i]] &&
                       ranked.available_at[i] == pop.scores[order[i]].available_at;
            CHECK(same);
        }
    }
}

TEST_CASE("encounter_bootstrap.multiplicities_are_boosts_uniform_draws") {
    // bootstrap_multiplicities does Boost's uniform_int_distribution
    // arithmetic itself (a multiplication for the division): it must count
    // exactly the draws Boost's own distribution makes from the same stream,
    // whatever the number of encounters drawn from, one included (no draw).
    EvaluationOptions o;
    o.seed = 99;
    o.replication = 4;
    for (const std::size_t used_count : {std::size_t{1}, std::size_t{2}, std::size_t{3}, std::size_t{7},
                                         std::size_t{1000}, std::size_t{90715}, std::size_t{262147}}) {
        std::vector<std::uint32_t> used;
        for (std::size_t k = 0; k < used_count; ++k) used.push_back(static_cast<std::uint32_t>(2 * k + 1));
        const std::size_t encounters = 2 * used_count + 1;
        for (int b : {0, 5}) {
            std::vector<std::uint32_t> expected(encounters, 0);
            RandomEngine engine = make_stream(o.seed, o.replication, StreamPurpose::evaluation_bootstrap, static_cast<std::uint64_t>(b));
            boost::random::uniform_int_distribution<std::size_t> pick(0, used_count - 1);
            for (std::size_t d = 0; d < used_count; ++d) ++expected[used[pick(engine)]];
            CHECK(bootstrap_multiplicities(used, encounters, o, b) == expected);
        }
    }
}
