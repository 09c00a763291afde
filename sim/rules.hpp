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
#include <cstdint>
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

// The rule's memory for one encounter and one plan, for channels whose
// evaluation instants are not the scores themselves (chart openings, handoff
// and review times). Feed it every score as it becomes available (`see`, in
// rule order), then ask at an evaluation instant whether the rule fires on the
// latest score seen. The page rule is this state evaluated at each score.
class RuleState {
public:
    RuleState(const Rule& rule, const RuleClock& clock) : rule_(&rule), clock_(clock) {}

    void see(const Score& score);
    bool has_seen() const { return seen_; }
    double latest() const { return latest_; }
    // Why the rule would fire at `at` on the latest score seen, or nothing; no side effects.
    std::optional<NoticeReason> would_fire(Instant at) const;
    // Records a firing at `at` (snooze, rise reference, re-arm and cap follow from it).
    void fired(Instant at, NoticeReason reason);
    std::optional<NoticeReason> fire_if_due(Instant at) {
        auto reason = would_fire(at);
        if (reason) fired(at, *reason);
        return reason;
    }

private:
    const Rule* rule_;
    RuleClock clock_;
    bool seen_ = false;
    double latest_ = 0.0;
    int run_ = 0;  // consecutive qualifying scores seen
    bool fired_before_ = false, armed_ = true;
    Instant last_fire_ = 0;
    double reference_ = 0.0;
    std::size_t cap_shift_ = SIZE_MAX;
    int fired_in_cap_shift_ = 0;
};

// Appends the notices this rule fires for one encounter, in time order.
void fire_page_rule(const Rule& rule, const RuleClock& clock, std::span<const Score> scores,
                    std::uint32_t encounter, std::uint32_t unit, std::uint32_t plan, Channel channel,
                    std::vector<Notice>& out);

}  // namespace tocsin
