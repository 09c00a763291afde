#pragma once
// Small invented populations shared by the population-source tests.
#include <cstdio>
#include <string>

#include "models/generator.hpp"
#include "models/population.hpp"

namespace tocsin::testing {

// Every row of a population, units by name (a replayed log numbers them by
// name) and reals in hexadecimal, so that equal text means bit-identical.
inline std::string population_rows(const Population& pop) {
    std::string out;
    char buffer[160];
    for (std::size_t e = 0; e < pop.encounters.size(); ++e) {
        const Encounter& enc = pop.encounters[e];
        std::snprintf(buffer, sizeof buffer, " %lld %lld %lld\n", static_cast<long long>(enc.admitted),
                      static_cast<long long>(enc.discharged),
                      static_cast<long long>(enc.outcome_at ? *enc.outcome_at : -1));
        out += enc.id + " @ " + pop.units[enc.unit] + buffer;
        for (const Score& s : pop.scores_of(e)) {
            std::snprintf(buffer, sizeof buffer, "  %lld %lld %a\n", static_cast<long long>(s.scored_at),
                          static_cast<long long>(s.available_at), s.value);
            out += buffer;
        }
    }
    return out;
}

inline Instant midnight_utc(int year, int month, int day) { return days_from_civil(year, month, day) * 86400; }

inline WeeklyRate flat_rate(double per_hour) {
    WeeklyRate r{};
    r.fill(per_hour);
    return r;
}

// Two invented wards over `days` days from Monday 2026-01-05, UTC. Mean stay
// 72 h * exp(0.6^2 / 2) = 86 h; 0.3 admissions an hour keep 28 beds busy.
inline GeneratorConfig two_wards(int days = 120) {
    GeneratorConfig c;
    c.units = {UnitConfig{"ward-north", 28, flat_rate(0.3)}, UnitConfig{"ward-south", 28, flat_rate(0.3)}};
    c.stay.median_hours = 72;
    c.stay.log_sd = 0.6;
    c.outcome.probability = 0.08;
    c.scores.cadence_minutes = 60;
    c.scores.jitter_minutes = 10;
    c.scores.missing_probability = 0.05;
    c.scores.latency_median_minutes = 15;
    c.scores.latency_log_sd = 0.5;
    c.period_start = midnight_utc(2026, 1, 5);
    c.period_end = c.period_start + days * 86400;
    return c;
}

// Every field of a population as text; reals in hexadecimal so that "equal"
// means bit-identical.
inline std::string serialize(const Population& pop) {
    std::string out;
    char buffer[128];
    for (const std::string& u : pop.units) out += "unit " + u + "\n";
    for (std::size_t e = 0; e < pop.encounters.size(); ++e) {
        const Encounter& enc = pop.encounters[e];
        std::snprintf(buffer, sizeof buffer, " %u %lld %lld %lld\n", enc.unit, static_cast<long long>(enc.admitted),
                      static_cast<long long>(enc.discharged),
                      static_cast<long long>(enc.outcome_at ? *enc.outcome_at : -1));
        out += enc.id + buffer;
        for (const Score& s : pop.scores_of(e)) {
            std::snprintf(buffer, sizeof buffer, "  %lld %lld %a\n", static_cast<long long>(s.scored_at),
                          static_cast<long long>(s.available_at), s.value);
            out += buffer;
        }
    }
    for (const auto& [reason, n] : pop.excluded.scores_by_reason) out += "excluded score " + reason + " " + std::to_string(n) + "\n";
    for (const auto& [reason, n] : pop.excluded.encounters_by_reason) out += "excluded encounter " + reason + " " + std::to_string(n) + "\n";
    for (const auto& [reason, n] : pop.excluded.notes) out += "note " + reason + " " + std::to_string(n) + "\n";
    return out;
}

}  // namespace tocsin::testing
