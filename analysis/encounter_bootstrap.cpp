#include "analysis/encounter_bootstrap.hpp"

#include <algorithm>
#include <array>
#include <bit>
#include <limits>
#include <stdexcept>
#include <type_traits>

#include "models/parallel.hpp"
#include "models/random_streams.hpp"

namespace tocsin {

namespace {

// The draws of boost::random::uniform_int_distribution<std::size_t>(0, range)
// on a 64-bit engine (boost/random/uniform_int_distribution.hpp,
// generate_uniform_int, the branch where the engine's range is the larger):
// a draw x gives floor(x / bucket), kept when it is at most `range`. The same
// draws, with the division by the fixed bucket done by a multiplication and
// at most two corrections (it is most of the bootstrap's cost otherwise);
// tests/test_encounter_bootstrap.cpp compares it with Boost's draw by draw.
__extension__ typedef unsigned __int128 uint128;  // g++ and clang; __extension__ keeps -Wpedantic quiet

class UniformIndex {
public:
    explicit UniformIndex(std::uint64_t range) : range_(range) {
        if (range == 0) return;  // one choice, no draw: and the bucket below would wrap to 0
        constexpr std::uint64_t engine_range = std::numeric_limits<std::uint64_t>::max();
        bucket_ = engine_range / (range + 1);
        if (engine_range % (range + 1) == range) ++bucket_;
        reciprocal_ = engine_range / bucket_;
    }
    std::uint64_t operator()(RandomEngine& engine) const {
        if (range_ == 0) return 0;  // Boost draws nothing then either
        // A Mersenne Twister of 64-bit words: draws are every value from 0 to 2^64 - 1.
        static_assert(RandomEngine::word_size == 64 && std::is_same_v<RandomEngine::result_type, std::uint64_t>);
        for (;;) {
            const std::uint64_t x = engine();
            // reciprocal_ <= 2^64 / bucket_, so q is floor(x / bucket_) or at most 2 below it.
            auto q = static_cast<std::uint64_t>((static_cast<uint128>(x) * reciprocal_) >> 64);
            while (x - q * bucket_ >= bucket_) ++q;
            if (q <= range_) return q;
        }
    }

private:
    std::uint64_t range_, bucket_ = 1, reciprocal_ = 1;
};

}  // namespace

std::vector<std::uint32_t> bootstrap_multiplicities(const std::vector<std::uint32_t>& used, std::size_t encounters,
                                                    const EvaluationOptions& o, int replicate) {
    std::vector<std::uint32_t> w(encounters, 0);
    if (used.empty()) return w;
    RandomEngine engine = make_stream(o.seed, o.replication, StreamPurpose::evaluation_bootstrap,
                                      static_cast<std::uint64_t>(replicate));
    const UniformIndex pick(used.size() - 1);
    for (std::size_t d = 0; d < used.size(); ++d) ++w[used[pick(engine)]];
    return w;
}

namespace {

// The walk adds 64 lanes per prediction; on x86-64 with g++ it is also
// compiled for AVX2 and the processor picks the version at load time (the
// sums are integers, so both give the same figures).
#if defined(__x86_64__) && defined(__GNUC__) && !defined(__clang__)
#define TOCSIN_WIDE_VECTORS __attribute__((target_clones("avx2", "default")))
#else
#define TOCSIN_WIDE_VECTORS
#endif

// Weightings walked side by side: one encounter's row is 64 bytes, a cache
// line (the walk waits mostly for rows, so wider rows mean fewer walks).
constexpr std::size_t lanes = 64;
// A row holds multiplicities up to 255. A weighting with a larger one (an
// encounter drawn more than 255 times, which takes nearly every draw landing
// on a handful of encounters) gets the one-at-a-time pass instead.
constexpr std::uint32_t row_limit = 255;
constexpr std::uint8_t ends_tie_group = 0x80;
constexpr std::size_t most_classes = 64;  // a bit each in a 64-bit mask
constexpr std::size_t prefetch_ahead = 24;
constexpr std::size_t copies = 4;

// One byte per ranked prediction for the batched walk: whether it is the last
// of its tie group, and its class = how many of the distinct horizon limits
// (ascending) its time to outcome exceeds. A prediction is positive at
// exactly the horizons whose limit's rank is at least its class; the last
// class, negative at every horizon, holds every prediction of a stay without
// the outcome, most of them.
struct Tagged {
    bool batched = false;  // false with more distinct limits than classes fit in a mask
    std::vector<std::uint8_t> tag;
    std::vector<std::size_t> rank;  // per horizon, its limit's rank among the distinct limits
    std::size_t classes = 0;
};

Tagged tag_predictions(const RankedPredictions& r, const std::vector<std::int32_t>& limits) {
    std::vector<std::int32_t> distinct = limits;
    std::sort(distinct.begin(), distinct.end());
    distinct.erase(std::unique(distinct.begin(), distinct.end()), distinct.end());
    Tagged t;
    t.classes = distinct.size() + 1;
    for (std::int32_t limit : limits)
        t.rank.push_back(static_cast<std::size_t>(std::lower_bound(distinct.begin(), distinct.end(), limit) - distinct.begin()));
    t.batched = t.classes <= most_classes;
    if (!t.batched) return t;
    const std::size_t n = r.value.size();
    t.tag.resize(n);
    for (std::size_t i = 0; i < n; ++i) {
        std::uint8_t c = 0;
        for (std::int32_t limit : distinct) c += r.seconds_to_outcome[i] > limit;
        const bool last = i + 1 == n || r.value[i + 1] != r.value[i];
        t.tag[i] = static_cast<std::uint8_t>(c | (last ? ends_tie_group : 0));
    }
    return t;
}

// The walk of one batch. Within a tie group, multiplicities are added per
// class in 16-bit lanes (`part`, moved to 64-bit `group` before they could
// overflow); at the group's end its positives earn 2 per negative below and
// 1 per negative tied, exactly as in auc_sums_by_horizon. Consecutive
// predictions add into different copies of `part`, so each addition need not
// wait for the one before it to be stored.
class BatchWalk {
public:
    BatchWalk(const Tagged& t, std::uint32_t largest)
        : t_(t), horizons_(t.rank.size()), last_class_(t.classes - 1),
          flush_every_(65535 / std::max<std::uint32_t>(1, largest)), part_(copies * t.classes * lanes, 0),
          group_(t.classes * lanes, 0), twice_u_(horizons_ * lanes, 0), positives_(horizons_ * lanes, 0),
          negatives_before_last_(horizons_ * lanes, 0) {}

