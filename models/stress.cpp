#include "models/stress.hpp"

#include <algorithm>
#include <boost/random/uniform_01.hpp>
#include <boost/random/uniform_int_distribution.hpp>
#include <cmath>
#include <stdexcept>

#include "models/random_streams.hpp"

namespace tocsin {

namespace {

int unit_index(const Population& pop, const std::string& name, const std::string& field) {
    for (std::size_t u = 0; u < pop.units.size(); ++u)
        if (pop.units[u] == name) return static_cast<int>(u);
    std::string known;
    for (const std::string& u : pop.units) known += (known.empty() ? "" : ", ") + u;
    throw std::invalid_argument("shift: " + field + ": unknown unit \"" + name + "\" (units: " + known + ")");
}

double to_latent(double value, ScoreScale scale) {
    if (scale == ScoreScale::points) return value;
    const double p = std::clamp(value, 1e-12, 1.0 - 1e-12);
    return std::log(p / (1.0 - p));
}

double from_latent(double latent, ScoreScale scale) {
    if (scale == ScoreScale::points) return std::clamp(latent, 0.0, 100.0);
    return 1.0 / (1.0 + std::exp(-latent));
}

struct Stay {
    Encounter encounter;
    std::vector<Score> scores;
};

Stay moved_copy(const Population& pop, std::size_t donor, Instant admitted, std::string id, std::uint32_t unit) {
    Stay s{pop.encounters[donor], {}};
    const Seconds shift = admitted - s.encounter.admitted;
    s.encounter.id = std::move(id);
    s.encounter.unit = unit;
    s.encounter.admitted += shift;
    s.encounter.discharged += shift;
    if (s.encounter.outcome_at) *s.encounter.outcome_at += shift;
    for (Score sc : pop.scores_of(donor)) {
        sc.scored_at += shift;
        sc.available_at += shift;
        s.scores.push_back(sc);
    }
    return s;
}

}  // namespace

void validate(const ShiftStress& s, const Population& pop) {
    auto require = [](bool ok, const std::string& field, const std::string& what) {
        if (!ok) throw std::invalid_argument("shift: " + field + ": " + what);
    };
    require(std::isfinite(s.outcome_rate_multiplier) && s.outcome_rate_multiplier >= 0, "outcome_rate_multiplier",
            "must be a number >= 0");
    require(std::isfinite(s.score_scale), "score_scale", "must be finite");
    require(std::isfinite(s.score_offset), "score_offset", "must be finite");
    require(std::isfinite(s.cadence_minutes) && s.cadence_minutes >= 0, "cadence_minutes", "must be >= 0 (0 = unchanged)");
    require(std::isfinite(s.outage_hours) && s.outage_hours >= 0, "outage_hours", "must be >= 0");
    require(s.outage_hours == 0 || s.outage_start >= s.from, "outage_start",
            "must not be before the shift's start (patients before it stay unchanged)");
    for (const std::string& u : s.units) unit_index(pop, u, "units");
    for (const auto& [name, m] : s.census_multiplier) {
        unit_index(pop, name, "census_multiplier");
        require(std::isfinite(m) && m >= 1.0, "census_multiplier." + name, "must be >= 1");
    }
}

namespace {

double uniform(RandomEngine& e) { return boost::random::uniform_01<double>()(e); }

std::size_t pick(RandomEngine& e, const std::vector<std::size_t>& from) {
    return from[static_cast<std::size_t>(boost::random::uniform_int_distribution<std::size_t>(0, from.size() - 1)(e))];
}

// Donor stays per unit: cases and controls admitted inside the period.
struct Donors {
    std::vector<std::vector<std::size_t>> cases, controls, all;
};

Donors donors_by_unit(const Population& pop) {
    Donors d{std::vector<std::vector<std::size_t>>(pop.units.size()),
             std::vector<std::vector<std::size_t>>(pop.units.size()),
             std::vector<std::vector<std::size_t>>(pop.units.size())};
    for (std::size_t e = 0; e < pop.encounters.size(); ++e) {
        const Encounter& enc = pop.encounters[e];
        if (enc.admitted < pop.period_start) continue;
        (enc.outcome_at ? d.cases : d.controls)[enc.unit].push_back(e);
        d.all[enc.unit].push_back(e);
    }
    return d;
}

// What apply_shift works on: the stress, its streams, the donors, and the
// stays and exclusions of the population it builds.
struct ShiftWork {
    const Population& pop;
    const ShiftStress& stress;
    std::uint64_t seed;
    std::uint64_t replication;
    std::vector<bool> affected;  // per unit
    Donors donors;
    std::vector<Stay> stays;
    Exclusions& excluded;
};

// A raised census: extra admissions following each admission after `from`.
void raise_census(ShiftWork& w) {
    const Population& pop = w.pop;
    for (const auto& [name, multiplier] : w.stress.census_multiplier) {
        const auto u = static_cast<std::uint32_t>(unit_index(pop, name, "census_multiplier"));
        if (w.donors.all[u].empty()) continue;
        std::int64_t extra = 0;
        for (std::size_t e = 0; e < pop.encounters.size(); ++e) {
            const Encounter& trigger = pop.encounters[e];
            if (trigger.unit != u || trigger.admitted < w.stress.from) continue;
            RandomEngine engine =
                make_stream(w.seed, w.replication, StreamPurpose::shift, text_entity(trigger.id + "#census"));
            const double wanted = multiplier - 1.0;
            const int copies = static_cast<int>(std::floor(wanted)) + (uniform(engine) < wanted - std::floor(wanted) ? 1 : 0);
            for (int k = 0; k < copies; ++k) {
                const std::size_t donor = pick(engine, w.donors.all[u]);
                const auto offset = static_cast<Seconds>((2.0 * uniform(engine) - 1.0) * 1800.0);
                const Instant at = std::clamp<Instant>(trigger.admitted + offset, w.stress.from, pop.period_end - 1);
                w.stays.push_back(moved_copy(pop, donor, at, trigger.id + "+extra" + std::to_string(k + 1), u));
                ++extra;
            }
        }
        if (extra) w.excluded.notes["shift: extra admissions (census raised): " + name] += extra;
    }
}

// Outcome mix among admissions at or after `from` on unit u: stays replaced
// by moved copies of donor cases (raising the rate) or controls (lowering it).
std::int64_t change_outcome_mix(ShiftWork& w, std::uint32_t u) {
    const ShiftStress& stress = w.stress;
    double n = 0, n_cases = 0;
    for (const Stay& s : w.stays)
        if (s.encounter.unit == u && s.encounter.admitted >= stress.from) {
            n += 1;
            n_cases += s.encounter.outcome_at ? 1 : 0;
        }
    if (n == 0) return 0;
    const double p = n_cases / n, target = std::min(1.0, stress.outcome_rate_multiplier * p);
    const bool raise = target > p;
    const std::vector<std::size_t>& donors = raise ? w.donors.cases[u] : w.donors.controls[u];
    if (donors.empty() || p == 0.0 || p == 1.0) {
        w.excluded.notes["shift: outcome rate unchanged, no donor stays on unit: " + w.pop.units[u]] += 1;
        return 0;
    }
    const double replace_probability = raise ? (target - p) / (1.0 - p) : (p - target) / p;
    std::int64_t replaced = 0;
    for (Stay& s : w.stays) {
        const Encounter& enc = s.encounter;
        if (enc.unit != u || enc.admitted < stress.from || enc.outcome_at.has_value() == raise) continue;
        RandomEngine engine = make_stream(w.seed, w.replication, StreamPurpose::shift, text_entity(enc.id + "#mix"));
        const double u_replace = uniform(engine);
        const std::size_t donor = pick(engine, donors);
        if (u_replace >= replace_probability) continue;
        s = moved_copy(w.pop, donor, enc.admitted, enc.id + "~mix", u);
        ++replaced;
    }
    return replaced;
}

// Scores from `from` on: value change, thinned cadence, outage. Moves the
// stays (by unit, then admission) into `out` with their kept scores.
void shift_scores(ShiftWork& w, Population& out) {
    const ShiftStress& stress = w.stress;
    const Instant outage_end = stress.outage_start + static_cast<Seconds>(std::llround(stress.outage_hours * 3600.0));
    const Seconds window = static_cast<Seconds>(std::llround(stress.cadence_minutes * 60.0));
    std::int64_t outage_lost = 0, thinned = 0;
    std::vector<Score> scores;
    std::vector<std::uint32_t> owner;
    std::stable_sort(w.stays.begin(), w.stays.end(), [](const Stay& a, const Stay& b) {
        return a.encounter.unit != b.encounter.unit ? a.encounter.unit < b.encounter.unit
                                                    : a.encounter.admitted < b.encounter.admitted;
    });
    for (Stay& s : w.stays) {
        const auto index = static_cast<std::uint32_t>(out.encounters.size());
        const bool on_affected = w.affected[s.encounter.unit];
        std::vector<Score> by_time = s.scores;  // cadence windows follow the clinical clock
        std::stable_sort(by_time.begin(), by_time.end(),
                         [](const Score& a, const Score& b) { return a.scored_at < b.scored_at; });
        Instant last_window = -1;
        for (Score sc : by_time) {
            if (stress.outage_hours > 0 && sc.available_at >= stress.outage_start && sc.available_at < outage_end) {
                ++outage_lost;
                continue;
            }
            if (on_affected && sc.scored_at >= stress.from) {
                if (window > 0) {
                    const Instant win = (sc.scored_at - stress.from) / window;
                    if (win == last_window) {
                        ++thinned;
                        continue;
                    }
                    last_window = win;
                }
                if (stress.score_scale != 1.0 || stress.score_offset != 0.0)
                    sc.value = from_latent(to_latent(sc.value, stress.scale) * stress.score_scale + stress.score_offset,
                                           stress.scale);
            }
            scores.push_back(sc);
            owner.push_back(index);
        }
        out.encounters.push_back(std::move(s.encounter));
    }
    if (outage_lost) out.excluded.scores_by_reason["feed outage (shift stress test)"] += outage_lost;
    if (thinned) out.excluded.scores_by_reason["not scored under the slower cadence (shift stress test)"] += thinned;
    if (window > 0 && thinned == 0)
        out.excluded.notes["shift: cadence unchanged, scores were already this far apart; generate with a faster "
                           "cadence to score more often"] += 1;
    group_scores_by_encounter(out, scores, owner);
}

}  // namespace

Population apply_shift(const Population& pop, const ShiftStress& stress, std::uint64_t seed,
                       std::uint64_t replication) {
    validate(stress, pop);
    Population out;
    out.units = pop.units;
    out.groups = pop.groups;
    out.period_start = pop.period_start;
    out.period_end = pop.period_end;
    out.excluded = pop.excluded;
    ShiftWork w{pop, stress, seed, replication, std::vector<bool>(pop.units.size(), stress.units.empty()),
                donors_by_unit(pop), {}, out.excluded};
    for (const std::string& u : stress.units) w.affected[static_cast<std::size_t>(unit_index(pop, u, "units"))] = true;
    w.stays.reserve(pop.encounters.size());
    for (std::size_t e = 0; e < pop.encounters.size(); ++e) {
        Stay s{pop.encounters[e], {}};
        auto sc = pop.scores_of(e);
        s.scores.assign(sc.begin(), sc.end());
        w.stays.push_back(std::move(s));
    }
    raise_census(w);
    if (stress.outcome_rate_multiplier != 1.0) {
        std::int64_t replaced = 0;
        for (std::uint32_t u = 0; u < pop.units.size(); ++u)
            if (w.affected[u]) replaced += change_outcome_mix(w, u);
        if (replaced) out.excluded.notes["shift: stays replaced to change the outcome rate"] += replaced;
    }
    shift_scores(w, out);
    return out;
}

}  // namespace tocsin
