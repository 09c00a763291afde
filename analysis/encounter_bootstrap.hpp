#pragma once
// The encounter bootstrap of the prediction level: each replicate draws, with
// replacement, as many encounters as have predictions, so an encounter's many
// predictions move together. A replicate is a vector of multiplicities (how
// often each encounter was drawn), and a resample's Mann-Whitney sums are the
// ranked predictions' sums with each prediction weighted by its encounter's
// multiplicity: the same integers as copying the drawn encounters, ties
// included, without building the copy.
//
// Speed (the year of issue 18: 30 million predictions, 200 replicates): the
// weighted pass is made for a batch of replicates at once. Each encounter's
// multiplicities in the batch sit side by side (one short row per encounter),
// so one walk of the ranked predictions adds a row per prediction, a few
// vector instructions, instead of one walk per replicate; batches run on
// several threads. Every sum is an exact integer, so the figures do not
// depend on the batching or the thread count.
#include <cstdint>
#include <vector>

#include "analysis/prediction_level.hpp"

namespace tocsin {

// Multiplicity of each encounter (indexed like Population::encounters) in
// replicate `replicate`: |used| uniform draws from `used`, from the stream
// (seed, replication, evaluation_bootstrap, entity = replicate index), so a
// replicate does not depend on how many came before it.
std::vector<std::uint32_t> bootstrap_multiplicities(const std::vector<std::uint32_t>& used, std::size_t encounters,
                                                    const EvaluationOptions& options, int replicate);

// Weighted Mann-Whitney sums of one weighting per element of `weights` (each
// a multiplicity per encounter, or empty for once each), at each horizon
// limit: [weighting][horizon]. Equal to auc_sums_by_horizon(ranked, limits,
// weights[i]) for every i.
std::vector<std::vector<AucSums>> weighted_auc_sums(const RankedPredictions& ranked,
                                                    const std::vector<std::int32_t>& limits,
                                                    const std::vector<std::vector<std::uint32_t>>& weights,
                                                    unsigned threads);

// The sums of every bootstrap replicate of the options: [replicate][horizon].
std::vector<std::vector<AucSums>> bootstrap_auc_sums(const RankedPredictions& ranked,
                                                     const std::vector<std::int32_t>& limits, std::size_t encounters,
                                                     const EvaluationOptions& options);

}  // namespace tocsin