    TOCSIN_WIDE_VECTORS void walk(const std::vector<std::uint32_t>& encounter, const std::uint8_t* rows) {
        const std::size_t n = encounter.size();
        std::uint32_t since_flush = 0;
        for (std::size_t i = 0; i < n; ++i) {
            const std::uint8_t tag = t_.tag[i];
            const std::size_t c = tag & (ends_tie_group - 1);
            std::uint16_t* __restrict p = part_.data() + ((i % copies) * t_.classes + c) * lanes;
            const std::uint8_t* __restrict w = rows + static_cast<std::size_t>(encounter[i]) * lanes;
            // The rows are read in no order and do not all fit in the core's
            // cache: ask for one well ahead.
            if (i + prefetch_ahead < n) __builtin_prefetch(rows + static_cast<std::size_t>(encounter[i + prefetch_ahead]) * lanes);
            for (std::size_t l = 0; l < lanes; ++l) p[l] = static_cast<std::uint16_t>(p[l] + w[l]);
            touched_ |= std::uint64_t{1} << c;
            if (++since_flush == flush_every_ || (tag & ends_tie_group)) {
                flush();
                since_flush = 0;
                if (tag & ends_tie_group) close_group();
            }
        }
    }

    AucSums sums(std::size_t lane, std::size_t h) const {
        const std::size_t at = h * lanes + lane;
        return {twice_u_[at], positives_[at], negatives_last_[lane] + negatives_before_last_[at]};
    }

private:
    void flush() {
        for (std::uint64_t m = touched_; m; m &= m - 1) {
            const auto c = static_cast<std::size_t>(std::countr_zero(m));
            std::int64_t* g = group_.data() + c * lanes;
            for (std::size_t copy = 0; copy < copies; ++copy) {
                std::uint16_t* p = part_.data() + (copy * t_.classes + c) * lanes;
                for (std::size_t l = 0; l < lanes; ++l) g[l] += p[l];
                std::fill(p, p + lanes, std::uint16_t{0});
            }
        }
        in_group_ |= touched_;
        touched_ = 0;
    }

    void close_group() {
        std::int64_t* all_negative = group_.data() + last_class_ * lanes;
        if (in_group_ != std::uint64_t{1} << last_class_) {
            for (std::size_t h = 0; h < horizons_; ++h) add_positives(h, all_negative);
        }
        for (std::size_t l = 0; l < lanes; ++l) negatives_last_[l] += all_negative[l];
        for (std::uint64_t m = in_group_; m; m &= m - 1) {
            std::int64_t* g = group_.data() + static_cast<std::size_t>(std::countr_zero(m)) * lanes;
            std::fill(g, g + lanes, std::int64_t{0});
        }
        in_group_ = 0;
    }

    // One horizon at a group's end (before the group's last-class negatives
    // join negatives_last_).
    void add_positives(std::size_t h, const std::int64_t* all_negative) {
        const std::size_t rank = t_.rank[h];
        std::array<std::int64_t, lanes> pos{}, neg{};
        for (std::size_t c = 0; c <= last_class_; ++c) {
            if (!(in_group_ >> c & 1)) continue;
            const std::int64_t* g = group_.data() + c * lanes;
            auto& into = c <= rank ? pos : neg;
            for (std::size_t l = 0; l < lanes; ++l) into[l] += g[l];
        }
        std::int64_t* u = twice_u_.data() + h * lanes;
        std::int64_t* p = positives_.data() + h * lanes;
        std::int64_t* before = negatives_before_last_.data() + h * lanes;
        for (std::size_t l = 0; l < lanes; ++l) {
            u[l] += pos[l] * (2 * (negatives_last_[l] + before[l]) + neg[l]);
            p[l] += pos[l];
            before[l] += neg[l] - all_negative[l];
        }
    }

