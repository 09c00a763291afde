#pragma once
// The reporting period of a run and the complete shifts inside it.
#include <cstddef>
#include <vector>

#include "analysis/settings.hpp"
#include "models/population.hpp"
#include "sim/shifts.hpp"

namespace tocsin {

// The complete shifts whose per-unit counts are reported.
struct ReportingShifts {
    std::vector<std::size_t> shifts;  // indices into the calendar, ascending
    Instant from = 0, until = 0;
};
ReportingShifts reporting_shifts(const AnalysisSettings& settings, const Population& population, const ShiftCalendar& calendar);

}  // namespace tocsin
