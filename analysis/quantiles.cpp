#include "analysis/quantiles.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

namespace tocsin {

double quantile_sorted(std::span<const double> v, double p) {
    if (v.empty()) return std::numeric_limits<double>::quiet_NaN();
    const double h = (static_cast<double>(v.size()) - 1.0) * p;
    const std::size_t lo = static_cast<std::size_t>(std::floor(h));
    const std::size_t hi = std::min(lo + 1, v.size() - 1);
    return v[lo] + (h - static_cast<double>(lo)) * (v[hi] - v[lo]);
}

double quantile(std::vector<double> values, double p) {
    std::sort(values.begin(), values.end());
    return quantile_sorted(values, p);
}

double mean(std::span<const double> values) {
    if (values.empty()) return std::numeric_limits<double>::quiet_NaN();
    double s = 0;
    for (double x : values) s += x;
    return s / static_cast<double>(values.size());
}

}  // namespace tocsin
