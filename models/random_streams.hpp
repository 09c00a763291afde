#pragma once
// Reproducible random streams. Every stream is derived from
// (scenario seed, replication, purpose, entity), so a patient's draws do not
// depend on which plans run, how staff are rostered, or how many threads run
// (common random numbers). Distributions come from Boost.Random, whose
// algorithms are fixed in the headers we build with.
#include <boost/random/mersenne_twister.hpp>
#include <cstdint>
#include <initializer_list>
#include <string_view>

namespace tocsin {

// What a stream is for. Append new purposes at the end: the numeric value is
// part of every stream's seed, so reordering would change every result.
enum class StreamPurpose : std::uint64_t {
    arrivals = 1,           // entity: unit
    stay = 2,               // entity: encounter (length of stay, outcome)
    trajectory = 3,         // entity: encounter (score values, cadence, latency)
    bootstrap = 4,          // entity: unit
    task_minutes = 5,       // entity: entity_key(encounter, notice instant, occurrence, escalation step); see sim/staff.hpp
    chart_openings = 6,     // entity: entity_key(encounter, opening role name)
    retired_acceptance = 7, // reserved: retired (was per plan); never reuse the value
    calibration_search = 8, // entity: 0
    evaluation_bootstrap = 9,
    shift = 10,             // entity: unit
    retired_staff = 11,     // reserved: retired (was per plan); never reuse the value
    chart_acceptance = 12,  // entity: entity_key(encounter, opening role name, opening instant, occurrence)
    handoff_follow_up = 13, // entity: entity_key(encounter, handoff instant)
    rise_size = 14,         // entity: encounter (a case's own pre-outcome rise; drawn only when it varies)
    patient_group = 15,     // entity: entity_key(encounter, group column name)
    notice_response = 16,   // entity: entity_key(encounter, notice instant, occurrence); a page under fatigue (sim/fatigue.hpp)
    score_comparison = 17,  // entity: entity_key(plan name, other score name, N x 1000); replication 0
    other_work = 18,        // entity: entity_key(role name, unit, other-work class name, task number or ~0 for the instants); see sim/other_work.hpp
    score_lookup = 19,      // entity: entity_key(encounter, opening role name, opening instant, occurrence), as chart_acceptance
    other_score = 20,       // entity: entity_key(encounter, score name); a generated population's further score (models/generator.hpp)
};

// SplitMix64 finaliser (Steele, Lea & Flood 2014): a bijective 64-bit mix.
constexpr std::uint64_t mix64(std::uint64_t z) {
    z += 0x9e3779b97f4a7c15ULL;
    z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9ULL;
    z = (z ^ (z >> 27)) * 0x94d049bb133111ebULL;
    return z ^ (z >> 31);
}

// The part of a stream's seed shared by every entity of one purpose, so that
// code drawing for many entities can compute it once.
constexpr std::uint64_t purpose_seed(std::uint64_t scenario_seed, std::uint64_t replication, StreamPurpose purpose) {
    std::uint64_t h = mix64(scenario_seed);
    h = mix64(h ^ replication);
    return mix64(h ^ static_cast<std::uint64_t>(purpose));
}

constexpr std::uint64_t stream_seed(std::uint64_t scenario_seed, std::uint64_t replication, StreamPurpose purpose,
                                    std::uint64_t entity) {
    return mix64(purpose_seed(scenario_seed, replication, purpose) ^ entity);
}

// A stable 64-bit key for a name (FNV-1a), so that an entity keyed by a role's
// name keeps its draws when other roles are added, removed or reordered.
constexpr std::uint64_t text_entity(std::string_view text) {
    std::uint64_t h = 0xcbf29ce484222325ULL;  // FNV-1a offset basis
    for (unsigned char ch : text) {
        h ^= ch;
        h *= 0x100000001b3ULL;  // FNV prime
    }
    return h;
}

// One entity named by several parts, e.g. (encounter, instant, role): the
// parts are chained through mix64, so (a, b) and (b, a) are different keys.
constexpr std::uint64_t entity_key(std::initializer_list<std::uint64_t> parts) {
    std::uint64_t h = 0x6a09e667f3bcc909ULL;
    for (std::uint64_t part : parts) h = mix64(h ^ part);
    return h;
}

using RandomEngine = boost::random::mt19937_64;

// A tiny engine for many short streams (one per task, per chart opening, per
// handoff), where seeding a Mersenne Twister each time would cost more than the
// few draws taken: SplitMix64 (Steele, Lea & Flood 2014), fed to the same Boost
// distributions.
struct SplitMixEngine {
    using result_type = std::uint64_t;
    std::uint64_t state = 0;
    static constexpr result_type min() { return 0; }
    static constexpr result_type max() { return ~result_type{0}; }
    result_type operator()() {
        const result_type out = mix64(state);
        state += 0x9e3779b97f4a7c15ULL;
        return out;
    }
};

// Where a replication's draws come from; each draw is keyed further by purpose and entity.
struct ReplicationSeed {
    std::uint64_t seed = 0;
    std::uint64_t replication = 0;
};

inline SplitMixEngine make_short_stream(ReplicationSeed from, StreamPurpose purpose, std::uint64_t entity) {
    return SplitMixEngine{stream_seed(from.seed, from.replication, purpose, entity)};
}

inline RandomEngine make_stream(std::uint64_t scenario_seed, std::uint64_t replication, StreamPurpose purpose,
                                std::uint64_t entity) {
    return RandomEngine(stream_seed(scenario_seed, replication, purpose, entity));
}

}  // namespace tocsin
