#pragma once
// Reproducible random streams. Every stream is derived from
// (scenario seed, replication, purpose, entity), so a patient's draws do not
// depend on which plans run, how staff are rostered, or how many threads run
// (common random numbers). Distributions come from Boost.Random, whose
// algorithms are fixed in the headers we build with.
#include <boost/random/mersenne_twister.hpp>
#include <cstdint>

namespace tocsin {

// What a stream is for. Append new purposes at the end: the numeric value is
// part of every stream's seed, so reordering would change every result.
enum class StreamPurpose : std::uint64_t {
    arrivals = 1,           // entity: unit
    stay = 2,               // entity: encounter (length of stay, outcome)
    trajectory = 3,         // entity: encounter (score values, cadence, latency)
    bootstrap = 4,          // entity: unit
    task_minutes = 5,       // entity: plan
    chart_openings = 6,     // entity: encounter
    acceptance = 7,         // entity: plan
    calibration_search = 8, // entity: 0
    evaluation_bootstrap = 9,
    shift = 10,             // entity: unit
    staff = 11,             // entity: plan
    chart_acceptance = 12,  // entity: encounter; one draw per chart opening, shared by every plan
    handoff_follow_up = 13, // entity: encounter; one draw per handoff the patient is present for
};

// SplitMix64 finaliser (Steele, Lea & Flood 2014): a bijective 64-bit mix.
constexpr std::uint64_t mix64(std::uint64_t z) {
    z += 0x9e3779b97f4a7c15ULL;
    z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9ULL;
    z = (z ^ (z >> 27)) * 0x94d049bb133111ebULL;
    return z ^ (z >> 31);
}

constexpr std::uint64_t stream_seed(std::uint64_t scenario_seed, std::uint64_t replication, StreamPurpose purpose,
                                    std::uint64_t entity) {
    std::uint64_t h = mix64(scenario_seed);
    h = mix64(h ^ replication);
    h = mix64(h ^ static_cast<std::uint64_t>(purpose));
    return mix64(h ^ entity);
}

using RandomEngine = boost::random::mt19937_64;

inline RandomEngine make_stream(std::uint64_t scenario_seed, std::uint64_t replication, StreamPurpose purpose,
                                std::uint64_t entity) {
    return RandomEngine(stream_seed(scenario_seed, replication, purpose, entity));
}

}  // namespace tocsin
