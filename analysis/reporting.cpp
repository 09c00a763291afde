#include "analysis/reporting.hpp"

namespace tocsin {

ReportingShifts reporting_shifts(const AnalysisSettings& settings, const Population& pop, const ShiftCalendar& cal) {
    ReportingShifts r;
    r.from = settings.period_start.value_or(pop.period_start);
    r.until = settings.period_end.value_or(pop.period_end);
    for (std::size_t k = 0; k < cal.size(); ++k) {
        const Shift& s = cal.shifts()[k];
        if (s.start >= r.from && s.end <= r.until) r.shifts.push_back(k);
    }
    return r;
}

}  // namespace tocsin
