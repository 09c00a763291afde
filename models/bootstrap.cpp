#include "models/bootstrap.hpp"

#include <algorithm>
#include <boost/random/uniform_01.hpp>
#include <boost/random/uniform_int_distribution.hpp>
#include <cmath>
#include <numeric>
#include <stdexcept>
#include <string>

namespace tocsin {

void validate(const BootstrapConfig& c) {
    if (c.block_days < 1)
        throw std::invalid_argument("bootstrap: block_days: must be at least 1, got " + std::to_string(c.block_days));
    if (!(c.mean_run_blocks >= 1.0) || !std::isfinite(c.mean_run_blocks))
        throw std::invalid_argument("bootstrap: mean_run_blocks: must be at least 1");
    if (c.warm_up_days && *c.warm_up_days < 0)
        throw std::invalid_argument("bootstrap: warm_up_days: must be at least 0, got " + std::to_string(*c.warm_up_days));
    if (c.tail_days && *c.tail_days < 0)
        throw std::invalid_argument("bootstrap: tail_days: must be at least 0, got " + std::to_string(*c.tail_days));
}

std::vector<int> plan_blocks(int source_blocks, int target_blocks, const BootstrapConfig& c, RandomEngine& engine,
                             int first_source) {
    validate(c);
    if (source_blocks < 1) throw std::invalid_argument("bootstrap: the log holds no whole block to resample");
    const bool match_weekday = c.same_weekday && c.block_days == 1 && source_blocks >= 7;
    // Source s (0-based among the sources) stands for target t on the same weekday.
    auto same_day = [&](int t, int s) { return !match_weekday || (t - (first_source + s)) % 7 == 0; };
    // A random source block that may stand in for target block t (and, for
    // moving blocks, still has `room` blocks after it when possible).
    auto jump = [&](int t, int room) {
        std::vector<int> candidates;
        for (int s = 0; s < source_blocks; ++s)
            if (same_day(t, s) && s + room <= source_blocks) candidates.push_back(s);
        if (candidates.empty())
            for (int s = 0; s < source_blocks; ++s)
                if (same_day(t, s)) candidates.push_back(s);
        boost::random::uniform_int_distribution<int> pick(0, static_cast<int>(candidates.size()) - 1);
        return candidates[static_cast<std::size_t>(pick(engine))];
    };
    std::vector<int> plan(static_cast<std::size_t>(std::max(0, target_blocks)));
    const int run = std::max(1, static_cast<int>(std::lround(c.mean_run_blocks)));
    for (int t = 0; t < target_blocks; ++t) {
        const int next = t > 0 ? plan[static_cast<std::size_t>(t - 1)] + 1 : source_blocks;
        bool start_run;
        if (c.scheme == BlockScheme::stationary) {
            const double u = boost::random::uniform_01<double>()(engine);
            start_run = t == 0 || u < 1.0 / c.mean_run_blocks;
        } else {
            start_run = t % run == 0;
        }
        plan[static_cast<std::size_t>(t)] =
            (start_run || next >= source_blocks) ? jump(t, c.scheme == BlockScheme::moving_block ? run : 1) : next;
    }
    for (int& s : plan) s += first_source;
    return plan;
}

Population bootstrap_population(const Population& source, const BootstrapConfig& config, std::uint64_t seed,
                                std::uint64_t replication) {
    validate(config);
    if (replication == 0) return source;
    return bootstrap_population(source, config, find_eligible_days(source, config), seed, replication);
}

namespace {

// Copies encounters into a replication, moved by whole blocks.
struct Copier {
    const Population& source;
    Population& out;
    // Per score (the first, then the others): values and their encounters.
    std::vector<std::vector<Score>> scores;
    std::vector<std::vector<std::uint32_t>> owner;

