#pragma once
// What the figures of a run count: which actions catch a case (the catch
// window and minimum lead) and which shifts the per-shift counts cover (the
// reporting period). A plain value; the study layer fills it from a scenario file.
#include <cstdint>
#include <optional>

#include "models/time.hpp"

namespace tocsin {

struct AnalysisSettings {
    Seconds window = hours(24);   // a catch starts no earlier than window before time zero
    Seconds min_lead = 0;         // ... and at least min_lead before it
    std::optional<Instant> period_start, period_end;  // reporting period, when declared
    // A patient group with fewer encounters has its figures suppressed (disclosure).
    std::int64_t smallest_group = 11;
};

}  // namespace tocsin
