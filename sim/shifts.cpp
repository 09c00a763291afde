#include "sim/shifts.hpp"

#include <algorithm>
#include <cassert>

namespace tocsin {

ShiftCalendar::ShiftCalendar(const ShiftPattern& pattern, const TimeZone& zone, Instant from, Instant to)
    : pattern_(pattern) {
    assert(!pattern.start_minutes.empty());
    // Start two local days early so the shift containing `from` is included.
    const std::int64_t first_day = (zone.to_local_seconds(from) - days(2)) / 86400;
    const std::int64_t last_day = (zone.to_local_seconds(to) + days(2)) / 86400;
    std::vector<Shift> all;
    for (std::int64_t d = first_day; d <= last_day; ++d) {
        const CivilTime date = civil_from_instant(d * 86400);
        for (std::size_t k = 0; k < pattern.start_minutes.size(); ++k) {
            CivilTime c = date;
            c.hour = pattern.start_minutes[k] / 60;
            c.minute = pattern.start_minutes[k] % 60;
            c.second = 0;
            Shift s;
            s.start = zone.from_local(c);
            s.pattern_index = static_cast<int>(k);
            s.local_day = d;
            s.weekday = weekday_from_days(d);
            all.push_back(s);
        }
    }
    for (std::size_t i = 0; i + 1 < all.size(); ++i) all[i].end = all[i + 1].start;
    all.pop_back();
    for (const Shift& s : all)
        if (s.end > from && s.start < to) shifts_.push_back(s);
}

std::size_t ShiftCalendar::index_of(Instant t) const {
    assert(contains(t));
    auto it = std::upper_bound(shifts_.begin(), shifts_.end(), t,
                               [](Instant v, const Shift& s) { return v < s.start; });
    return static_cast<std::size_t>(it - shifts_.begin()) - 1;
}

}  // namespace tocsin
