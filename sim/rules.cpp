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

void RuleState::see(const Score& s) {
    seen_ = true;
    latest_ = s.value;
    run_ = s.value >= rule_->threshold ? run_ + 1 : 0;
    if (rule_->rearm_below && s.value < *rule_->rearm_below) armed_ = true;
}

std::optional<NoticeReason> RuleState::would_fire(Instant at) const {
    if (!seen_ || run_ < rule_->persistence) return std::nullopt;
    NoticeReason reason;
    if (!fired_before_) {
        reason = NoticeReason::first;
    } else if (armed_ && (!rule_->snooze || at >= last_fire_ + *rule_->snooze)) {
        reason = NoticeReason::repeat;
    } else if (rule_->rise && latest_ >= reference_ + *rule_->rise) {
        reason = NoticeReason::rise;  // only when the rise is what lets it fire
    } else {
        return std::nullopt;
    }
    if (clock_.zone && in_quiet_hours(*rule_, *clock_.zone, at)) return std::nullopt;
    if (rule_->max_per_shift && clock_.shifts->index_of(at) == cap_shift_ &&
        fired_in_cap_shift_ >= *rule_->max_per_shift)
        return std::nullopt;
    return reason;
}

void RuleState::fired(Instant at, NoticeReason) {
    if (rule_->max_per_shift) {
        const std::size_t shift = clock_.shifts->index_of(at);
        if (shift != cap_shift_) {
            cap_shift_ = shift;
            fired_in_cap_shift_ = 0;
        }
        ++fired_in_cap_shift_;
    }
    fired_before_ = true;
    last_fire_ = at;
    reference_ = latest_;
    armed_ = !rule_->rearm_below.has_value();
}

void fire_page_rule(const Rule& rule, const RuleClock& clock, std::span<const Score> scores,
                    std::uint32_t encounter, std::uint32_t unit, std::uint32_t plan, Channel channel,
                    std::vector<Notice>& out) {
    RuleState state(rule, clock);
    const NoticeOrigin origin{encounter, unit, plan, channel};
    for (const Score& s : scores) {
        state.see(s);
        if (auto reason = state.fire_if_due(s.available_at))
            out.push_back(make_notice(origin, s.available_at, s.value, *reason));
    }
}

}  // namespace tocsin