    const Tagged& t_;
    std::size_t horizons_, last_class_;
    std::uint32_t flush_every_;
    std::uint64_t touched_ = 0, in_group_ = 0;  // classes with something in part_ / group_
    std::vector<std::uint16_t> part_;           // [copy][class][lane]
    std::vector<std::int64_t> group_;           // [class][lane]
    // Running sums [horizon][lane]; negatives are split into the last class
    // (shared by every horizon) and the others.
    std::vector<std::int64_t> twice_u_, positives_, negatives_before_last_;
    std::array<std::int64_t, lanes> negatives_last_{};
};

// Sums of weightings first .. first + count - 1, `weights_of(j)` giving
// weighting j, into out[j].
template <class WeightsOf>
void sums_of_batch(const RankedPredictions& r, const std::vector<std::int32_t>& limits, const Tagged& t,
                   std::size_t encounters, std::size_t first, std::size_t count, const WeightsOf& weights_of,
                   std::vector<std::vector<AucSums>>& out) {
    std::vector<std::uint8_t> rows(encounters * lanes, 0);
    std::vector<std::size_t> lane_of;  // weightings walked here, by lane
    std::uint32_t largest = 0;
    for (std::size_t j = first; j < first + count; ++j) {
        const std::vector<std::uint32_t> w = weights_of(j);
        const std::uint32_t most = w.empty() ? 0 : *std::max_element(w.begin(), w.end());
        if (most > row_limit || !t.batched) {
            out[j] = auc_sums_by_horizon(r, limits, w);
            continue;
        }
        const std::size_t lane = lane_of.size();
        for (std::size_t e = 0; e < encounters; ++e) rows[e * lanes + lane] = static_cast<std::uint8_t>(w[e]);
        lane_of.push_back(j);
        largest = std::max(largest, most);
    }
    if (lane_of.empty()) return;
    BatchWalk walk(t, largest);
    walk.walk(r.encounter, rows.data());
    for (std::size_t lane = 0; lane < lane_of.size(); ++lane)
        for (std::size_t h = 0; h < limits.size(); ++h) out[lane_of[lane]].push_back(walk.sums(lane, h));
}

// Every weighting in batches of at most `lanes`, as many batches as keep
// every thread busy to the end.
template <class WeightsOf>
std::vector<std::vector<AucSums>> sums_in_batches(const RankedPredictions& r, const std::vector<std::int32_t>& limits,
                                                  std::size_t encounters, std::size_t count, unsigned threads,
                                                  const WeightsOf& weights_of) {
    std::vector<std::vector<AucSums>> out(count);
    if (count == 0) return out;
    const Tagged t = tag_predictions(r, limits);
    const std::size_t workers = std::max(1u, threads);
    std::size_t batches = (count + lanes - 1) / lanes;
    batches = std::min(count, (batches + workers - 1) / workers * workers);
    const std::size_t size = (count + batches - 1) / batches;
    batches = (count + size - 1) / size;
    parallel_for(batches, threads, [&](std::size_t b) {
        const std::size_t first = b * size;
        sums_of_batch(r, limits, t, encounters, first, std::min(size, count - first), weights_of, out);
    });
    return out;
}

}  // namespace

std::vector<std::vector<AucSums>> weighted_auc_sums(const RankedPredictions& r, const std::vector<std::int32_t>& limits,
                                                    const std::vector<std::vector<std::uint32_t>>& weights,
                                                    unsigned threads) {
    std::size_t encounters = 0;
    for (std::uint32_t e : r.encounter) encounters = std::max<std::size_t>(encounters, e + 1);
    for (const auto& w : weights) encounters = std::max(encounters, w.size());
    return sums_in_batches(r, limits, encounters, weights.size(), threads, [&](std::size_t j) {
        if (weights[j].empty()) return std::vector<std::uint32_t>(encounters, 1);
        if (weights[j].size() < encounters)
            throw std::invalid_argument("weighted_auc_sums: fewer weights than encounters with predictions");
        return weights[j];
    });
}

std::vector<std::vector<AucSums>> bootstrap_auc_sums(const RankedPredictions& r, const std::vector<std::int32_t>& limits,
                                                     std::size_t encounters, const EvaluationOptions& o) {
    return sums_in_batches(r, limits, encounters, static_cast<std::size_t>(std::max(0, o.bootstrap_replicates)),
                           o.threads, [&](std::size_t j) {
                               return bootstrap_multiplicities(r.encounters_used, encounters, o, static_cast<int>(j));
                           });
}

}  // namespace tocsin
