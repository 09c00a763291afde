#pragma once
// Order statistics used across every table, in one place so every column that
// says "median" or "90th percentile" means the same thing.
#include <span>
#include <vector>

namespace tocsin {

// Linear interpolation between order statistics (Hyndman & Fan 1996, type 7;
// the default of R's quantile() and NumPy's percentile()). Empty input -> NaN.
double quantile(std::vector<double> values, double p);
double quantile_sorted(std::span<const double> sorted, double p);
double mean(std::span<const double> values);

}  // namespace tocsin
