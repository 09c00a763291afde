#include "models/fit.hpp"

#include "models/discrimination.hpp"

#include <algorithm>
#include <cmath>
#include <numeric>
#include <span>
#include <sstream>
#include <stdexcept>

namespace tocsin {

namespace {

double mean_of(const std::vector<double>& x) {
    return x.empty() ? 0.0 : std::accumulate(x.begin(), x.end(), 0.0) / static_cast<double>(x.size());
}

double variance_of(const std::vector<double>& x) {  // sample variance (n - 1)
    if (x.size() < 2) return 0.0;
    const double m = mean_of(x);
    double ss = 0.0;
    for (double v : x) ss += (v - m) * (v - m);
    return ss / static_cast<double>(x.size() - 1);
}

double median_of(std::vector<double> x) {
    if (x.empty()) return 0.0;
    const std::size_t mid = x.size() / 2;
    std::nth_element(x.begin(), x.begin() + static_cast<std::ptrdiff_t>(mid), x.end());
    const double upper = x[mid];
    if (x.size() % 2 == 1) return upper;
    return 0.5 * (upper + *std::max_element(x.begin(), x.begin() + static_cast<std::ptrdiff_t>(mid)));
}

double latent_of(double value, ScoreScale scale) {
    if (scale == ScoreScale::points) return value;
    const double p = std::clamp(value, 1e-6, 1.0 - 1e-6);
    return std::log(p / (1.0 - p));
}

// Expected share of the full rise still missing h hours before time zero, for
// an onset uniform on [a, b]: E[max(0, 1 - h / O)].
double rise_share(double h, double a, double b) {
    if (h >= b) return 0.0;
    if (b - a < 1e-9) return 1.0 - h / b;
    const double m = std::max(a, h);
    return ((b - m) - h * std::log(b / m)) / (b - a);
}

std::string number(double x) {
    std::ostringstream out;
    out.precision(6);
    out << x;
    return out.str();
}

int highest_census(const Population& pop, std::uint32_t unit) {
    std::vector<std::pair<Instant, int>> changes;
    for (const Encounter& e : pop.encounters) {
        if (e.unit != unit) continue;
        changes.push_back({e.admitted, +1});
        changes.push_back({e.discharged, -1});
    }
    std::sort(changes.begin(), changes.end());  // at equal instants a discharge (-1) frees the bed first
    int census = 0, highest = 0;
    for (const auto& [at, step] : changes) highest = std::max(highest, census += step);
    return highest;
}

// The population's period, or the default period of its encounters.
void fit_period(const Population& pop, GeneratorConfig& c) {
    c.period_start = pop.period_start;
    c.period_end = pop.period_end;
    if (c.period_start == 0 && c.period_end == 0) {
        Population copy_period;  // default_period reads encounters only
        copy_period.encounters = pop.encounters;
        default_period(copy_period);
        c.period_start = copy_period.period_start;
        c.period_end = copy_period.period_end;
    }
    if (c.period_end <= c.period_start) throw std::invalid_argument("fit_generator: the population covers no period");
}

// Arrivals: admissions per local hour of week / hours of that kind in the period.
void fit_arrivals(const Population& pop, const FitOptions& options, GeneratorFit& fit) {
    GeneratorConfig& c = fit.config;
    fit.admissions_from = std::max(c.period_start, options.complete_from.value_or(c.period_start));
    fit.admissions_until = std::min(c.period_end, options.complete_until.value_or(c.period_end));
    if (fit.admissions_until <= fit.admissions_from)
        throw std::invalid_argument("fit_generator: the period whose admissions are counted is empty");
    std::vector<std::array<double, hours_per_week>> admissions(pop.units.size());
    for (const Encounter& e : pop.encounters) {
        if (e.admitted < fit.admissions_from || e.admitted >= fit.admissions_until) continue;
        admissions[e.unit][static_cast<std::size_t>(hour_of_week(e.admitted, c.zone))] += 1.0;
        ++fit.encounters_admitted;
        if (e.outcome_at) ++fit.cases;
    }
    if (fit.encounters_admitted == 0)
        throw std::invalid_argument("fit_generator: no encounter is admitted inside the population's period");
    std::array<double, hours_per_week> exposure{};
    for (Instant t = fit.admissions_from; t < fit.admissions_until; t += 3600)
        exposure[static_cast<std::size_t>(hour_of_week(t, c.zone))] += 1.0;
    for (std::uint32_t u = 0; u < pop.units.size(); ++u) {
        UnitConfig unit;
        unit.name = pop.units[u];
        unit.beds = std::max(1, highest_census(pop, u));
        if (options.arrivals_by_hour_of_day) {
            for (std::size_t hour = 0; hour < 24; ++hour) {
                double count = 0, hours = 0;
                for (std::size_t d = 0; d < 7; ++d) {
                    count += admissions[u][d * 24 + hour];
                    hours += exposure[d * 24 + hour];
                }
                for (std::size_t d = 0; d < 7; ++d) unit.arrivals_per_hour[d * 24 + hour] = hours > 0 ? count / hours : 0.0;
            }
        } else {
            for (std::size_t h = 0; h < hours_per_week; ++h)
                unit.arrivals_per_hour[h] = exposure[h] > 0 ? admissions[u][h] / exposure[h] : 0.0;
        }
        c.units.push_back(unit);
    }
    fit.notes.push_back("arrival rates count admissions only; arrivals turned away when a unit was full are not in a log");
    if (fit.admissions_from != c.period_start || fit.admissions_until != c.period_end)
        fit.notes.push_back("arrival rates count admissions from " + format_utc(fit.admissions_from) + " to " +
                            format_utc(fit.admissions_until) + " only, the part of the log that records every admission");
    fit.notes.push_back("beds = highest census seen in the log (a lower bound)");
}

// Stays and outcome, on encounters admitted inside the period (those present at
// the start are a length-biased sample: longer stays are more often caught).
void fit_stay_and_outcome(const Population& pop, const FitOptions& options, GeneratorFit& fit) {
    GeneratorConfig& c = fit.config;
    std::vector<double> control_stays, case_times, case_fractions;
    for (const Encounter& e : pop.encounters) {
        if (e.admitted < c.period_start || e.admitted >= c.period_end) continue;
        const double stay_hours = static_cast<double>(e.discharged - e.admitted) / 3600.0;
        if (!e.outcome_at) {
            control_stays.push_back(stay_hours);
        } else {
            case_times.push_back(static_cast<double>(*e.outcome_at - e.admitted) / 3600.0);
            if (!options.outcome_ends_stay && stay_hours > 0) case_fractions.push_back(case_times.back() / stay_hours);
        }
    }
    if (control_stays.size() < 2) throw std::invalid_argument("fit_generator: fewer than two controls admitted in the period");
    c.stay.distribution = options.stay_distribution;
    std::vector<double> log_stays;
    for (double h : control_stays) log_stays.push_back(std::log(std::max(h, 1.0 / 60.0)));
    c.stay.median_hours = std::exp(mean_of(log_stays));
    c.stay.log_sd = std::sqrt(variance_of(log_stays));
    c.stay.mean_hours = mean_of(control_stays);
    c.stay.sd_hours = std::sqrt(variance_of(control_stays));

    c.outcome.probability = static_cast<double>(fit.cases) / static_cast<double>(fit.encounters_admitted);
    c.outcome.ends_stay = options.outcome_ends_stay;
    if (!case_times.empty()) {
        double m = 0.0, second = 0.0;  // first two moments of the fraction F
        if (options.outcome_ends_stay) {
            std::vector<double> squares_t, squares_l;
            for (double t : case_times) squares_t.push_back(t * t);
            for (double l : control_stays) squares_l.push_back(l * l);
            m = mean_of(case_times) / mean_of(control_stays);
            second = mean_of(squares_t) / mean_of(squares_l);
        } else {
            std::vector<double> squares;
            for (double f : case_fractions) squares.push_back(f * f);
            m = mean_of(case_fractions);
            second = mean_of(squares);
        }
        const double half_width = std::sqrt(3.0 * std::max(0.0, second - m * m));
        c.outcome.earliest_fraction = std::clamp(m - half_width, 0.0, 1.0);
        c.outcome.latest_fraction = std::clamp(m + half_width, c.outcome.earliest_fraction, 1.0);
    }
}

// Cadence and missing scores from the gaps between consecutive scored_at;
// charting delay from available_at - scored_at.
void fit_cadence_and_latency(const Population& pop, GeneratorFit& fit) {
    GeneratorConfig& c = fit.config;
    std::vector<double> gaps_minutes, latencies_seconds;
    std::int64_t zero_latency = 0;
    for (std::size_t e = 0; e < pop.encounters.size(); ++e) {
        std::vector<Instant> times;
        for (const Score& s : pop.scores_of(e)) {
            times.push_back(s.scored_at);
            const Seconds latency = s.available_at - s.scored_at;
            if (latency > 0) latencies_seconds.push_back(static_cast<double>(latency));
            else ++zero_latency;
            ++fit.scores;
        }
        std::sort(times.begin(), times.end());
        for (std::size_t i = 1; i < times.size(); ++i) gaps_minutes.push_back(static_cast<double>(times[i] - times[i - 1]) / 60.0);
    }
    if (!gaps_minutes.empty()) {
        const double typical = median_of(gaps_minutes);
        std::vector<double> single;
        for (double g : gaps_minutes)
            if (g > 0.5 * typical && g < 1.5 * typical) single.push_back(g);
        const double cadence = single.empty() ? typical : mean_of(single);
        c.scores.cadence_minutes = std::max(1.0, cadence);
        c.scores.jitter_minutes = std::min(std::sqrt(3.0 * variance_of(single)), 0.99 * c.scores.cadence_minutes);
        double slots = 0.0;
        for (double g : gaps_minutes) slots += std::max(1.0, std::round(g / cadence));
        c.scores.missing_probability = std::clamp((slots - static_cast<double>(gaps_minutes.size())) / slots, 0.0, 0.99);
    }
    if (latencies_seconds.size() > static_cast<std::size_t>(zero_latency)) {
        std::vector<double> logs;
        for (double l : latencies_seconds) logs.push_back(std::log(l));
        c.scores.latency_median_minutes = std::exp(mean_of(logs)) / 60.0;
        c.scores.latency_log_sd = std::sqrt(variance_of(logs));
        if (zero_latency > 0) fit.notes.push_back(std::to_string(zero_latency) + " scores had no charting delay; the latency fit uses the others");
    } else {
        c.scores.latency_median_minutes = 0.0;
        c.scores.latency_log_sd = 0.0;
    }
}

// 1 + 2 sum_{k=1}^{n-1} (1 - k/n) rho^k: how much correlated noise inflates
// the variance of a mean of n scores (n times the variance of the mean, over
// the variance of one score).
double mean_inflation(double n, double rho) {
    double sum = 1.0, power = 1.0;
    for (double k = 1; k < n && power > 1e-12; ++k) {
        power *= rho;
        sum += 2.0 * (1.0 - k / n) * power;
    }
    return sum;
}

// Score levels on controls: one-way random effects by moments, with noise
// that may carry over from score to score (AR(1)). The carry-over comes from
// the lag-one autocorrelation of the residuals about each stay's mean, over
// consecutive scheduled scores, corrected for the mean's removal
// (E[r1] = rho - (1 + 3 rho) / n; Kendall 1954); the variances then use
// E[sum (x - mean)^2] = sd^2 (n - f) and Var(mean) = sd^2 f / n, f = mean_inflation.
void fit_score_levels(const Population& pop, GeneratorConfig& c) {
    std::vector<double> encounter_means, sizes;
    double within_ss = 0.0, lag_products = 0.0, lag_pairs = 0.0, scores = 0.0;
    const double cadence_seconds = c.scores.cadence_minutes * 60.0;
    for (std::size_t e = 0; e < pop.encounters.size(); ++e) {
        if (pop.encounters[e].outcome_at) continue;
        std::vector<std::pair<Instant, double>> x;
        for (const Score& s : pop.scores_of(e)) x.push_back({s.scored_at, latent_of(s.value, c.scores.scale)});
        if (x.size() < 2) continue;
        std::sort(x.begin(), x.end());
        double m = 0.0;
        for (const auto& [at, v] : x) m += v / static_cast<double>(x.size());
        encounter_means.push_back(m);
        sizes.push_back(static_cast<double>(x.size()));
        for (std::size_t i = 0; i < x.size(); ++i) {
            within_ss += (x[i].second - m) * (x[i].second - m);
            if (i > 0 && static_cast<double>(x[i].first - x[i - 1].first) < 1.5 * cadence_seconds) {
                lag_products += (x[i].second - m) * (x[i - 1].second - m);
                lag_pairs += 1.0;
            }
        }
        scores += static_cast<double>(x.size());
    }
    if (encounter_means.size() < 2) throw std::invalid_argument("fit_generator: fewer than two controls with two or more scores");
    double per_score = 0.0;  // carry-over from one scheduled score to the next
    if (lag_pairs > 0 && within_ss > 0) {
        const double r1 = (lag_products / lag_pairs) / (within_ss / scores);
        const double inverse_n = static_cast<double>(encounter_means.size()) / scores;  // 1 / n, weighted by n
        per_score = std::clamp((r1 + inverse_n) / (1.0 - 3.0 * inverse_n), 0.0, 0.99);
    }
    double effective = 0.0, inflation_over_n = 0.0;
    for (double n : sizes) {
        const double f = mean_inflation(n, per_score);
        effective += n - f;
        inflation_over_n += f / n / static_cast<double>(sizes.size());
    }
    const double within_var = within_ss / std::max(effective, 1.0);
    c.scores.baseline = mean_of(encounter_means);
    c.scores.within_patient_sd = std::sqrt(within_var);
    c.scores.between_patient_sd = std::sqrt(std::max(0.0, variance_of(encounter_means) - within_var * inflation_over_n));
    c.scores.noise_carryover = per_score > 0 ? std::min(0.99, std::pow(per_score, 60.0 / c.scores.cadence_minutes)) : 0.0;
}

// Pre-outcome rise: mean excess over the baseline by hour before time zero,
// then least squares over onset ranges [a, b] on a 1-hour grid (the size is
// linear given [a, b], so it is solved in closed form).
void fit_drift(const Population& pop, const FitOptions& options, GeneratorConfig& c) {
    const int bins = std::max(1, static_cast<int>(options.drift_window_hours));
    std::vector<double> excess_sum(static_cast<std::size_t>(bins)), hours_sum(static_cast<std::size_t>(bins)),
        count(static_cast<std::size_t>(bins));
    for (std::size_t e = 0; e < pop.encounters.size(); ++e) {
        const Encounter& enc = pop.encounters[e];
        if (!enc.outcome_at) continue;
        for (const Score& s : pop.scores_of(e)) {
            const double h = static_cast<double>(*enc.outcome_at - s.scored_at) / 3600.0;
            if (h < 0 || h >= bins) continue;
            const auto k = static_cast<std::size_t>(h);
            excess_sum[k] += latent_of(s.value, c.scores.scale) - c.scores.baseline;
            hours_sum[k] += h;
            count[k] += 1.0;
        }
    }
    double best_sse = INFINITY, best_size = 0.0, best_a = 0.0, best_b = 0.0;
    for (int b = 1; b <= bins; ++b) {
        for (int a = 0; a <= b; ++a) {
            double sg = 0.0, gg = 0.0, ee = 0.0;
            for (std::size_t k = 0; k < excess_sum.size(); ++k) {
                if (count[k] == 0) continue;
                const double g = rise_share(hours_sum[k] / count[k], a, b);
                const double e = excess_sum[k] / count[k];
                sg += count[k] * e * g;
                gg += count[k] * g * g;
                ee += count[k] * e * e;
            }
            if (gg <= 0) continue;
            const double size = sg / gg;
            const double sse = ee - size * sg;
            if (sse < best_sse) {
                best_sse = sse;
                best_size = size;
                best_a = a;
                best_b = b;
            }
        }
    }
    c.scores.drift_size = best_size;
    c.scores.drift_onset_min_hours = best_a;
    c.scores.drift_onset_max_hours = best_b;
}

// Encounter-level AUC (each encounter's highest usable score) of `config`
// over its own period, with the rise's spread set to `spread`.
double generated_auc(GeneratorConfig config, double spread, std::uint64_t seed) {
    config.scores.drift_size_sd = spread;
    std::vector<double> cases, controls;
    generate_streaming(config, seed, 0, [&](const Encounter& e, std::span<const Score> scores) {
        if (scores.empty()) return;
        double highest = scores.front().value;
        for (const Score& s : scores) highest = std::max(highest, s.value);
        (e.outcome_at ? cases : controls).push_back(highest);
    });
    return mann_whitney_auc(cases, controls);
}

// How much cases differ in their rise. The mean curve fixes the average rise
// only: cases that all climb alike are easier to catch than cases of which
// some climb far, some hardly or late, with the same mean; fitted on the mean
// alone, the fitted population catches more of its cases than the log does.
// The spread is the one at which a long population generated from the other
// fitted knobs (about 1,000 cases, seed fixed) has the log's encounter-level
// AUC, found by bisection; none when the knobs without spread already
// discriminate no better than the log (the rise then explains all the log shows).
void fit_rise_spread(const Population& pop, GeneratorFit& fit) {
    GeneratorConfig& c = fit.config;
    const EncounterMaxima maxima = encounter_maxima(pop);
    const double log_auc = mann_whitney_auc(maxima.cases, maxima.controls);
    if (std::isnan(log_auc) || c.outcome.probability <= 0) return;
    constexpr std::uint64_t seed = 20261205;
    GeneratorConfig long_run = c;
    double admissions_per_hour = 0;
    for (const UnitConfig& u : c.units)
        for (double r : u.arrivals_per_hour) admissions_per_hour += r / hours_per_week;
    const double hours = std::clamp(1000.0 / std::max(admissions_per_hour * c.outcome.probability, 1e-9), 28.0 * 24.0,
                                    3.0 * 365.0 * 24.0);
    long_run.period_end = c.period_start + static_cast<Seconds>(hours * 3600.0);
    if (generated_auc(long_run, 0.0, seed) <= log_auc) return;
    double low = 0.0, high = std::max(1.0, 4.0 * std::abs(c.scores.drift_size));
    if (generated_auc(long_run, high, seed) > log_auc) {
        c.scores.drift_size_sd = high;
        fit.notes.push_back("the log's cases are harder to tell apart than even a rise spread of " + number(high) +
                            " makes them: the fitted population discriminates better than the log");
        return;
    }
    for (int step = 0; step < 14; ++step) {
        const double mid = 0.5 * (low + high);
        (generated_auc(long_run, mid, seed) > log_auc ? low : high) = mid;
    }
    c.scores.drift_size_sd = 0.5 * (low + high);
    fit.notes.push_back("drift_size_sd " + number(c.scores.drift_size_sd) +
                        ": the spread of the rise from case to case that gives the log's encounter-level AUC of " +
                        number(std::round(log_auc * 1000.0) / 1000.0));
}

// A log shows admissions, not arrivals: when a unit was full, arrivals were
// turned away before the log saw them. The generator turns arrivals away too
// (beds = highest census), so fitted rates equal to the log's admissions
// would be thinned twice and the fitted population would admit fewer
// patients, with fewer cases and fewer notices. Raise each unit's rates
// until a year generated from the fitted knobs (seed fixed, scores
// skipped) admits, per hour, what the log admitted.
void fit_arrivals_before_turning_away(const Population& pop, GeneratorFit& fit) {
    constexpr std::uint64_t seed = 20261205;
    GeneratorConfig& c = fit.config;
    std::vector<std::string>& notes = fit.notes;
    std::vector<double> log_admissions(c.units.size(), 0.0);
    for (const Encounter& e : pop.encounters)
        if (e.admitted >= fit.admissions_from && e.admitted < fit.admissions_until) log_admissions[e.unit] += 1.0;
    const double log_hours = static_cast<double>(fit.admissions_until - fit.admissions_from) / 3600.0;
    GeneratorConfig year = c;
    year.period_end = c.period_start + std::max<Seconds>(c.period_end - c.period_start, 52 * 7 * 86400);
    year.scores.cadence_minutes = 60 * 24 * 7;  // one score a week: only admissions are counted
    year.scores.jitter_minutes = 0;
    const double year_hours = static_cast<double>(year.period_end - year.period_start) / 3600.0;
    std::vector<double> raised(c.units.size(), 1.0);
    for (int round = 0; round < 8; ++round) {
        std::vector<double> admitted(c.units.size(), 0.0);
        generate_streaming(year, seed, 0, [&](const Encounter& e, std::span<const Score>) {
            if (e.admitted >= year.period_start) admitted[e.unit] += 1.0;
        });
        bool settled = true;
        for (std::size_t u = 0; u < c.units.size(); ++u) {
            if (admitted[u] <= 0 || log_admissions[u] <= 0) continue;
            const double ratio = (log_admissions[u] / log_hours) / (admitted[u] / year_hours);
            if (std::abs(ratio - 1.0) > 0.005) settled = false;
            raised[u] *= ratio;
            for (double& r : year.units[u].arrivals_per_hour) r *= ratio;
        }
        if (settled) break;
    }
    for (std::size_t u = 0; u < c.units.size(); ++u) {
        c.units[u].arrivals_per_hour = year.units[u].arrivals_per_hour;
        if (std::abs(raised[u] - 1.0) >= 0.005)
            notes.push_back(c.units[u].name + ": arrival rates " + (raised[u] > 1 ? "raised" : "lowered") + " by " +
                            number(std::round(std::abs(raised[u] - 1.0) * 1000.0) / 10.0) +
                            "% so that, with arrivals turned away when all " + std::to_string(c.units[u].beds) +
                            " beds are taken, the fitted population admits as many as the log");
    }
}

std::string range_text(const ScoreRange& r) {
    return r.lowest == r.highest ? "all " + number(r.lowest) : "from " + number(r.lowest) + " to " + number(r.highest);
}

std::string scale_name(ScoreScale scale) { return scale == ScoreScale::points ? "points" : "probability"; }

// Why the scores alone show no scale.
std::string undecided_reason(const ScaleEvidence& e) {
    if (e.range.scores == 0) return "the log has no usable scores, so their scale cannot be told";
    return "every one of the " + std::to_string(e.range.scores) +
           " usable scores is 0 or 1, which fits both scales (points and probability)";
}

// What the scores show, for a note.
std::string evidence_text(const ScaleEvidence& e) {
    if (!e.detected) return undecided_reason(e);
    if (*e.detected == ScoreScale::probability)
        return "every one of the " + std::to_string(e.range.scores) + " usable scores lies within 0 to 1 (" +
               range_text(e.range) + ")";
    return "the usable scores run " + range_text(e.range) + ", outside 0 to 1, so they are not probabilities";
}

}  // namespace

ScaleEvidence score_scale_evidence(const Population& pop) {
    ScaleEvidence e;
    e.range = observed_score_range(pop);
    for (const Score& s : pop.scores) e.strictly_between += s.value > 0.0 && s.value < 1.0;
    if (e.range.scores == 0) return e;
    if (e.range.lowest < 0.0 || e.range.highest > 1.0) e.detected = ScoreScale::points;
    else if (e.strictly_between > 0) e.detected = ScoreScale::probability;
    return e;
}

ScaleChoice choose_score_scale(const ScaleEvidence& e, std::optional<ScoreScale> given) {
    if (!given) {
        if (!e.detected) return {std::nullopt, undecided_reason(e)};
        return {e.detected, "scale: " + scale_name(*e.detected) + ", detected: " + evidence_text(e)};
    }
    if (*given == ScoreScale::probability && e.detected == ScoreScale::points)
        return {std::nullopt, "the probability scale was asked for, but " + evidence_text(e)};
    std::string reason = "scale: " + scale_name(*given) + ", as asked";
    if (*given == ScoreScale::points && e.detected == ScoreScale::probability)
        reason += ", although " + evidence_text(e) + ", as probabilities would";
    else
        reason += " (" + evidence_text(e) + ")";
    return {given, reason};
}

GeneratorFit fit_generator(const Population& pop, const FitOptions& options) {
    const ScaleChoice scale = choose_score_scale(score_scale_evidence(pop), options.scale);
    if (!scale.scale) throw std::invalid_argument("fit_generator: " + scale.reason);
    GeneratorFit fit;
    fit.notes.push_back(scale.reason);
    fit.config.scores.scale = *scale.scale;
    fit.config.zone = options.zone;
    fit_period(pop, fit.config);
    fit_arrivals(pop, options, fit);
    fit_stay_and_outcome(pop, options, fit);
    fit_cadence_and_latency(pop, fit);
    fit_score_levels(pop, fit.config);
    fit_drift(pop, options, fit.config);
    fit_arrivals_before_turning_away(pop, fit);
    fit_rise_spread(pop, fit);
    if (fit.cases < 30) fit.notes.push_back("only " + std::to_string(fit.cases) + " cases: the pre-outcome rise is poorly determined");
    return fit;
}

std::string scenario_fragment(const GeneratorConfig& c, const std::vector<std::string>& notes) {
    static const char* const day_names[] = {"Monday", "Tuesday", "Wednesday", "Thursday", "Friday", "Saturday", "Sunday"};
    std::ostringstream y;
    y << "# Generator parameters fitted by tocsin; edit freely.\n";
    for (const std::string& n : notes) y << "# note: " << n << "\n";
    y << "# Hours of week are on the " << c.zone.name() << " clock: keep `time_zone: " << c.zone.name()
      << "` at the top of the scenario.\n";
    y << "population:\n  generate:\n";
    y << "    start: " << format_utc(c.period_start) << "\n";
    y << "    end: " << format_utc(c.period_end) << "\n";
    y << "    warmup_days: " << number(c.warmup_days) << "\n";
    y << "    units:\n";
    for (const UnitConfig& u : c.units) {
        y << "      - name: \"" << u.name << "\"\n";
        y << "        beds: " << u.beds << "\n";
        y << "        arrivals_per_hour:  # admissions per hour by local hour 00..23, one row per weekday\n";
        for (int d = 0; d < 7; ++d) {
            y << "          - [";
            for (int h = 0; h < 24; ++h) y << (h ? ", " : "") << number(u.arrivals_per_hour[static_cast<std::size_t>(d * 24 + h)]);
            y << "]  # " << day_names[d] << "\n";
        }
    }
    y << "    stay:\n";
    if (c.stay.distribution == StayDistribution::lognormal) {
        y << "      distribution: lognormal\n      median_hours: " << number(c.stay.median_hours)
          << "\n      log_sd: " << number(c.stay.log_sd) << "\n";
    } else {
        y << "      distribution: gamma\n      mean_hours: " << number(c.stay.mean_hours)
          << "\n      sd_hours: " << number(c.stay.sd_hours) << "\n";
    }
    y << "    outcome:\n";
    y << "      probability: " << number(c.outcome.probability) << "\n";
    y << "      earliest_fraction: " << number(c.outcome.earliest_fraction) << "\n";
    y << "      latest_fraction: " << number(c.outcome.latest_fraction) << "\n";
    y << "      ends_stay: " << (c.outcome.ends_stay ? "true" : "false") << "\n";
    const ScoreConfig& s = c.scores;
    y << "    scores:\n";
    y << "      scale: " << (s.scale == ScoreScale::points ? "points" : "probability") << "\n";
    y << "      cadence_minutes: " << number(s.cadence_minutes) << "\n";
    y << "      jitter_minutes: " << number(s.jitter_minutes) << "\n";
    y << "      missing_probability: " << number(s.missing_probability) << "\n";
    y << "      latency_median_minutes: " << number(s.latency_median_minutes) << "\n";
    y << "      latency_log_sd: " << number(s.latency_log_sd) << "\n";
    y << "      baseline: " << number(s.baseline) << "\n";
    y << "      between_patient_sd: " << number(s.between_patient_sd) << "\n";
    y << "      within_patient_sd: " << number(s.within_patient_sd) << "\n";
    y << "      noise_carryover: " << number(s.noise_carryover) << "\n";
    y << "      drift_size: " << number(s.drift_size) << "\n";
    y << "      drift_size_sd: " << number(s.drift_size_sd) << "\n";
    y << "      drift_onset_min_hours: " << number(s.drift_onset_min_hours) << "\n";
    y << "      drift_onset_max_hours: " << number(s.drift_onset_max_hours) << "\n";
    return y.str();
}

}  // namespace tocsin
