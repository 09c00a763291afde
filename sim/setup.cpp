#include "sim/setup.hpp"

#include <algorithm>

namespace tocsin {

StaffModel staff_model(const SimulationSetup& setup, std::uint32_t unit_count) {
    StaffModel m;
    m.roles = setup.roles;
    m.escalation = setup.escalation;
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
