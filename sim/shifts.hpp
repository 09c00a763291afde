#pragma once
// Shifts on the local wall clock. A shift is named by its start instant; its
// length follows the wall clock, so the shift that spans a daylight-saving
// change is an hour shorter or longer and no hour of alerts is lost or doubled.
#include <cstddef>
#include <cstdint>
#include <string>
#include <vector>

#include "models/time.hpp"

namespace tocsin {

struct ShiftPattern {
    // Local start times, minutes after midnight, ascending; e.g. {420, 1140} for 07:00 and 19:00.
    std::vector<int> start_minutes;
    std::vector<std::string> names;  // one per start, e.g. "day", "night"
    std::vector<bool> is_night;      // one per start
};

struct Shift {
    Instant start = 0;
    Instant end = 0;
    int pattern_index = 0;         // which of the daily starts
    std::int64_t local_day = 0;    // days since 1970-01-01 of the local date the shift starts on
    int weekday = 0;               // 0 = Monday ... 6 = Sunday, of local_day
};

class ShiftCalendar {
public:
    ShiftCalendar() = default;
    // Every shift that overlaps [from, to).
    ShiftCalendar(const ShiftPattern& pattern, const TimeZone& zone, Instant from, Instant to);

    const std::vector<Shift>& shifts() const { return shifts_; }
    const ShiftPattern& pattern() const { return pattern_; }
    std::size_t size() const { return shifts_.size(); }
    // Index of the shift containing t; t must lie within the calendar.
    std::size_t index_of(Instant t) const;
    bool contains(Instant t) const { return !shifts_.empty() && t >= shifts_.front().start && t < shifts_.back().end; }
    bool is_night(std::size_t index) const { return pattern_.is_night[shifts_[index].pattern_index]; }
    const std::string& name_of(std::size_t index) const { return pattern_.names[shifts_[index].pattern_index]; }

private:
    ShiftPattern pattern_;
    std::vector<Shift> shifts_;
};

}  // namespace tocsin
