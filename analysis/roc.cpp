#include "analysis/roc.hpp"

#include <algorithm>
#include <bit>
#include <boost/math/distributions/normal.hpp>
#include <cassert>
#include <cmath>
#include <limits>
#include <stdexcept>
#include <string>
#include <utility>

#include "analysis/value_ranks.hpp"

namespace tocsin {

namespace {

constexpr double not_a_number = std::numeric_limits<double>::quiet_NaN();

void check_same_length(std::size_t scores, std::size_t labels) {
    if (scores != labels) throw std::invalid_argument("scores and labels differ in length");
}

}  // namespace

double normal_two_sided_z(double confidence) {
    if (!(confidence > 0.0 && confidence < 1.0)) throw std::invalid_argument("confidence must be in (0, 1)");
    return boost::math::quantile(boost::math::normal_distribution<double>(), 0.5 + confidence / 2.0);
}

Interval wilson_interval(std::int64_t successes, std::int64_t trials, double confidence) {
    if (successes < 0 || successes > trials) throw std::invalid_argument("wilson_interval: need 0 <= successes <= trials");
    if (trials == 0) return {0.0, 1.0};
    const double z = normal_two_sided_z(confidence);
    const double n = static_cast<double>(trials);
    const double p = static_cast<double>(successes) / n;
    const double z2 = z * z;
    const double denominator = 1.0 + z2 / n;
    const double centre = (p + z2 / (2.0 * n)) / denominator;
    const double half = z / denominator * std::sqrt(p * (1.0 - p) / n + z2 / (4.0 * n * n));
    // At 0/n and n/n the bound is exactly 0 or 1; rounding must not move it.
    Interval out{std::max(0.0, centre - half), std::min(1.0, centre + half)};
    if (successes == 0) out.lower = 0.0;
    if (successes == trials) out.upper = 1.0;
    return out;
}

std::vector<std::uint32_t> ascending_order(std::span<const double> values) {
    if (values.size() > std::numeric_limits<std::uint32_t>::max())
        throw std::length_error("ascending_order: more than 2^32 - 1 values");
    const std::size_t n = values.size();
    std::vector<std::uint32_t> order(n);
    for (std::size_t i = 0; i < n; ++i) order[i] = static_cast<std::uint32_t>(i);
    // Already in order (common: scores ranked once, then mapped to
    // probabilities by an increasing function): nothing to do.
    if (std::is_sorted(values.begin(), values.end())) return order;
    if (n < 2048) {
        std::stable_sort(order.begin(), order.end(), [&](std::uint32_t a, std::uint32_t b) { return values[a] < values[b]; });
        return order;
    }
    if (const auto few = distinct_value_ranks(n, [&](std::size_t i) { return values[i]; }, std::size_t{1} << 16)) {
        std::vector<std::size_t> next(few->count.size(), 0);
        for (std::size_t r = 1; r < next.size(); ++r) next[r] = next[r - 1] + few->count[r - 1];
        for (std::size_t i = 0; i < n; ++i) order[next[few->rank[i]]++] = static_cast<std::uint32_t>(i);
        return order;
    }
    std::vector<std::uint64_t> keys(n), keys_next(n);
    std::vector<std::uint32_t> order_next(n);
    // 11-bit digits (6 passes): 2,048 buckets keep the scatter within cache
    // and TLB reach, which matters more than the pass count at 10^7 keys.
    constexpr int digit_bits = 11;
    constexpr int passes = (64 + digit_bits - 1) / digit_bits;
    constexpr std::size_t buckets = std::size_t{1} << digit_bits;
    std::vector<std::size_t> count(passes * buckets, 0);
    for (std::size_t i = 0; i < n; ++i) {
        const std::uint64_t k = sort_key(values[i]);
        keys[i] = k;
        for (int p = 0; p < passes; ++p) ++count[p * buckets + ((k >> (p * digit_bits)) & (buckets - 1))];
    }
    for (int p = 0; p < passes; ++p) {
        std::size_t* c = count.data() + p * buckets;
        const int shift = p * digit_bits;
        // A digit shared by every key leaves the order as it is.
        if (c[(keys[0] >> shift) & (buckets - 1)] == n) continue;
        std::size_t running = 0;
        for (std::size_t b = 0; b < buckets; ++b) {
            const std::size_t here = c[b];
            c[b] = running;
            running += here;
        }
        for (std::size_t i = 0; i < n; ++i) {
            const std::size_t at = c[(keys[i] >> shift) & (buckets - 1)]++;
            keys_next[at] = keys[i];
            order_next[at] = order[i];
        }
        keys.swap(keys_next);
        order.swap(order_next);
    }
    return order;
}

namespace {

// Walks tie groups in ascending order and calls visit(first, last) for each
// half-open run [first, last) of equal scores within `order`.
template <class Visit>
void for_each_tie_group(std::span<const double> scores, const std::vector<std::uint32_t>& order, Visit visit) {
    std::size_t first = 0;
    while (first < order.size()) {
        std::size_t last = first + 1;
        while (last < order.size() && scores[order[last]] == scores[order[first]]) ++last;
        visit(first, last);
        first = last;
    }
}

}  // namespace

double auc_mann_whitney(std::span<const double> scores, std::span<const std::uint8_t> labels) {
    check_same_length(scores.size(), labels.size());
    const auto order = ascending_order(scores);
    // Twice the Mann-Whitney U in exact integers: each positive earns 2 per
    // negative below it and 1 per negative tied with it.
    std::int64_t twice_u = 0, negatives_below = 0, positives = 0;
    for_each_tie_group(scores, order, [&](std::size_t first, std::size_t last) {
        std::int64_t pos = 0, neg = 0;
        for (std::size_t i = first; i < last; ++i) (labels[order[i]] ? pos : neg) += 1;
        twice_u += pos * (2 * negatives_below + neg);
        negatives_below += neg;
        positives += pos;
    });
    const std::int64_t negatives = negatives_below;
    if (positives == 0 || negatives == 0) return not_a_number;
    return static_cast<double>(twice_u) / (2.0 * static_cast<double>(positives) * static_cast<double>(negatives));
}

PlacementValues placement_values(std::span<const double> scores, std::span<const std::uint8_t> labels) {
    check_same_length(scores.size(), labels.size());
    std::int64_t n_pos = 0;
    for (auto l : labels) n_pos += l ? 1 : 0;
    const std::int64_t n_neg = static_cast<std::int64_t>(labels.size()) - n_pos;
    PlacementValues out;
    out.of_positives.resize(static_cast<std::size_t>(n_pos));
    out.of_negatives.resize(static_cast<std::size_t>(n_neg));
    if (n_pos == 0 || n_neg == 0) return out;
    // Where each observation goes in its class's vector (input order).
    std::vector<std::uint32_t> slot(labels.size());
    {
        std::uint32_t p = 0, q = 0;
        for (std::size_t i = 0; i < labels.size(); ++i) slot[i] = labels[i] ? p++ : q++;
    }
    const auto order = ascending_order(scores);
    // Sun & Xu (2014) write these as midrank differences; walking tie groups
    // in ascending order gives the same numbers with counts instead of ranks.
    std::int64_t neg_below = 0, pos_below = 0;
    for_each_tie_group(scores, order, [&](std::size_t first, std::size_t last) {
        std::int64_t pos = 0, neg = 0;
        for (std::size_t i = first; i < last; ++i) (labels[order[i]] ? pos : neg) += 1;
        const double v_pos = (static_cast<double>(neg_below) + 0.5 * static_cast<double>(neg)) / static_cast<double>(n_neg);
        const std::int64_t pos_above = n_pos - pos_below - pos;
        const double v_neg = (static_cast<double>(pos_above) + 0.5 * static_cast<double>(pos)) / static_cast<double>(n_pos);
        for (std::size_t i = first; i < last; ++i) {
            const std::uint32_t k = order[i];
            (labels[k] ? out.of_positives[slot[k]] : out.of_negatives[slot[k]]) = labels[k] ? v_pos : v_neg;
        }
        neg_below += neg;
        pos_below += pos;
    });
    return out;
}

namespace {

// Mean and sample variance (n - 1 divisor) in two passes for accuracy.
std::pair<double, double> mean_and_variance(const std::vector<double>& v) {
    double sum = 0.0;
    for (double x : v) sum += x;
    const double m = sum / static_cast<double>(v.size());
    double ss = 0.0;
    for (double x : v) ss += (x - m) * (x - m);
    return {m, v.size() > 1 ? ss / static_cast<double>(v.size() - 1) : not_a_number};
}

}  // namespace

AucEstimate auc_delong(std::span<const double> scores, std::span<const std::uint8_t> labels, double confidence) {
    const PlacementValues pv = placement_values(scores, labels);
    AucEstimate out;
    out.positives = static_cast<std::int64_t>(pv.of_positives.size());
    out.negatives = static_cast<std::int64_t>(pv.of_negatives.size());
    if (out.positives == 0 || out.negatives == 0) {
        out.auc = out.standard_error = out.interval.lower = out.interval.upper = not_a_number;
        return out;
    }
    const auto [auc, s10] = mean_and_variance(pv.of_positives);
    const auto s01 = mean_and_variance(pv.of_negatives).second;
    out.auc = auc;
    out.standard_error = std::sqrt(s10 / static_cast<double>(out.positives) + s01 / static_cast<double>(out.negatives));
    const double z = normal_two_sided_z(confidence);
    out.interval = {std::max(0.0, auc - z * out.standard_error), std::min(1.0, auc + z * out.standard_error)};
    return out;
}

namespace {

void check_paired_input(std::span<const double> score_a, std::span<const double> score_b,
                        std::span<const std::uint8_t> labels) {
    if (score_a.size() != labels.size() || score_b.size() != labels.size())
        throw std::invalid_argument("paired_auc_delong: score_a has " + std::to_string(score_a.size()) +
                                    " values, score_b " + std::to_string(score_b.size()) + " and the labels " +
                                    std::to_string(labels.size()) + "; all three must describe the same encounters");
    for (const auto& [name, scores] : {std::pair{"score_a", score_a}, std::pair{"score_b", score_b}})
        for (std::size_t i = 0; i < scores.size(); ++i)
            if (!std::isfinite(scores[i]))
                throw std::invalid_argument("paired_auc_delong: " + std::string(name) + "[" + std::to_string(i) +
                                            "] is " + std::to_string(scores[i]) + ", not a finite number");
    std::size_t cases = 0;
    for (auto l : labels) cases += l ? 1 : 0;
    const std::size_t controls = labels.size() - cases;
    if (cases < 2 || controls < 2)
        throw std::invalid_argument("paired_auc_delong: needs at least two cases and two controls to estimate the "
                                    "variance; got " + std::to_string(cases) + " cases and " +
                                    std::to_string(controls) + " controls");
}

// Sample covariance (n - 1 divisor) of two vectors of the same length, n >= 2.
double sample_covariance(const std::vector<double>& x, const std::vector<double>& y) {
    const double mx = mean_and_variance(x).first, my = mean_and_variance(y).first;
    double s = 0.0;
    for (std::size_t i = 0; i < x.size(); ++i) s += (x[i] - mx) * (y[i] - my);
    return s / static_cast<double>(x.size() - 1);
}

std::vector<double> differences(const std::vector<double>& x, const std::vector<double>& y) {
    std::vector<double> d(x.size());
    for (std::size_t i = 0; i < x.size(); ++i) d[i] = x[i] - y[i];
    return d;
}

// Whether x[i] - y[i] is the same for every i. A placement value is a count
// of the other class (ties one half) over its size, so value * 2 * size is a
// whole number: the question is decided exactly, not within a rounding
// tolerance that would turn a true zero into a huge z.
bool same_difference_throughout(const std::vector<double>& x, const std::vector<double>& y, std::size_t size) {
    const double twice = 2.0 * static_cast<double>(size);
    auto whole = [&](double v) { return std::llround(v * twice); };
    for (std::size_t i = 1; i < x.size(); ++i)
        if (whole(x[i]) - whole(y[i]) != whole(x[0]) - whole(y[0])) return false;
    return true;
}

}  // namespace

PairedAucComparison paired_auc_delong(std::span<const double> score_a, std::span<const double> score_b,
                                      std::span<const std::uint8_t> labels, double confidence) {
    check_paired_input(score_a, score_b, labels);
    const PlacementValues a = placement_values(score_a, labels), b = placement_values(score_b, labels);
    PairedAucComparison out;
    out.cases = static_cast<std::int64_t>(a.of_positives.size());
    out.controls = static_cast<std::int64_t>(a.of_negatives.size());
    const double m = static_cast<double>(out.cases), n = static_cast<double>(out.controls);
    // DeLong's S = S10 / m + S01 / n, entry by entry (both classes' vectors
    // list the same encounters in the same order, so they pair up).
    const auto [auc_a, s10_a] = mean_and_variance(a.of_positives);
    const auto [auc_b, s10_b] = mean_and_variance(b.of_positives);
    out.auc_a = auc_a;
    out.auc_b = auc_b;
    out.difference = auc_a - auc_b;
    out.variance_a = s10_a / m + mean_and_variance(a.of_negatives).second / n;
    out.variance_b = s10_b / m + mean_and_variance(b.of_negatives).second / n;
    out.covariance = sample_covariance(a.of_positives, b.of_positives) / m +
                     sample_covariance(a.of_negatives, b.of_negatives) / n;
    // The variance of the difference, variance_a + variance_b - 2 covariance,
    // is the same sum taken over each encounter's difference of placements;
    // that form avoids the cancellation when the two scores nearly agree.
    const bool no_spread = same_difference_throughout(a.of_positives, b.of_positives, a.of_negatives.size()) &&
                           same_difference_throughout(a.of_negatives, b.of_negatives, a.of_positives.size());
    if (!no_spread)
        out.standard_error = std::sqrt(mean_and_variance(differences(a.of_positives, b.of_positives)).second / m +
                                       mean_and_variance(differences(a.of_negatives, b.of_negatives)).second / n);
    const double half = normal_two_sided_z(confidence) * out.standard_error;
    out.interval = {std::max(-1.0, out.difference - half), std::min(1.0, out.difference + half)};
    if (out.standard_error > 0.0) {
        out.z = out.difference / out.standard_error;
        const boost::math::normal_distribution<double> standard;
        out.p = 2.0 * boost::math::cdf(boost::math::complement(standard, std::abs(*out.z)));
    }
    return out;
}

double hanley_mcneil_standard_error(double a, std::int64_t positives, std::int64_t negatives) {
    const double q1 = a / (2.0 - a);
    const double q2 = 2.0 * a * a / (1.0 + a);
    const double n_a = static_cast<double>(positives), n_n = static_cast<double>(negatives);
    const double variance = (a * (1.0 - a) + (n_a - 1.0) * (q1 - a * a) + (n_n - 1.0) * (q2 - a * a)) / (n_a * n_n);
    return std::sqrt(variance);
}

std::vector<ThresholdCounts> counts_at_thresholds(std::span<const double> scores, std::span<const std::uint8_t> labels,
                                                  std::span<const double> thresholds) {
    check_same_length(scores.size(), labels.size());
    std::vector<double> pos, neg;
    for (std::size_t i = 0; i < scores.size(); ++i) (labels[i] ? pos : neg).push_back(scores[i]);
    std::sort(pos.begin(), pos.end());
    std::sort(neg.begin(), neg.end());
    std::vector<ThresholdCounts> out;
    out.reserve(thresholds.size());
    for (double t : thresholds) {
        const auto pos_below = std::lower_bound(pos.begin(), pos.end(), t) - pos.begin();
        const auto neg_below = std::lower_bound(neg.begin(), neg.end(), t) - neg.begin();
        ThresholdCounts c;
        c.threshold = t;
        c.false_negatives = pos_below;
        c.true_positives = static_cast<std::int64_t>(pos.size()) - pos_below;
        c.true_negatives = neg_below;
        c.false_positives = static_cast<std::int64_t>(neg.size()) - neg_below;
        out.push_back(c);
    }
    return out;
}

std::vector<double> even_grid(double low, double high, int points) {
    std::vector<double> out;
    if (points <= 0) return out;
    if (points == 1) return {low};
    for (int i = 0; i < points; ++i)
        out.push_back(i == points - 1 ? high : low + (high - low) * static_cast<double>(i) / (points - 1));
    return out;
}

namespace {

std::optional<Proportion> proportion(std::int64_t k, std::int64_t n, double confidence) {
    if (n == 0) return std::nullopt;
    return Proportion{static_cast<double>(k) / static_cast<double>(n), wilson_interval(k, n, confidence)};
}

}  // namespace

std::vector<ThresholdMeasures> threshold_measures(const std::vector<ThresholdCounts>& counts,
                                                  const std::vector<std::string>& source, double confidence) {
    std::vector<ThresholdMeasures> out;
    for (std::size_t r = 0; r < counts.size(); ++r) {
        const ThresholdCounts& c = counts[r];
        ThresholdMeasures m;
        m.source = r < source.size() && !source[r].empty() ? source[r] : std::string("given");
        m.counts = c;
        const std::int64_t flagged = c.true_positives + c.false_positives;
        const std::int64_t total = flagged + c.false_negatives + c.true_negatives;
        m.sensitivity = proportion(c.true_positives, c.true_positives + c.false_negatives, confidence);
        m.specificity = proportion(c.true_negatives, c.true_negatives + c.false_positives, confidence);
        m.ppv = proportion(c.true_positives, flagged, confidence);
        m.npv = proportion(c.true_negatives, c.true_negatives + c.false_negatives, confidence);
        m.share_flagged = proportion(flagged, total, confidence);
        out.push_back(std::move(m));
    }
    return out;
}

}  // namespace tocsin
