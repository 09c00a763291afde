#pragma once
// Shift stress tests: "what if, from 1 March, the patient mix changes?" A shift
// transforms any population (replayed, bootstrapped or generated) from a given
// instant on; everything before that instant is left exactly as it was, so a
// run can report the same plan before and after.
//
// What each knob does, for the units it applies to:
// - outcome_rate_multiplier m: among encounters admitted at or after `from`,
//   the share of cases becomes min(1, m x share). For m > 1 some controls are
//   replaced by a case drawn from the same unit (its whole stay and scores,
//   moved to the replaced admission instant); for m < 1 some cases by a
//   control. Stays therefore change a little with the mix.
// - score_scale, score_offset: every score scored at or after `from` becomes
//   latent x scale + offset (points: clamped to 0-100; probability: on the logit).
// - cadence_minutes: from `from`, at most one score per encounter in each
//   cadence-long window counted from `from` (the first one). A log can only be
//   thinned: to score more often, generate with a faster cadence instead.
// - outage (the whole feed, every unit): no score becomes available in
//   [outage_start, outage_start + outage_hours); those scores are counted as
//   excluded, reason "feed outage (shift stress test)".
// - census_multiplier (per unit, >= 1): extra admissions after `from`, about
//   (multiplier - 1) per admission, each a copy of a random stay of that unit
//   admitted within 30 minutes of the one it follows. Beds are not enforced:
//   a raised census is the point of the test.
// Random draws: streams (seed, replication, shift, hash of the encounter id),
// so a decision about one patient does not depend on the others.
#include <cstdint>
#include <map>
#include <string>
#include <vector>

#include "models/generator.hpp"
#include "models/population.hpp"

namespace tocsin {

struct ShiftStress {
    Instant from = 0;
    std::vector<std::string> units;          // units the mix, score and cadence changes apply to; empty = all
    double outcome_rate_multiplier = 1.0;
    ScoreScale scale = ScoreScale::points;   // how values map to the latent scale
    double score_scale = 1.0;
    double score_offset = 0.0;
    double cadence_minutes = 0.0;            // 0 = unchanged
    Instant outage_start = 0;                // used when outage_hours > 0; must be >= from
    double outage_hours = 0.0;
    std::map<std::string, double> census_multiplier;  // unit name -> multiplier >= 1
};

// Throws std::invalid_argument naming the field (and, for an unknown unit, the known ones).
void validate(const ShiftStress& stress, const Population& population);

Population apply_shift(const Population& population, const ShiftStress& stress, std::uint64_t seed,
                       std::uint64_t replication);

}  // namespace tocsin
