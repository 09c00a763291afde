#pragma once
// The alert rule: when a plan fires for one encounter. The rule sees one
// encounter's usable scores in rule order (Population guarantees the order
// and the exclusions) and decides at each evaluation instant.
//
// Semantics (pinned one clause per test in tests/test_rules.cpp):
// - qualifies: score >= threshold; persistence k: the last k seen scores all
//   qualify.
// - snooze: after a firing at t, no ordinary firing before t + snooze.
// - rise: a score that meets persistence and is >= (score at the last firing)
//   + rise fires at once, overriding snooze and re-arm; it becomes the new
//   reference.
// - re-arm: after any firing the rule is disarmed until a seen score < re-arm
//   level (the score that re-arms is seen before the firing decision, so it
//   cannot itself fire because re-arm level <= threshold).
// - cap: at most M firings per encounter per shift (the shift containing the
//   firing instant), rises included.
// - quiet hours [start, end) local time: nothing fires; nothing is held back
//   for later.
// - reason: "first" for the encounter's first firing, then "repeat" when snooze
//   and re-arm allow it, else "rise" when only the rise override lets it fire.
#include <optional>
#include <span>
#include <vector>

#include "models/population.hpp"
#include "models/time.hpp"
#include "sim/notice.hpp"
#include "sim/shifts.hpp"

namespace tocsin {

struct Rule {
    double threshold = 0.0;
    int persistence = 1;
    std::optional<Seconds> snooze;          // none: every qualifying score fires
    std::optional<double> rise;             // none: no rise override
    std::optional<double> rearm_below;      // none: always armed
    std::optional<int> max_per_shift;       // none: no cap
    std::optional<int> quiet_start_minute;  // local minutes after midnight; both or neither
    std::optional<int> quiet_end_minute;
};

// Context a rule needs besides the scores: the wall clock for quiet hours and
// the shift calendar for caps.
struct RuleClock {
    const TimeZone* zone = nullptr;
    const ShiftCalendar* shifts = nullptr;
};

// True when the local time of `at` is in [start, end), wrapping midnight when start > end.
bool in_quiet_hours(const Rule& rule, const TimeZone& zone, Instant at);

// Appends the notices this rule fires for one encounter, in time order.
void fire_page_rule(const Rule& rule, const RuleClock& clock, std::span<const Score> scores,
                    std::uint32_t encounter, std::uint32_t unit, std::uint32_t plan, Channel channel,
                    std::vector<Notice>& out);

}  // namespace tocsin
