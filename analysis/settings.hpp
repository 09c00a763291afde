#pragma once
// What the figures of a run count: which actions catch a case (the catch
// window and minimum lead) and which shifts the per-shift counts cover (the
// reporting period). A plain value; the study layer fills it from a scenario file.
#include <cstdint>
#include <optional>
#include <vector>

#include "models/time.hpp"

namespace tocsin {

// A declared (assumed) effect of an evaluation on the outcome, by how long
// before time zero it starts (analysis/averted.hpp):
// - linear: `probability` from `full_lead` on, falling linearly to zero at the
//   minimum lead;
// - step: `probability` from `full_lead` on, zero before;
// - table: the probability of the last row whose lead is reached (rows by
//   ascending lead), zero before the first.
enum class AvertedShape : std::uint8_t { linear, step, table };
struct AvertedStep {
    Seconds lead = 0;
    double probability = 0;
};
struct AvertedEffect {
    AvertedShape shape = AvertedShape::linear;
    Seconds full_lead = hours(4);
    double probability = 0;
    std::vector<AvertedStep> table;
};

struct AnalysisSettings {
    Seconds window = hours(24);   // a catch starts no earlier than window before time zero
    Seconds min_lead = 0;         // ... and at least min_lead before it
    std::optional<Instant> period_start, period_end;  // reporting period, when declared
    // A patient group with fewer encounters has its figures suppressed (disclosure).
    std::int64_t smallest_group = 11;
    std::optional<AvertedEffect> averted;  // none: no outcomes-averted figures
};

}  // namespace tocsin
