#include <algorithm>
#include <cmath>

#include "study/scenario_load.hpp"

// roles[] (team, roster, minutes per task) and escalation[].

namespace tocsin::scenario_load {

namespace {

// Headcount by shift name, e.g. {day: 2, night: 1}: every shift, nothing else.
std::vector<int> parse_roster_row(const YAML::Node& node, const ShiftPattern& shifts, const std::string& file,
                                  const std::string& field) {
    if (!node.IsMap())
        throw yaml_error(file, node, field, "expected headcount by shift name, e.g. {" + shifts.names.front() + ": 2}");
    std::vector<int> row(shifts.names.size(), -1);
    for (auto it = node.begin(); it != node.end(); ++it) {
        const std::string name = it->first.as<std::string>();
        const auto at = std::find(shifts.names.begin(), shifts.names.end(), name);
        if (at == shifts.names.end())
            throw yaml_error(file, it->first, field + "." + name,
                             "unknown shift '" + name + "' (declared shifts: " + joined(shifts.names) + ")");
        long long n = -1;
        if (!it->second.IsScalar() || !YAML::convert<long long>::decode(it->second, n) || n < 0 || n > 100000)
            throw yaml_error(file, it->second, field + "." + name, "expected a headcount, a whole number from 0 to 100000");
        row[static_cast<std::size_t>(at - shifts.names.begin())] = static_cast<int>(n);
    }
    for (std::size_t k = 0; k < row.size(); ++k)
        if (row[k] < 0)
            throw yaml_error(file, node, field, "no headcount for shift '" + shifts.names[k] + "'; give every shift");
    return row;
}

ServiceTime parse_minutes(const Section& s) {
    const std::string d = s.text("distribution");
    // The keys each distribution takes; any other given key is a mistake.
    const std::vector<std::pair<std::string, std::vector<std::string_view>>> takes = {
        {"fixed", {"minutes"}},     {"exponential", {"mean"}},        {"gamma", {"mean", "sd"}},
        {"lognormal", {"median", "spread"}}, {"empirical", {"values"}}};
    const auto kind = std::find_if(takes.begin(), takes.end(), [&](const auto& t) { return t.first == d; });
    if (kind == takes.end())
        s.fail("distribution", "unknown distribution '" + d + "' (expected fixed, exponential, gamma, lognormal or empirical)");
    std::string wanted;
    for (std::string_view k : kind->second) wanted += (wanted.empty() ? "" : ", ") + std::string(k);
    constexpr std::string_view parameter_keys[] = {"minutes", "mean", "sd", "median", "spread", "values"};
    for (std::string_view key : parameter_keys)  // a misplaced key first: it often explains a missing one
        if (s.has(key) && std::find(kind->second.begin(), kind->second.end(), key) == kind->second.end())
            s.fail(key, "'" + std::string(key) + "' is not used by the " + d + " distribution (it takes: " + wanted + ")");
    for (std::string_view key : kind->second)
        if (!s.has(key)) s.fail("distribution", "the " + d + " distribution needs: " + wanted);
    ServiceTime out;
    if (d == "fixed") out = FixedMinutes{*s.optional_real("minutes")};
    else if (d == "exponential") out = ExponentialMinutes{*s.optional_real("mean")};
    else if (d == "gamma") out = GammaMinutes{*s.optional_real("mean"), *s.optional_real("sd")};
    else if (d == "lognormal") out = LognormalMinutes{*s.optional_real("median"), *s.optional_real("spread")};
    else out = EmpiricalMinutes{s.real_list("values")};
    if (std::string problem = service_time_problem(out); !problem.empty()) s.fail("distribution", problem);
    return out;
}

// Headcount by shift for every weekday, from roster_by_weekday (days not
// listed keep the roster).
std::vector<std::vector<int>> parse_weekdays(const Section& s, const std::vector<int>& roster, const ShiftPattern& shifts,
                                             const std::string& where) {
    const YAML::Node days = s.child("roster_by_weekday");
    std::vector<std::vector<int>> by_weekday(7, roster);
    for (auto it = days.begin(); it != days.end(); ++it) {
        const std::string day = it->first.as<std::string>();
        const auto at = std::find(std::begin(weekday_names), std::end(weekday_names), day);
        if (at == std::end(weekday_names))
            throw yaml_error(s.file(), it->first, where + ".roster_by_weekday." + day,
                             "unknown weekday '" + day + "' (expected monday ... sunday, lower case)");
        by_weekday[static_cast<std::size_t>(at - std::begin(weekday_names))] =
            parse_roster_row(it->second, shifts, s.file(), where + ".roster_by_weekday." + day);
    }
    return by_weekday;
}

// roles[].other_work[]: classes of work no score raised, by name, rate, minutes and priority.
std::vector<OtherWorkClass> load_other_work(const Section& role, const std::string& where) {
    std::vector<OtherWorkClass> out;
    std::size_t i = 0;
    for (const auto& node : role.child("other_work")) {
        const std::string at = where + ".other_work[" + std::to_string(i++) + "]";
        Section s(node, "roles[].other_work[]", role.file(), at);
        OtherWorkClass w;
        w.name = s.text("name");
        if (w.name.empty()) s.fail("name", "the name of other work is empty");
        for (const OtherWorkClass& other : out)
            if (other.name == w.name) s.fail("name", "two classes of this role's other work are named '" + w.name + "'");
        w.per_hour = hourly_rates(s, "per_hour", "tasks per team per hour");
        w.minutes = parse_minutes(Section(s.child("minutes"), "roles[].minutes", role.file(), at + ".minutes"));
        const std::string priority = s.text("priority");
        if (priority == "above") w.priority = OtherWorkPriority::above_alerts;
        else if (priority == "equal") w.priority = OtherWorkPriority::with_alerts;
        else if (priority == "below") w.priority = OtherWorkPriority::below_alerts;
        else s.fail("priority", "unknown priority '" + priority + "' (expected above, equal or below)");
        out.push_back(std::move(w));
    }
    return out;
}

}  // namespace

std::vector<Role> load_roles(const Section& top, const ShiftPattern& shifts) {
    const std::string& file = top.file();
    std::vector<Role> roles;
    std::size_t i = 0;
    for (const auto& node : top.child("roles")) {
        const std::string where = "roles[" + std::to_string(i++) + "]";
        Section s(node, "roles[]", file, where);
        Role r;
        r.name = s.text("name");
        if (r.name.empty()) s.fail("name", "role name is empty");
        for (const Role& other : roles)
            if (other.name == r.name) s.fail("name", "two roles are named '" + r.name + "'");
        const std::string team = s.text("team");
        if (team != "hospital" && team != "each_unit")
            s.fail("team", "unknown team '" + team + "' (expected hospital or each_unit)");
        r.per_unit = team == "each_unit";
        r.roster.by_shift = parse_roster_row(s.child("roster"), shifts, file, where + ".roster");
        if (s.has("roster_by_weekday")) r.roster.by_weekday = parse_weekdays(s, r.roster.by_shift, shifts, where);
        r.minutes_per_task = parse_minutes(Section(s.child("minutes"), "roles[].minutes", file, where + ".minutes"));
        r.other_work = load_other_work(s, where);
        roles.push_back(std::move(r));
    }
    if (roles.empty()) top.fail("roles", "the roles list is empty; leave it out for no staff model");
    return roles;
}

namespace {

// The edges of an escalation list (escalation[] or a plan's own), checked
// against `roles` as the tasks will find them; a problem points at the first
// offending edge and names every one.
EscalationGraph escalation_from(const YAML::Node& list, const std::string& file, const std::string& where,
                                const std::vector<Role>& roles) {
    std::vector<std::string> names;
    for (const Role& r : roles) names.push_back(r.name);
    std::vector<EscalationEdge> edges;
    std::vector<YAML::Node> nodes;
    std::size_t i = 0;
    for (const auto& node : list) {
        Section s(node, "escalation[]", file, where + "[" + std::to_string(i++) + "]");
        edges.push_back({s.text("from"), s.text("to"), s.real("after_minutes")});
        nodes.push_back(node);
    }
    const auto problems = escalation_problems(names, edges, roles_ever_staffed(roles));
    if (!problems.empty()) {
        std::string message = problems.front().message;
        for (std::size_t k = 1; k < problems.size(); ++k) message += "; also: " + problems[k].message;
        throw yaml_error(file, nodes[problems.front().edges.front()], where, message);
    }
    return build_escalation_graph(names, edges, roles_ever_staffed(roles));
}

}  // namespace

EscalationGraph load_escalation(const Section& top, const std::vector<Role>& roles) {
    if (top.has("escalation") && roles.empty()) top.fail("escalation", "escalation needs roles; declare the roles first");
    return escalation_from(top.child("escalation"), top.file(), "escalation", roles);
}

void load_plan_staffing(const Section& s, Plan& p, const SimulationSetup& setup, const std::string& where) {
    for (const char* key : {"escalation", "roster"})
        if (s.has(key) && !setup.has_staff())
            s.fail(key, std::string("a plan's own ") + key + " needs roles; declare the roles that answer notices");
    if (!setup.has_staff()) return;
    std::vector<Role> roles = setup.roles;  // as this plan's tasks find them
    if (s.has("roster")) {
        p.roster = Roster{parse_roster_row(s.child("roster"), setup.shifts, s.file(), where + ".roster"), {}};
        roles[p.staffing.first_role].roster = *p.roster;
    }
    if (s.has("escalation")) p.escalation = escalation_from(s.child("escalation"), s.file(), where + ".escalation", roles);
    if (!p.roster && !p.escalation) return;
    // The path this plan's tasks follow must still end where somebody is on duty.
    const EscalationPath path = escalation_path(p.escalation ? *p.escalation : setup.escalation, p.staffing.first_role);
    if (!roles_ever_staffed(roles)[path.roles.back()])
        s.fail(p.roster ? "roster" : "escalation",
               "nobody is on duty on any shift at '" + roles[path.roles.back()].name +
                   "', where this plan's tasks end up waiting; give it a headcount or an escalation edge onwards");
}

}  // namespace tocsin::scenario_load
