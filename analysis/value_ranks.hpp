#pragma once
// Values as ranks among their distinct values: the order of
// ascending_order (analysis/roc.hpp) in one counting pass when there are few
// distinct values (scores in whole points or one decimal, as most clinical
// scores are), instead of a radix sort.
#include <algorithm>
#include <bit>
#include <cstddef>
#include <cstdint>
#include <limits>
#include <optional>
#include <vector>

namespace tocsin {

// Monotone map from a double to an unsigned key: flips negatives entirely and
// sets the sign bit of non-negatives, so unsigned order equals numeric order.
inline std::uint64_t sort_key(double x) {
    const auto bits = std::bit_cast<std::uint64_t>(x);
    return (bits >> 63) ? ~bits : bits | 0x8000000000000000ULL;
}

struct DistinctValueRanks {
    std::vector<std::uint16_t> rank;  // per value: 0 = the lowest sort key
    std::vector<std::size_t> count;   // per rank
};

// When the n values given by value_at(i) hold at most `most` distinct sort
// keys (capped at 65,536): each value's rank among them and how many values
// have each rank; otherwise nothing. A stable counting sort by rank is then
// exactly ascending_order. value_at reads a value where it is (a column of a
// larger record), so nothing is copied first.
template <class ValueAt>
std::optional<DistinctValueRanks> distinct_value_ranks(std::size_t n, const ValueAt& value_at, std::size_t most) {
    most = std::min({most, std::size_t{1} << 16, n});
    // Open addressing on the sort key, at most half full; an id per distinct
    // key in the order first seen, turned into ranks once all are known.
    int bits = 1;
    while ((std::size_t{1} << bits) < 2 * most) ++bits;
    const std::size_t mask = (std::size_t{1} << bits) - 1;
    constexpr std::uint32_t empty = std::numeric_limits<std::uint32_t>::max();
    std::vector<std::uint64_t> slot_key(mask + 1);
    std::vector<std::uint32_t> slot_id(mask + 1, empty);
    std::vector<std::uint64_t> key_of_id;
    DistinctValueRanks out;
    out.rank.resize(n);
    for (std::size_t i = 0; i < n; ++i) {
        const std::uint64_t k = sort_key(value_at(i));
        auto h = static_cast<std::size_t>((k * 0x9E3779B97F4A7C15ULL) >> (64 - bits));
        while (slot_id[h] != empty && slot_key[h] != k) h = (h + 1) & mask;
        if (slot_id[h] == empty) {
            if (key_of_id.size() == most) return std::nullopt;
            slot_key[h] = k;
            slot_id[h] = static_cast<std::uint32_t>(key_of_id.size());
            key_of_id.push_back(k);
        }
        out.rank[i] = static_cast<std::uint16_t>(slot_id[h]);
    }
    std::vector<std::uint32_t> ids(key_of_id.size());
    for (std::size_t id = 0; id < ids.size(); ++id) ids[id] = static_cast<std::uint32_t>(id);
    std::sort(ids.begin(), ids.end(), [&](std::uint32_t a, std::uint32_t b) { return key_of_id[a] < key_of_id[b]; });
    std::vector<std::uint16_t> rank_of_id(ids.size());
    for (std::size_t r = 0; r < ids.size(); ++r) rank_of_id[ids[r]] = static_cast<std::uint16_t>(r);
    out.count.assign(ids.size(), 0);
    for (std::uint16_t& r : out.rank) {
        r = rank_of_id[r];
        ++out.count[r];
    }
    return out;
}

}  // namespace tocsin
