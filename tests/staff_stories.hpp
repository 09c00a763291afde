#pragma once
// Small fixtures shared by the staff, escalation and queueing tests: a
// day/night pattern on UTC so that every time in a story reads as written.
#include <string>
#include <vector>

#include "models/time.hpp"
#include "sim/notice.hpp"
#include "sim/shifts.hpp"
#include "sim/staff.hpp"

namespace tocsin::test {

// 2026-03-02 is a Monday.
inline Instant march(int day, int hour, int minute) {
    return days_from_civil(2026, 3, day) * 86400 + hours(hour) + minutes(minute);
}

inline ShiftPattern day_night() { return ShiftPattern{{7 * 60, 19 * 60}, {"day", "night"}, {false, true}}; }

inline ShiftCalendar calendar_from(Instant from, Instant to) {
    return ShiftCalendar(day_night(), TimeZone::utc(), from, to);
}

inline Notice notice_at(Instant at, double score = 0.5, std::uint32_t unit = 0, std::uint32_t encounter = 0) {
    return make_notice(NoticeOrigin{encounter, unit, 0, Channel::page}, at, score, NoticeReason::first);
}

inline Role role(std::string name, std::vector<int> by_shift, ServiceTime minutes, bool per_unit = false) {
    Role r;
    r.name = std::move(name);
    r.per_unit = per_unit;
    r.roster.by_shift = std::move(by_shift);
    r.minutes_per_task = std::move(minutes);
    return r;
}

// A model whose escalation graph is built from `edges` over the roles' names.
inline StaffModel model_of(std::vector<Role> roles, std::vector<EscalationEdge> edges = {}, std::uint32_t units = 1) {
    StaffModel m;
    m.roles = std::move(roles);
    std::vector<std::string> names;
    for (const Role& r : m.roles) names.push_back(r.name);
    m.escalation = build_escalation_graph(names, edges, roles_ever_staffed(m.roles));
    m.unit_count = units;
    return m;
}

}  // namespace tocsin::test
