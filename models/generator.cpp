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

// One encounter's usable scores into `out` (cleared first); counts what it drops.
void generate_scores(const GeneratorConfig& config, const Encounter& encounter, std::uint64_t entity,
                     std::uint64_t seed, std::uint64_t replication, double group_shift, std::vector<Score>& out,
                     GenerationSummary& summary) {
    out.clear();
    const ScoreConfig& sc = config.scores;
    RandomEngine engine = make_stream(seed, replication, StreamPurpose::trajectory, entity);
    const double patient_offset = sc.between_patient_sd * standard_normal(engine);
    const double onset_hours =
        sc.drift_onset_min_hours + (sc.drift_onset_max_hours - sc.drift_onset_min_hours) * uniform01(engine);
    const double first_phase = uniform01(engine);

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
        // 0^gap = 0: with no carry-over the noise is z_noise itself, bit for bit.
        const double carried = t > previous_t ? std::pow(sc.noise_carryover, (t - previous_t) / 3600.0) : 0.0;
        noise = carried * noise + std::sqrt(1.0 - carried * carried) * z_noise;
        previous_t = t;
        if (u_missing < sc.missing_probability) {
            ++missing;
        } else {
            double latent = sc.baseline + patient_offset + sc.within_patient_sd * noise + group_shift;
            if (is_case) {
                const double progress = (t - (time_zero - onset_seconds)) / onset_seconds;
                latent += rise * std::clamp(progress, 0.0, 1.0);
            }
            const Seconds latency = sc.latency_median_minutes > 0.0
                                        ? static_cast<Seconds>(std::exp(latency_mu + sc.latency_log_sd * z_latency))
                                        : 0;
            const Instant available_at = scored_at + latency;
            if (available_at < usable_until) {
                out.push_back({available_at, scored_at, score_value(sc.scale, latent)});
            } else if (is_case && usable_until == *encounter.outcome_at) {
                ++after_outcome;
            } else {
                ++after_discharge;
            }
        }
        t += cadence_seconds + (2.0 * u_jitter - 1.0) * jitter_seconds;
    }
    auto before = [](const Score& a, const Score& b) {
        return a.available_at != b.available_at ? a.available_at < b.available_at : a.scored_at < b.scored_at;
    };
    if (!std::is_sorted(out.begin(), out.end(), before)) std::stable_sort(out.begin(), out.end(), before);
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
    validate(config);
    GenerationSummary summary;
    std::vector<Score> scores;
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
            summary.scores += static_cast<std::int64_t>(scores.size());
            sink(e, std::span<const Score>(scores));
        }
        if (turned_away) summary.excluded.encounters_by_reason["arrival turned away, unit full: " + unit.name] +=
            turned_away;
    }
    return summary;
}

Population generate_population(const GeneratorConfig& config, std::uint64_t seed, std::uint64_t replication) {
    Population pop;
    pop.score_start.push_back(0);
    GenerationSummary summary =
        generate_streaming(config, seed, replication, [&](const Encounter& e, std::span<const Score> scores) {
            pop.encounters.push_back(e);
            pop.scores.insert(pop.scores.end(), scores.begin(), scores.end());
            pop.score_start.push_back(pop.scores.size());
        });
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

AucPoint auc_with_drift(GeneratorConfig config, double drift_size, std::uint64_t seed) {
    config.scores.drift_size = drift_size;
    EncounterMaxima maxima;
    generate_streaming(config, seed, 0, [&](const Encounter& e, std::span<const Score> scores) {
        if (scores.empty()) return;
        double highest = scores.front().value;
        for (const Score& s : scores) highest = std::max(highest, s.value);
        (e.outcome_at ? maxima.cases : maxima.controls).push_back(highest);
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
    // Expected cases per hour from the declared rates (an over-estimate when
    // units are often full, which only lengthens the calibration period).
    double admissions_per_hour = 0.0;
    for (const UnitConfig& u : config.units)
        for (double r : u.arrivals_per_hour) admissions_per_hour += r / hours_per_week;
    const double hours_needed = calibration_cases / std::max(admissions_per_hour * target_outcome_rate, 1e-9);
    const double calibration_hours = std::clamp(hours_needed, 28.0 * 24.0, 3.0 * 365.0 * 24.0);
    GeneratorConfig calibration = config;
    calibration.period_end = config.period_start + static_cast<Seconds>(calibration_hours * 3600.0);
    // The widest rise that still means something on the scale: the whole points
    // range, or 20 logit units (a probability from 0.5 to 1 - 2e-9).
    const double widest = config.scores.scale == ScoreScale::points ? 100.0 : 20.0;
    AucCalibration result;
    AucPoint low = auc_with_drift(calibration, 0.0, seed);
    AucPoint high = auc_with_drift(calibration, widest, seed);
    result.populations_generated = 2;
    if (low.cases == 0 || low.controls == 0)
        throw std::invalid_argument("calibrate_to_auc: the calibration population has " + std::to_string(low.cases) +
                                    " cases and " + std::to_string(low.controls) +
                                    " controls with scores; lengthen the period or add units");
    const std::string reachable = "reachable AUCs with these settings run from " + fixed(low.auc, 3) +
                                  " (no rise before time zero) to " + fixed(high.auc, 3) + " (drift_size " +
                                  fixed(widest, 0) + ")";
    if (target_auc < low.auc - auc_tolerance)
        throw std::invalid_argument("calibrate_to_auc: target AUC " + fixed(target_auc, 3) +
                                    " is below what the generator reaches without any rise: " + reachable +
                                    ". Scores that fall before time zero are not modelled.");
    if (target_auc > high.auc + auc_tolerance)
        throw std::invalid_argument("calibrate_to_auc: target AUC " + fixed(target_auc, 3) + " cannot be reached: " +
                                    reachable +
                                    ". Lower scores.within_patient_sd or between_patient_sd, or shorten the stays.");
    double lo = 0.0, hi = widest;
    const bool low_closer = std::abs(low.auc - target_auc) <= std::abs(high.auc - target_auc);
    AucPoint best = low_closer ? low : high;
    double best_drift = low_closer ? 0.0 : widest;
    for (int step = 0; step < 60 && std::abs(best.auc - target_auc) > auc_tolerance; ++step) {
        const double mid = 0.5 * (lo + hi);
        AucPoint p = auc_with_drift(calibration, mid, seed);
        ++result.populations_generated;
        if (std::abs(p.auc - target_auc) < std::abs(best.auc - target_auc)) {
            best = p;
            best_drift = mid;
        }
        (p.auc < target_auc ? lo : hi) = mid;
        if (hi - lo < 1e-9 * widest) break;
    }
    config.scores.drift_size = best_drift;
    result.config = config;
    result.achieved_auc = best.auc;
    result.drift_size = best_drift;
    result.cases = best.cases;
    result.controls = best.controls;
    result.calibration_period_end = calibration.period_end;
    return result;
}

}  // namespace tocsin