    void copy(std::size_t e, Seconds shift, const std::string& id) {
        Encounter enc = source.encounters[e];
        enc.id = id;
        enc.admitted += shift;
        enc.discharged += shift;
        if (enc.outcome_at) *enc.outcome_at += shift;
        const auto index = static_cast<std::uint32_t>(out.encounters.size());
        out.encounters.push_back(std::move(enc));
        for (std::size_t k = 0; k < source.score_count(); ++k)
            for (Score s : source.scores_of(e, k)) {
                s.scored_at += shift;
                s.available_at += shift;
                scores[k].push_back(s);
                owner[k].push_back(index);
            }
    }
};

}  // namespace

Population bootstrap_population(const Population& source, const BootstrapConfig& config, const EligibleDays& eligible,
                                std::uint64_t seed, std::uint64_t replication) {
    validate(config);
    if (replication == 0) return source;
    const Instant start = source.period_start, end = source.period_end;
    const Seconds block = days(config.block_days);
    if (end <= start) throw std::invalid_argument("bootstrap: the source population covers no period");
    if (eligible.blocks < 1) throw std::invalid_argument("bootstrap: no whole block of the log is eligible");
    const int target_blocks = static_cast<int>((end - start + block - 1) / block);
    const bool keep_initial = eligible.warm_up_days == 0;  // else each replication takes an eligible day's census
    // With a tail, a replication admits no one after the log's last admission,
    // as the log does not: its whole-period counts stay comparable.
    Instant last_admission = end;
    if (eligible.tail_days > 0) {
        last_admission = start;
        for (const Encounter& e : source.encounters) last_admission = std::max(last_admission, e.admitted);
    }

    // Encounters by unit and source block; stays admitted before the period are the log's initial census.
    const std::size_t n_units = source.units.size();
    const int source_blocks = eligible.first_block + eligible.blocks;
    std::vector<std::vector<std::vector<std::size_t>>> admitted_in(
        n_units, std::vector<std::vector<std::size_t>>(static_cast<std::size_t>(source_blocks)));
    std::vector<std::vector<std::size_t>> by_unit(n_units);
    for (std::size_t e = 0; e < source.encounters.size(); ++e) {
        const Encounter& enc = source.encounters[e];
        by_unit[enc.unit].push_back(e);
        if (enc.admitted < start) continue;
        const Instant b = (enc.admitted - start) / block;
        if (b < source_blocks) admitted_in[enc.unit][static_cast<std::size_t>(b)].push_back(e);
    }

    Population out;
    out.units = source.units;
    out.groups = source.groups;
    out.period_start = start;
    out.period_end = end;
    out.excluded = source.excluded;
    out.excluded.notes["bootstrap replication: exclusion counts are those of the source log"] += 1;
    out.score_name = source.score_name;
    for (const OtherScore& o : source.other_scores)
        out.other_scores.push_back({.name = o.name, .excluded_by_reason = o.excluded_by_reason});
    Copier copier{source, out, std::vector<std::vector<Score>>(source.score_count()),
                  std::vector<std::vector<std::uint32_t>>(source.score_count())};
    for (std::uint32_t u = 0; u < n_units; ++u) {
        RandomEngine engine = make_stream(seed, replication, StreamPurpose::bootstrap, u);
        const std::vector<int> plan = plan_blocks(eligible.blocks, target_blocks, config, engine, eligible.first_block);
        // The initial census: the log's own, or the stays present when the first source block begins.
        const Instant census_at = keep_initial ? start : start + plan[0] * block;
        for (std::size_t e : by_unit[u]) {
            const Encounter& enc = source.encounters[e];
            if (keep_initial) {
                if (enc.admitted < start) copier.copy(e, 0, enc.id);
            } else if (enc.admitted < census_at && enc.discharged > census_at) {
                copier.copy(e, start - census_at, enc.id + "~census");
            }
        }
        for (int t = 0; t < target_blocks; ++t) {
            const int s = plan[static_cast<std::size_t>(t)];
            const Seconds shift = static_cast<Seconds>(t - s) * block;
            for (std::size_t e : admitted_in[u][static_cast<std::size_t>(s)]) {
                const Instant admitted = source.encounters[e].admitted + shift;
                if (admitted >= end || admitted > last_admission) continue;  // partial last block, or after the log's last
                copier.copy(e, shift, source.encounters[e].id + "~" + std::to_string(t));
            }
        }
    }
    for (std::size_t k = 0; k < out.score_count(); ++k) group_scores_by_encounter(out, copier.scores[k], copier.owner[k], k);
    return out;
}

}  // namespace tocsin
