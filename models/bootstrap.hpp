#pragma once
// Replications from a replayed log by resampling whole blocks of calendar
// time (days or weeks) per unit, each block with every encounter admitted in
// it, whole stays and all their scores. Resampling single encounters would
// lose what a committee cares about: how many patients share a night on one
// unit, and how busy nights cluster.
//
// Scheme, per unit, for target blocks t = 0, 1, ... covering the period:
// - blocks are block_days x 24 h long, counted from the period start (UTC);
//   only whole blocks of the log are sources;
// - stationary bootstrap (Politis & Romano 1994): the next target block takes
//   the source block after the previous one, except with probability
//   1 / mean_run_blocks (or when the log ends) it jumps to a random source
//   block; run lengths are geometric with that mean.
// - moving-block bootstrap (Kuensch 1989): runs of exactly mean_run_blocks
//   consecutive source blocks, each run starting at a random source block.
// - with same_weekday (day blocks, and a log of at least 7 whole days), a
//   jump lands only on a source block that starts on the same weekday, so the
//   weekly pattern survives; week blocks keep it by construction.
// - an encounter admitted in source block s is copied into target block t,
//   shifted by (t - s) blocks, with its whole stay, outcome and scores; its id
//   becomes "<id>~<t>". Stays present at the period start are the initial
//   census and are kept as they are in every replication.
//
// Limits (say so next to any interval built from these replications):
// - nothing new is invented: every night is a recombination of the log's
//   nights, so a one-month log understates rarer weeks (holidays, outbreaks)
//   and the interval describes "months like this one";
// - beds are not enforced: stays spilling over from resampled blocks can put
//   a unit's census above its beds for a while (on average it stays the same);
// - dependence longer than a run (seasons, trends) is broken at the jumps;
// - shifts are whole multiples of 24 h in UTC: across a daylight-saving
//   change a copied stay moves by one hour on the local clock;
// - the outcome rate of a replication varies around the log's (that spread is
//   part of the uncertainty being estimated).
#include <cstdint>
#include <vector>

#include "models/population.hpp"
#include "models/random_streams.hpp"

namespace tocsin {

enum class BlockScheme { stationary, moving_block };

struct BootstrapConfig {
    int block_days = 1;             // 1 = resample days, 7 = resample weeks
    BlockScheme scheme = BlockScheme::stationary;
    double mean_run_blocks = 7.0;   // stationary: mean run length; moving block: run length (rounded)
    bool same_weekday = true;       // day blocks: jumps keep the weekday
};

// Throws std::invalid_argument naming the field.
void validate(const BootstrapConfig& config);

// Source block for each of `target_blocks` target blocks. Exposed so the
// scheme itself can be checked.
std::vector<int> plan_blocks(int source_blocks, int target_blocks, const BootstrapConfig& config,
                             RandomEngine& engine);

// Replication 0 returns the source unchanged. Otherwise each unit is
// resampled with stream (seed, replication, bootstrap, unit). Throws
// std::invalid_argument when the period holds no whole block.
Population bootstrap_population(const Population& source, const BootstrapConfig& config, std::uint64_t seed,
                                std::uint64_t replication);

}  // namespace tocsin
