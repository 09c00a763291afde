#include "sim/setup.hpp"

#include <algorithm>

namespace tocsin {

StaffModel staff_model(const SimulationSetup& setup, const Plan& plan, std::uint32_t unit_count) {
    StaffModel m;
    m.roles = setup.roles;
    m.escalation = plan.escalation ? *plan.escalation : setup.escalation;
    if (plan.roster && plan.staffing.first_role < m.roles.size()) m.roles[plan.staffing.first_role].roster = *plan.roster;
    m.unit_count = std::max<std::uint32_t>(1, unit_count);
    return m;
}

Rule channel_rule(const Plan& plan) {
    if (plan.channel != Channel::ranked_review) return plan.rule;
    Rule rule = plan.rule;
    rule.snooze = plan.review.skip_reviewed;
    return rule;
}

}  // namespace tocsin
