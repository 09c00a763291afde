#include "sim/rules.hpp"

namespace tocsin {

bool in_quiet_hours(const Rule& rule, const TimeZone& zone, Instant at) {
    if (!rule.quiet_start_minute || !rule.quiet_end_minute) return false;
    const Instant local = zone.to_local_seconds(at);
    const int minute = static_cast<int>(((local % 86400) + 86400) % 86400 / 60);
    const int start = *rule.quiet_start_minute, end = *rule.quiet_end_minute;
    if (start <= end) return minute >= start && minute < end;
    return minute >= start || minute < end;
}

void fire_page_rule(const Rule& rule, const RuleClock& clock, std::span<const Score> scores,
                    std::uint32_t encounter, std::uint32_t unit, std::uint32_t plan, Channel channel,
                    std::vector<Notice>& out) {
    int run = 0;  // consecutive qualifying scores seen
    bool fired_before = false, armed = true;
    Instant last_fire = 0;
    double reference = 0.0;
    std::size_t cap_shift = SIZE_MAX;
    int fired_in_cap_shift = 0;
    for (const Score& s : scores) {
        run = s.value >= rule.threshold ? run + 1 : 0;
        if (rule.rearm_below && s.value < *rule.rearm_below) armed = true;
        if (run < rule.persistence) continue;

        NoticeReason reason;
        if (!fired_before) {
            reason = NoticeReason::first;
        } else if (armed && (!rule.snooze || s.available_at >= last_fire + *rule.snooze)) {
            reason = NoticeReason::repeat;
        } else if (rule.rise && s.value >= reference + *rule.rise) {
            reason = NoticeReason::rise;  // only when the rise is what lets it fire
        } else {
            continue;
        }
        if (clock.zone && in_quiet_hours(rule, *clock.zone, s.available_at)) continue;
        if (rule.max_per_shift) {
            const std::size_t shift = clock.shifts->index_of(s.available_at);
            if (shift != cap_shift) {
                cap_shift = shift;
                fired_in_cap_shift = 0;
            }
            if (fired_in_cap_shift >= *rule.max_per_shift) continue;
            ++fired_in_cap_shift;
        }
        out.push_back(Notice{s.available_at, s.value, encounter, unit, plan, reason, channel});
        fired_before = true;
        last_fire = s.available_at;
        reference = s.value;
        armed = !rule.rearm_below.has_value();
    }
}

}  // namespace tocsin
