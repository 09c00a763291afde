#include "models/generator.hpp"

#include <algorithm>
#include <boost/random/exponential_distribution.hpp>
#include <boost/random/gamma_distribution.hpp>
#include <boost/random/normal_distribution.hpp>
#include <boost/random/uniform_01.hpp>
#include <cmath>
#include <functional>
#include <queue>
#include <sstream>
#include <stdexcept>

#include "models/discrimination.hpp"
#include "models/random_streams.hpp"

namespace tocsin {

namespace {

const char* const reason_after_outcome = "available at or after the outcome (time zero)";
const char* const reason_after_discharge = "available at or after discharge";

void require(bool ok, const std::string& field, const std::string& what) {
    if (!ok) throw std::invalid_argument("generator: " + field + ": " + what);
}

bool finite_nonnegative(double x) { return std::isfinite(x) && x >= 0.0; }

double uniform01(RandomEngine& engine) { return boost::random::uniform_01<double>()(engine); }

// Standard normal; callers scale it, so the number of engine calls never
// depends on a knob value (common random numbers).
double standard_normal(RandomEngine& engine) { return boost::random::normal_distribution<double>(0.0, 1.0)(engine); }

double stay_hours(const StayConfig& stay, RandomEngine& engine) {
    if (stay.distribution == StayDistribution::lognormal)
        return stay.median_hours * std::exp(stay.log_sd * standard_normal(engine));
    const double shape = (stay.mean_hours / stay.sd_hours) * (stay.mean_hours / stay.sd_hours);
    const double scale = stay.sd_hours * stay.sd_hours / stay.mean_hours;
    return boost::random::gamma_distribution<double>(shape, scale)(engine);
}

double score_value(ScoreScale scale, double latent) {
    if (scale == ScoreScale::points) return std::clamp(latent, 0.0, 100.0);
    return 1.0 / (1.0 + std::exp(-latent));
}

// Draws the encounter's value of each group column; returns the sum of those
// values' score shifts.
double assign_groups(const std::vector<GeneratedGroup>& groups, std::uint64_t entity, std::uint64_t seed,
                     std::uint64_t replication, Encounter& e) {
    double shift = 0.0;
    e.groups.clear();
    for (const GeneratedGroup& g : groups) {
        RandomEngine engine =
            make_stream(seed, replication, StreamPurpose::patient_group, entity_key({entity, text_entity(g.column.name)}));
        const double u = uniform01(engine);
        std::uint16_t level = g.column.not_recorded_level();
        double below = 0.0;
        for (std::size_t v = 0; v < g.shares.size(); ++v) {
            below += g.shares[v];
            if (u < below) {
                level = static_cast<std::uint16_t>(v);
                break;
            }
        }
        e.groups.push_back(level);
        if (level < g.score_shift.size()) shift += g.score_shift[level];
    }
    return shift;
}

// A further score's latent level along one stay (see GeneratedOtherScore).
struct OtherTrajectory {
    const GeneratedOtherScore* score;
    RandomEngine engine;
    double offset = 0.0, rise = 0.0, noise = 0.0;
};

std::vector<OtherTrajectory> start_other_scores(const GeneratorConfig& config, std::uint64_t entity,
                                                std::uint64_t seed, std::uint64_t replication, double z_first) {
    std::vector<OtherTrajectory> others;
    for (const GeneratedOtherScore& o : config.other_scores) {
        OtherTrajectory t{&o, make_stream(seed, replication, StreamPurpose::other_score,
                                          entity_key({entity, text_entity(o.name)}))};
        const double z_own = standard_normal(t.engine);
        const double z_rise = standard_normal(t.engine);  // drawn for every stay, so the count never varies
        const double rho = o.correlation;
        t.offset = o.level.between_patient_sd * (rho * z_first + std::sqrt(1.0 - rho * rho) * z_own);
        t.rise = o.level.drift_size + o.level.drift_size_sd * z_rise;
        others.push_back(std::move(t));
    }
    return others;
}

// Rule order (available_at, then scored_at, then schedule order) for every
// score at once: they share their instants, so one permutation serves all.
void sort_in_rule_order(std::vector<std::vector<Score>>& out) {
    auto before = [](const Score& a, const Score& b) {
        return a.available_at != b.available_at ? a.available_at < b.available_at : a.scored_at < b.scored_at;
    };
    if (std::is_sorted(out[0].begin(), out[0].end(), before)) return;
    std::vector<std::size_t> order(out[0].size());
    for (std::size_t i = 0; i < order.size(); ++i) order[i] = i;
    std::stable_sort(order.begin(), order.end(),
                     [&](std::size_t a, std::size_t b) { return before(out[0][a], out[0][b]); });
    for (std::vector<Score>& values : out) {
        std::vector<Score> sorted;
        sorted.reserve(values.size());
        for (std::size_t i : order) sorted.push_back(values[i]);
        values = std::move(sorted);
    }
}

// One encounter's usable scores into out[0] (the first score) and, when
// out.size() > 1, out[k] (other score k); counts what it drops.
void generate_scores(const GeneratorConfig& config, const Encounter& encounter, std::uint64_t entity,
                     std::uint64_t seed, std::uint64_t replication, double group_shift,
                     std::vector<std::vector<Score>>& out, GenerationSummary& summary) {
    for (std::vector<Score>& values : out) values.clear();
    const ScoreConfig& sc = config.scores;
    RandomEngine engine = make_stream(seed, replication, StreamPurpose::trajectory, entity);
    const double z_patient = standard_normal(engine);
    const double patient_offset = sc.between_patient_sd * z_patient;
    const double onset_hours =
        sc.drift_onset_min_hours + (sc.drift_onset_max_hours - sc.drift_onset_min_hours) * uniform01(engine);
    const double first_phase = uniform01(engine);
    std::vector<OtherTrajectory> others;
    if (out.size() > 1) others = start_other_scores(config, entity, seed, replication, z_patient);

    const Instant usable_until = Population::usable_until(encounter);
    const bool is_case = encounter.outcome_at.has_value();
    double rise = sc.drift_size;
    if (is_case && sc.drift_size_sd > 0.0) {
        RandomEngine own = make_stream(seed, replication, StreamPurpose::rise_size, entity);
        rise += sc.drift_size_sd * standard_normal(own);
    }
    const double time_zero = is_case ? static_cast<double>(*encounter.outcome_at) : 0.0;
    const double onset_seconds = std::max(onset_hours * 3600.0, 1.0);
    const double cadence_seconds = sc.cadence_minutes * 60.0;
    const double jitter_seconds = sc.jitter_minutes * 60.0;
    const double latency_mu = sc.latency_median_minutes > 0.0 ? std::log(sc.latency_median_minutes * 60.0) : 0.0;

    std::int64_t missing = 0, after_outcome = 0, after_discharge = 0;
    double t = static_cast<double>(encounter.admitted) + first_phase * cadence_seconds;
    double noise = 0.0, previous_t = t;  // the noise carries over on the schedule, missing scores included
    while (t < static_cast<double>(usable_until)) {
        const double u_jitter = uniform01(engine);
        const double u_missing = uniform01(engine);
        const double z_noise = standard_normal(engine);
        const double z_latency = standard_normal(engine);
        const Instant scored_at = static_cast<Instant>(t);
        const double gap_hours = (t - previous_t) / 3600.0;
        // 0^gap = 0: with no carry-over the noise is z_noise itself, bit for bit.
        const double carried = t > previous_t ? std::pow(sc.noise_carryover, gap_hours) : 0.0;
        noise = carried * noise + std::sqrt(1.0 - carried * carried) * z_noise;
        for (OtherTrajectory& o : others) {  // on every scheduled row too, missing or not
            const double kept = t > previous_t ? std::pow(o.score->level.noise_carryover, gap_hours) : 0.0;
            o.noise = kept * o.noise + std::sqrt(1.0 - kept * kept) * standard_normal(o.engine);
        }
        previous_t = t;
        const double progress = is_case ? std::clamp((t - (time_zero - onset_seconds)) / onset_seconds, 0.0, 1.0) : 0.0;
        if (u_missing < sc.missing_probability) {
            ++missing;
        } else {
            const double latent =
                sc.baseline + patient_offset + sc.within_patient_sd * noise + group_shift + rise * progress;
            const Seconds latency = sc.latency_median_minutes > 0.0
                                        ? static_cast<Seconds>(std::exp(latency_mu + sc.latency_log_sd * z_latency))
                                        : 0;
            const Instant available_at = scored_at + latency;
            if (available_at < usable_until) {
                out[0].push_back({available_at, scored_at, score_value(sc.scale, latent)});
                for (std::size_t k = 0; k < others.size(); ++k) {
                    const OtherTrajectory& o = others[k];
                    const ScoreConfig& level = o.score->level;
                    const double own = level.baseline + o.offset + level.within_patient_sd * o.noise + o.rise * progress;
                    out[k + 1].push_back({available_at, scored_at, score_value(level.scale, own)});
                }
            } else if (is_case && usable_until == *encounter.outcome_at) {
                ++after_outcome;
            } else {
                ++after_discharge;
            }
        }
        t += cadence_seconds + (2.0 * u_jitter - 1.0) * jitter_seconds;
    }
    sort_in_rule_order(out);
    if (missing) summary.excluded.notes["scheduled score missing (generator)"] += missing;
    if (after_outcome) summary.excluded.scores_by_reason[reason_after_outcome] += after_outcome;
    if (after_discharge) summary.excluded.scores_by_reason[reason_after_discharge] += after_discharge;
}

}  // namespace

void validate(const GeneratorConfig& c) {
    require(!c.units.empty(), "units", "at least one unit is needed");
    for (std::size_t u = 0; u < c.units.size(); ++u) {
        const UnitConfig& unit = c.units[u];
        const std::string where = "units[" + std::to_string(u) + "]";
        require(!unit.name.empty(), where + ".name", "must not be empty");
        require(unit.beds > 0, where + ".beds", "must be at least 1, got " + std::to_string(unit.beds));
        for (int h = 0; h < hours_per_week; ++h)
            require(finite_nonnegative(unit.arrivals_per_hour[static_cast<std::size_t>(h)]),
                    where + ".arrivals_per_hour[" + std::to_string(h) + "]", "must be a finite rate >= 0");
    }
    require(c.period_end > c.period_start, "end", "must be after start");
    require(finite_nonnegative(c.warmup_days), "warmup_days", "must be >= 0");
    if (c.stay.distribution == StayDistribution::lognormal) {
        require(c.stay.median_hours > 0 && std::isfinite(c.stay.median_hours), "stay.median_hours", "must be > 0");
        require(finite_nonnegative(c.stay.log_sd), "stay.log_sd", "must be >= 0");
    } else {
        require(c.stay.mean_hours > 0 && std::isfinite(c.stay.mean_hours), "stay.mean_hours", "must be > 0");
        require(c.stay.sd_hours > 0 && std::isfinite(c.stay.sd_hours), "stay.sd_hours", "must be > 0");
    }
    const OutcomeConfig& o = c.outcome;
    require(o.probability >= 0 && o.probability <= 1, "outcome.probability", "must be in [0, 1]");
    require(o.earliest_fraction >= 0 && o.earliest_fraction <= o.latest_fraction && o.latest_fraction <= 1,
            "outcome.earliest_fraction/latest_fraction", "need 0 <= earliest <= latest <= 1");
    const ScoreConfig& s = c.scores;
    require(s.cadence_minutes >= 1 && std::isfinite(s.cadence_minutes), "scores.cadence_minutes", "must be >= 1");
    require(finite_nonnegative(s.jitter_minutes) && s.jitter_minutes < s.cadence_minutes, "scores.jitter_minutes",
            "must be >= 0 and below cadence_minutes");
    require(s.missing_probability >= 0 && s.missing_probability < 1, "scores.missing_probability",
            "must be in [0, 1)");
    require(finite_nonnegative(s.latency_median_minutes), "scores.latency_median_minutes", "must be >= 0");
    require(finite_nonnegative(s.latency_log_sd), "scores.latency_log_sd", "must be >= 0");
    require(std::isfinite(s.baseline), "scores.baseline", "must be finite");
    require(finite_nonnegative(s.between_patient_sd), "scores.between_patient_sd", "must be >= 0");
    require(finite_nonnegative(s.within_patient_sd), "scores.within_patient_sd", "must be >= 0");
    require(s.noise_carryover >= 0 && s.noise_carryover < 1, "scores.noise_carryover", "must be in [0, 1)");
    require(std::isfinite(s.drift_size), "scores.drift_size", "must be finite");
    require(finite_nonnegative(s.drift_size_sd), "scores.drift_size_sd", "must be >= 0");
    require(s.drift_onset_min_hours >= 0 && s.drift_onset_min_hours <= s.drift_onset_max_hours &&
                std::isfinite(s.drift_onset_max_hours),
            "scores.drift_onset_min_hours/max_hours", "need 0 <= min <= max");
    for (const GeneratedOtherScore& o : c.other_scores) {
        const std::string field = "other_scores." + o.name;
        require(!o.name.empty() && o.name != c.score_name, field + ".name", "needs a name of its own");
        require(o.correlation >= 0 && o.correlation <= 1, field + ".correlation", "must be in [0, 1]");
        require(std::isfinite(o.level.baseline), field + ".baseline", "must be finite");
        require(finite_nonnegative(o.level.between_patient_sd), field + ".between_patient_sd", "must be >= 0");
        require(finite_nonnegative(o.level.within_patient_sd), field + ".within_patient_sd", "must be >= 0");
        require(o.level.noise_carryover >= 0 && o.level.noise_carryover < 1, field + ".noise_carryover",
                "must be in [0, 1)");
        require(std::isfinite(o.level.drift_size), field + ".drift_size", "must be finite");
        require(finite_nonnegative(o.level.drift_size_sd), field + ".drift_size_sd", "must be >= 0");
    }
    for (const GeneratedGroup& g : c.groups) {
        const std::string field = "groups." + g.column.name;
        require(g.shares.size() == g.column.values.size(), field + ".shares", "needs one share per value");
        double total = 0.0;
        for (double share : g.shares) {
            require(share >= 0 && share <= 1, field + ".shares", "each must be in [0, 1]");
            total += share;
        }
        require(total <= 1 + 1e-9, field + ".shares", "must add up to at most 1 (the rest is not recorded)");
        require(g.score_shift.empty() || g.score_shift.size() == g.column.levels(), field + ".score_shift",
                "needs one shift per value and one for not recorded");
        for (double shift : g.score_shift) require(std::isfinite(shift), field + ".score_shift", "must be finite");
    }
}

int hour_of_week(Instant at, const TimeZone& zone) {
    const Instant local = zone.to_local_seconds(at);
    const std::int64_t day = local >= 0 ? local / 86400 : -((-local + 86399) / 86400);
    const std::int64_t second_of_day = local - day * 86400;
    return weekday_from_days(day) * 24 + static_cast<int>(second_of_day / 3600);
}

GenerationSummary generate_streaming(const GeneratorConfig& config, std::uint64_t seed, std::uint64_t replication,
                                     const EncounterSink& sink) {
    GeneratorConfig first_only = config;
    first_only.other_scores.clear();  // the first score's draws do not depend on the others
    return generate_streaming(first_only, seed, replication,
                              [&](const Encounter& e, std::span<const std::vector<Score>> all) { sink(e, all[0]); });
}

GenerationSummary generate_streaming(const GeneratorConfig& config, std::uint64_t seed, std::uint64_t replication,
                                     const EncounterScoresSink& sink) {
    validate(config);
    GenerationSummary summary;
    std::vector<std::vector<Score>> scores(1 + config.other_scores.size());
    const double arrivals_from =
        static_cast<double>(config.period_start) - config.warmup_days * 86400.0;
    for (std::uint32_t u = 0; u < config.units.size(); ++u) {
        const UnitConfig& unit = config.units[u];
        summary.units.push_back(unit.name);
        const double peak_per_hour = *std::max_element(unit.arrivals_per_hour.begin(), unit.arrivals_per_hour.end());
        if (peak_per_hour <= 0.0) continue;

        // Non-homogeneous Poisson arrivals by thinning (Lewis & Shedler 1979):
        // candidates at the peak rate, each kept with probability rate(t) / peak.
        RandomEngine arrivals = make_stream(seed, replication, StreamPurpose::arrivals, u);
        boost::random::exponential_distribution<double> gap_hours(peak_per_hour);
        std::priority_queue<Instant, std::vector<Instant>, std::greater<>> occupied_until;
        std::int64_t turned_away = 0;
        std::uint64_t arrival_index = 0;
        double t = arrivals_from;
        for (;;) {
            t += gap_hours(arrivals) * 3600.0;
            const double u_keep = uniform01(arrivals);
            if (t >= static_cast<double>(config.period_end)) break;
            const Instant at = static_cast<Instant>(std::floor(t));
            const double rate = unit.arrivals_per_hour[static_cast<std::size_t>(hour_of_week(at, config.zone))];
            if (u_keep * peak_per_hour >= rate) continue;
            const std::uint64_t entity = encounter_entity(u, arrival_index++);

            while (!occupied_until.empty() && occupied_until.top() <= at) occupied_until.pop();
            if (static_cast<int>(occupied_until.size()) >= unit.beds) {
                if (at >= config.period_start) ++turned_away;
                continue;
            }
            // Outcome draws come before the stay, whose gamma sampler may use a
            // varying number of engine calls.
            RandomEngine stay = make_stream(seed, replication, StreamPurpose::stay, entity);
            const double u_outcome = uniform01(stay);
            const double u_timing = uniform01(stay);
            const double hours = stay_hours(config.stay, stay);
            Encounter e;
            e.id = unit.name + "-" + std::to_string(arrival_index - 1);
            e.unit = u;
            e.admitted = at;
            e.discharged = at + std::max<Seconds>(60, static_cast<Seconds>(std::llround(hours * 3600.0)));
            if (u_outcome < config.outcome.probability) {
                const OutcomeConfig& o = config.outcome;
                const double fraction = o.earliest_fraction + (o.latest_fraction - o.earliest_fraction) * u_timing;
                const Instant zero = at + static_cast<Seconds>(fraction * static_cast<double>(e.discharged - at));
                e.outcome_at = zero;
                if (o.ends_stay) e.discharged = std::max(zero, at + 1);
            }
            occupied_until.push(e.discharged);
            if (e.discharged <= config.period_start) continue;  // warm-up stay over before the period

            const double group_shift = assign_groups(config.groups, entity, seed, replication, e);
            generate_scores(config, e, entity, seed, replication, group_shift, scores, summary);
            ++summary.encounters;
            summary.scores += static_cast<std::int64_t>(scores[0].size());
            sink(e, std::span<const std::vector<Score>>(scores));
        }
        if (turned_away) summary.excluded.encounters_by_reason["arrival turned away, unit full: " + unit.name] +=
            turned_away;
    }
    return summary;
}

Population generate_population(const GeneratorConfig& config, std::uint64_t seed, std::uint64_t replication) {
    Population pop;
    pop.score_start.push_back(0);
    for (const GeneratedOtherScore& o : config.other_scores)
        pop.other_scores.push_back({.name = o.name, .score_start = {0}});
    GenerationSummary summary = generate_streaming(
        config, seed, replication, [&](const Encounter& e, std::span<const std::vector<Score>> scores) {
            pop.encounters.push_back(e);
            pop.scores.insert(pop.scores.end(), scores[0].begin(), scores[0].end());
            pop.score_start.push_back(pop.scores.size());
            for (std::size_t k = 1; k < scores.size(); ++k) {
                OtherScore& o = pop.other_scores[k - 1];
                o.scores.insert(o.scores.end(), scores[k].begin(), scores[k].end());
                o.score_start.push_back(o.scores.size());
            }
        });
    // The other scores share the first score's rows, so the same rows were dropped.
    for (OtherScore& o : pop.other_scores) o.excluded_by_reason = summary.excluded.scores_by_reason;
    if (!config.other_scores.empty()) pop.score_name = config.score_name;
    pop.units = std::move(summary.units);
    for (const GeneratedGroup& g : config.groups) pop.groups.push_back(g.column);
    pop.excluded = std::move(summary.excluded);
    pop.period_start = config.period_start;
    pop.period_end = config.period_end;
    return pop;
}

namespace {

struct AucPoint {
    double auc = 0.0;
    std::int64_t cases = 0, controls = 0;
};

// The drift of score `score` (0 the first, k other_scores[k - 1]).
double& drift_of(GeneratorConfig& config, std::size_t score) {
    return score == 0 ? config.scores.drift_size : config.other_scores[score - 1].level.drift_size;
}

ScoreScale scale_of(const GeneratorConfig& config, std::size_t score) {
    return score == 0 ? config.scores.scale : config.other_scores[score - 1].level.scale;
}

double highest(std::span<const Score> scores) {
    double top = scores.front().value;
    for (const Score& s : scores) top = std::max(top, s.value);
    return top;
}

AucPoint auc_with_drift(GeneratorConfig config, std::size_t score, double drift_size, std::uint64_t seed) {
    drift_of(config, score) = drift_size;
    EncounterMaxima maxima;
    generate_streaming(config, seed, 0, [&](const Encounter& e, std::span<const std::vector<Score>> all) {
        if (all[score].empty()) return;
        (e.outcome_at ? maxima.cases : maxima.controls).push_back(highest(all[score]));
    });
    return {mann_whitney_auc(maxima.cases, maxima.controls), static_cast<std::int64_t>(maxima.cases.size()),
            static_cast<std::int64_t>(maxima.controls.size())};
}

std::string fixed(double x, int decimals) {
    std::ostringstream out;
    out.setf(std::ios::fixed);
    out.precision(decimals);
    out << x;
    return out.str();
}

// The calibration population's end: long enough for about `calibration_cases`
// expected cases, at least 28 days, at most 3 years (see calibrate_to_auc).
Instant calibration_end(const GeneratorConfig& config, double calibration_cases) {
    // Expected cases per hour from the declared rates (an over-estimate when
    // units are often full, which only lengthens the calibration period).
    double admissions_per_hour = 0.0;
    for (const UnitConfig& u : config.units)
        for (double r : u.arrivals_per_hour) admissions_per_hour += r / hours_per_week;
    const double hours_needed =
        calibration_cases / std::max(admissions_per_hour * config.outcome.probability, 1e-9);
    const double calibration_hours = std::clamp(hours_needed, 28.0 * 24.0, 3.0 * 365.0 * 24.0);
    return config.period_start + static_cast<Seconds>(calibration_hours * 3600.0);
}

struct DriftFound {
    AucPoint point;
    double drift_size = 0.0;
    int populations_generated = 0;
};

// Bisection on score `score`'s drift over the calibration population
// `calibration` (see calibrate_to_auc); `what` names the score in errors.
DriftFound find_drift(const GeneratorConfig& calibration, std::size_t score, double target_auc, std::uint64_t seed,
                      double auc_tolerance, const std::string& what) {
    // The widest rise that still means something on the scale: the whole points
    // range, or 20 logit units (a probability from 0.5 to 1 - 2e-9).
    const double widest = scale_of(calibration, score) == ScoreScale::points ? 100.0 : 20.0;
    AucPoint low = auc_with_drift(calibration, score, 0.0, seed);
    AucPoint high = auc_with_drift(calibration, score, widest, seed);
    DriftFound found;
    found.populations_generated = 2;
    if (low.cases == 0 || low.controls == 0)
        throw std::invalid_argument("calibrate_to_auc: the calibration population has " + std::to_string(low.cases) +
                                    " cases and " + std::to_string(low.controls) +
                                    " controls with scores; lengthen the period or add units");
    const std::string reachable = "reachable AUCs" + what + " with these settings run from " + fixed(low.auc, 3) +
                                  " (no rise before time zero) to " + fixed(high.auc, 3) + " (drift_size " +
                                  fixed(widest, 0) + ")";
    if (target_auc < low.auc - auc_tolerance)
        throw std::invalid_argument("calibrate_to_auc: target AUC " + fixed(target_auc, 3) +
                                    " is below what the generator reaches without any rise: " + reachable +
                                    ". Scores that fall before time zero are not modelled.");
    if (target_auc > high.auc + auc_tolerance)
        throw std::invalid_argument("calibrate_to_auc: target AUC " + fixed(target_auc, 3) + " cannot be reached: " +
                                    reachable +
                                    ". Lower " + std::string(score == 0 ? "scores." : "") +
                                    "within_patient_sd or between_patient_sd, or shorten the stays.");
    double lo = 0.0, hi = widest;
    const bool low_closer = std::abs(low.auc - target_auc) <= std::abs(high.auc - target_auc);
    found.point = low_closer ? low : high;
    found.drift_size = low_closer ? 0.0 : widest;
    for (int step = 0; step < 60 && std::abs(found.point.auc - target_auc) > auc_tolerance; ++step) {
        const double mid = 0.5 * (lo + hi);
        AucPoint p = auc_with_drift(calibration, score, mid, seed);
        ++found.populations_generated;
        if (std::abs(p.auc - target_auc) < std::abs(found.point.auc - target_auc)) {
            found.point = p;
            found.drift_size = mid;
        }
        (p.auc < target_auc ? lo : hi) = mid;
        if (hi - lo < 1e-9 * widest) break;
    }
    return found;
}

}  // namespace

AucCalibration calibrate_to_auc(const GeneratorConfig& input, double target_auc, double target_outcome_rate,
                                std::uint64_t seed, double auc_tolerance, double calibration_cases) {
    if (!(target_auc > 0.0 && target_auc < 1.0))
        throw std::invalid_argument("calibrate_to_auc: target AUC must lie strictly between 0 and 1, got " +
                                    fixed(target_auc, 4));
    if (!(target_outcome_rate > 0.0 && target_outcome_rate < 1.0))
        throw std::invalid_argument("calibrate_to_auc: target outcome rate must lie strictly between 0 and 1, got " +
                                    fixed(target_outcome_rate, 4));
    GeneratorConfig config = input;
    config.outcome.probability = target_outcome_rate;
    validate(config);
    GeneratorConfig calibration = config;
    calibration.other_scores.clear();  // the first score's draws do not depend on the others
    calibration.period_end = calibration_end(config, calibration_cases);
    const DriftFound found = find_drift(calibration, 0, target_auc, seed, auc_tolerance, "");
    config.scores.drift_size = found.drift_size;
    AucCalibration result;
    result.config = config;
    result.achieved_auc = found.point.auc;
    result.drift_size = found.drift_size;
    result.populations_generated = found.populations_generated;
    result.cases = found.point.cases;
    result.controls = found.point.controls;
    result.calibration_period_end = calibration.period_end;
    return result;
}

OtherScoresCalibration calibrate_other_scores(const GeneratorConfig& config, std::uint64_t seed,
                                              double auc_tolerance, double calibration_cases) {
    validate(config);
    OtherScoresCalibration result;
    result.config = config;
    result.calibration_period_end = calibration_end(config, calibration_cases);
    for (std::size_t k = 1; k <= config.other_scores.size(); ++k) {
        const GeneratedOtherScore& o = config.other_scores[k - 1];
        if (!o.target_auc) continue;
        GeneratorConfig calibration = result.config;
        calibration.period_end = result.calibration_period_end;
        const std::string what = " for other score '" + o.name + "'";
        result.config.other_scores[k - 1].level.drift_size =
            find_drift(calibration, k, *o.target_auc, seed, auc_tolerance, what).drift_size;
    }
    // What was reached, on one generation of the calibration population.
    GeneratorConfig calibration = result.config;
    calibration.period_end = result.calibration_period_end;
    const std::size_t n = config.other_scores.size();
    std::vector<EncounterMaxima> maxima(n + 1);
    std::vector<std::vector<double>> first_of_pair(n), other_of_pair(n);
    generate_streaming(calibration, seed, 0, [&](const Encounter& e, std::span<const std::vector<Score>> all) {
        for (std::size_t k = 0; k <= n; ++k)
            if (!all[k].empty()) (e.outcome_at ? maxima[k].cases : maxima[k].controls).push_back(highest(all[k]));
        for (std::size_t k = 1; k <= n; ++k) {
            if (all[0].empty() || all[k].empty()) continue;
            first_of_pair[k - 1].push_back(highest(all[0]));
            other_of_pair[k - 1].push_back(highest(all[k]));
        }
    });
    result.cases = static_cast<std::int64_t>(maxima[0].cases.size());
    result.controls = static_cast<std::int64_t>(maxima[0].controls.size());
    for (std::size_t k = 1; k <= n; ++k) {
        const GeneratedOtherScore& o = result.config.other_scores[k - 1];
        result.reached.push_back({.name = o.name,
                                  .target_auc = o.target_auc,
                                  .drift_size = o.level.drift_size,
                                  .achieved_auc = mann_whitney_auc(maxima[k].cases, maxima[k].controls),
                                  .maxima_rank_correlation =
                                      spearman_rank_correlation(first_of_pair[k - 1], other_of_pair[k - 1]),
                                  .stays = static_cast<std::int64_t>(first_of_pair[k - 1].size())});
    }
    return result;
}

}  // namespace tocsin
