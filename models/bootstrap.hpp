#pragma once
// Replications from a replayed log by resampling whole blocks of calendar
// time (days or weeks) per unit, each block with every encounter admitted in
// it, whole stays and all their scores. Resampling single encounters would
// lose what a committee cares about: how many patients share a night on one
// unit, and how busy nights cluster.
//
// Scheme, per unit, for target blocks t = 0, 1, ... covering the period:
// - blocks are block_days x 24 h long, counted from the period start (UTC);
//   only whole blocks of the log between its warm-up and its tail are
//   sources (EligibleDays, below): those are the days whose census is
//   complete;
// - stationary bootstrap (Politis & Romano 1994): the next target block takes
//   the source block after the previous one, except with probability
//   1 / mean_run_blocks (or when the eligible days end) it jumps to a random
//   eligible block; run lengths are geometric with that mean.
// - moving-block bootstrap (Kuensch 1989): runs of exactly mean_run_blocks
//   consecutive source blocks, each run starting at a random source block.
// - with same_weekday (day blocks, and at least 7 eligible days), a jump
//   lands only on a source block that starts on the same weekday, so the
//   weekly pattern survives; week blocks keep it by construction.
// - an encounter admitted in source block s is copied into target block t,
//   shifted by (t - s) blocks, with its whole stay, outcome and scores; its id
//   becomes "<id>~<t>". With a tail (tail_days > 0), nobody is admitted
//   after the log's last admission: a log that follows its last patients to
//   discharge ends with days of discharges only, and its replications do too.
// - the initial census (stays present at the period start): with a warm-up
//   (warm_up_days > 0) the log's own is incomplete, so each replication takes
//   the census present at the start of the source block of its first target
//   block (an eligible block, so a complete census, on the same weekday), moved
//   to the period start with whole stays and scores, ids "<id>~census"; the
//   replication's census is then full from its first day. With no warm-up the
//   log's census at its start is complete and is kept as it is.
//
// Eligible days (find_eligible_days). A log extract misses, in its first days,
// the stays admitted before it began (or, when it lists everyone present in a
// window, holds only the long stays of the days before the window), and in its
// last days it cuts stays short or misses the admissions still open at its
// end. Blocks drawn from those days would carry too few patient-hours into the
// middle of a replication, so every replication would run low. The warm-up and
// the tail are declared (warm_up_days, tail_days) or found from the log as the
// larger of two rules:
// - stays: the smallest whole number of days x such that at most 5% of all
//   patient time lies more than x days into a stay (observed stay lengths).
//   In a steady unit, the census x days after the log begins that was
//   admitted before it is the patients whose remaining stay exceeds x, a share
//   E[(L - x)+] / E[L] of the census (Little 1961; the stationary-excess
//   distribution of the M_t/G/infinity queue, Eick, Massey & Whitt 1993): so
//   from x days on the log misses at most 5% of its census, and stays admitted
//   x days or more before its end lose at most 5% of their time to the cut-off.
//   The 5% is our choice, no source.
// - census: the first and last day on which the log's daily census (mean
//   occupied beds over the day, all units together) reaches 90% of its typical
//   level (the median daily census between x days from either end); catches
//   logs whose first days hold only the long stays of patients present later,
//   and logs that stop admitting well before their last discharge. The 90% is
//   our choice, no source.
// warm_up_days: 0 and tail_days: 0 give the scheme as it was before these
// rules (every whole block a source, the log's initial census kept).
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
//   part of the uncertainty being estimated);
// - a replication's census is full from its first to its last day, while the
//   log's own runs low in its warm-up and tail: compare the two over the
//   eligible days (a reporting period inside them), and expect whole-period
//   counts (cases, notices) of a replication to exceed the log's when its
//   first days are incomplete (the replication's initial census is full).
#include <cstdint>
#include <optional>
#include <string>
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
    // Days at the start (warm-up) and at the end (tail) of the log that are
    // not drawn from, its census being incomplete there; none: found from
    // the log (find_eligible_days).
    std::optional<int> warm_up_days, tail_days;
};

// Throws std::invalid_argument naming the field.
void validate(const BootstrapConfig& config);

// The source blocks of a log: whole blocks between its warm-up and its tail.
struct EligibleDays {
    int warm_up_days = 0, tail_days = 0;
    bool warm_up_found = false, tail_found = false;  // found from the log rather than declared
    int log_days = 0;                 // the log's period in days, a part day counting as one
    int first_block = 0, blocks = 0;  // eligible blocks: [first_block, first_block + blocks)
    // What the rules measured (when either edge was found from the log):
    int stay_days = 0;                // x of the stay rule
    int census_warm_up_days = 0;      // days up to the first on which the census reaches 90% of typical
    int census_tail_days = 0;         // days from the last on which it does to the end
    double typical_census = 0;        // median daily census, all units
};

// Declared edges are taken as they are; the others are found from the log.
// Throws std::invalid_argument when no whole block is left.
EligibleDays find_eligible_days(const Population& log, const BootstrapConfig& config);

// The eligible days as instants on the log's clock: [from, until).
struct EligiblePeriod {
    Instant from = 0, until = 0;
};
EligiblePeriod eligible_period(const EligibleDays& days, const Population& log, const BootstrapConfig& config);

// "Bootstrap draws from days 9 to 31 of the 42-day log (...)": which days, from
// when until when on the log's clock, and why.
std::string describe_eligible_days(const EligibleDays& days, const Population& log, const BootstrapConfig& config,
                                   const TimeZone& zone);

// Source block (first_source, first_source + 1, ...: absolute block indices)
// for each of `target_blocks` target blocks, drawn from the `source_blocks`
// blocks starting at `first_source`. Exposed so the scheme itself can be checked.
std::vector<int> plan_blocks(int source_blocks, int target_blocks, const BootstrapConfig& config,
                             RandomEngine& engine, int first_source = 0);

// Replication 0 returns the source unchanged. Otherwise each unit is
// resampled with stream (seed, replication, bootstrap, unit) from the
// eligible blocks. Throws std::invalid_argument when none is left. The first
// form finds the eligible days itself.
Population bootstrap_population(const Population& source, const BootstrapConfig& config, std::uint64_t seed,
                                std::uint64_t replication);
Population bootstrap_population(const Population& source, const BootstrapConfig& config, const EligibleDays& days,
                                std::uint64_t seed, std::uint64_t replication);

}  // namespace tocsin
