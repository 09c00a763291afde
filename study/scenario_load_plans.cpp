#include <algorithm>
#include <cmath>
#include <limits>
#include <set>
#include <sstream>

#include "study/scenario_load.hpp"

// plans[] with their rules and channels, and the chart_openings they are asked at.

namespace tocsin::scenario_load {

namespace {

std::string number_text(double v) {
    std::ostringstream o;
    o << v;
    return o.str();
}

Rule parse_rule(const Section& s, Channel channel) {
    Rule r;
    const bool review = channel == Channel::ranked_review;
    if (s.has("threshold")) r.threshold = *s.optional_real("threshold");
    else if (review) r.threshold = -std::numeric_limits<double>::infinity();  // no floor
    else s.fail("threshold", "required key 'threshold' is missing (a score qualifies when >= threshold)");
    r.persistence = static_cast<int>(s.integer("persistence"));
    if (auto v = s.optional_real("snooze_minutes")) r.snooze = seconds_from_minutes(*v);
    r.rise = s.optional_real("rise");
    r.rearm_below = s.optional_real("rearm_below");
    if (r.rearm_below && *r.rearm_below > r.threshold)
        s.fail("rearm_below", "re-arm level must be at or below the threshold (" + std::to_string(r.threshold) +
                                  "), or the rule could never be silent between firings");
    if (auto v = s.optional_integer("max_per_shift")) r.max_per_shift = static_cast<int>(*v);
    r.quiet_start_minute = s.clock("quiet_from");
    r.quiet_end_minute = s.clock("quiet_until");
    if (r.quiet_start_minute.has_value() != r.quiet_end_minute.has_value())
        s.fail(r.quiet_start_minute ? "quiet_from" : "quiet_until", "quiet hours need both quiet_from and quiet_until");
    if (r.quiet_start_minute && *r.quiet_start_minute == *r.quiet_end_minute)
        s.fail("quiet_until", "quiet_from and quiet_until are equal; leave both out for no quiet hours");
    // Clauses that make no sense for a channel whose instants are few and fixed.
    const char* quiet_key = s.has("quiet_from") ? "quiet_from" : "quiet_until";
    if (channel == Channel::handoff_list) {
        if (r.max_per_shift)
            s.fail("max_per_shift", "a handoff list flags a patient at most once per handoff, so a per-shift cap does "
                                    "not apply; keep a patient off the next lists with snooze_minutes instead");
        if (r.quiet_start_minute)
            s.fail(quiet_key, "a handoff list is read only at its handoff times, so quiet hours do not apply; leave "
                              "a time out of handoff.times instead");
    }
    if (channel == Channel::score_lookup && r.quiet_start_minute)
        s.fail(quiet_key, "a look-up interrupts nobody, so quiet hours do not apply; give a lower "
                          "lookup.probability for those hours instead");
    if (review) {
        if (r.snooze)
            s.fail("snooze_minutes", "a ranked review skips recently reviewed patients with review.skip_reviewed_hours, "
                                     "not snooze_minutes");
        if (r.max_per_shift)
            s.fail("max_per_shift", "a patient is reviewed at most once per round, so a per-shift cap does not apply; "
                                    "cap the team's work with review.max_reviews_per_round");
        if (r.quiet_start_minute)
            s.fail(quiet_key, "a ranked review happens only at its review.times, so quiet hours do not apply; choose "
                              "the review times instead");
    }
    return r;
}

Channel parse_channel(const Section& s) {
    const std::string c = s.text("channel");
    for (Channel k : {Channel::page, Channel::chart_interruption, Channel::handoff_list, Channel::ranked_review,
                      Channel::score_lookup})
        if (c == to_string(k)) return k;
    s.fail("channel", "unknown channel '" + c +
                          "' (expected: page, chart_interruption, handoff_list, ranked_review or score_lookup)");
}

std::vector<int> clock_list(const Section& s, std::string_view key) {
    std::vector<int> out;
    if (!s.has(key)) return out;
    for (const auto& item : s.child(key)) {
        std::optional<int> m;
        if (item.IsScalar()) m = parse_clock_minutes(item.Scalar());
        if (!m) throw s.error(item, key, "expected a list of local times of day as \"HH:MM\" (quoted)");
        if (std::find(out.begin(), out.end(), *m) != out.end()) throw s.error(item, key, "the same time appears twice");
        out.push_back(*m);
    }
    std::sort(out.begin(), out.end());
    if (out.empty()) s.fail(key, "at least one time is needed");
    return out;
}

// The channel's own section: required for its channel, rejected for others.
void check_channel_sections(const Section& s, Channel channel) {
    struct Own { const char* key; Channel channel; };
    for (Own own : {Own{"chart", Channel::chart_interruption}, Own{"handoff", Channel::handoff_list},
                    Own{"review", Channel::ranked_review}, Own{"lookup", Channel::score_lookup}}) {
        if (own.channel == channel && !s.has(own.key))
            s.fail("channel", "a " + std::string(to_string(own.channel)) + " plan needs a '" + own.key +
                                  "' section (see plans[]." + own.key + ")");
        if (own.channel != channel && s.has(own.key))
            s.fail(own.key, "a '" + std::string(own.key) + "' section applies only to channel " +
                                std::string(to_string(own.channel)) + ", not " + std::string(to_string(channel)));
    }
}

// The chart-opening role a chart interruption or look-up plan is limited to, when it names one.
void parse_opening_role(const Section& s, Plan& p, const Scenario& sc) {
    if (!sc.simulation.chart_openings)
        s.fail("channel", "a " + std::string(to_string(p.channel)) +
                              " plan needs the top-level chart_openings section (when charts are opened)");
    if (s.has("role")) {
        const auto& roles = sc.simulation.chart_openings->roles;
        std::size_t r = 0;
        while (r < roles.size() && roles[r].name != p.role) ++r;
        if (r == roles.size())
            s.fail("role", "a " + std::string(to_string(p.channel)) + " happens when a clinician opens the chart: "
                           "role must be one of the chart_openings roles, or left out for every role");
        p.chart.role = static_cast<std::uint8_t>(r);
    }
}

void parse_chart(const Section& s, Plan& p, const Scenario& sc, const std::string& where) {
    Section c(s.child("chart"), "plans[].chart", s.file(), where + ".chart");
    parse_opening_role(s, p, sc);
    p.chart.interruption_minutes = c.real("interruption_minutes");
    p.chart.acceptance_probability = c.real("acceptance_probability");
}

void parse_lookup(const Section& s, Plan& p, const Scenario& sc, const std::string& where) {
    Section c(s.child("lookup"), "plans[].lookup", s.file(), where + ".lookup");
    parse_opening_role(s, p, sc);
    p.chart.interruption_minutes = c.real("minutes_per_lookup");
    p.chart.lookup_probability = hourly_rates(c, "probability", "(a probability)");
}

void parse_handoff(const Section& s, Plan& p, const std::string& where) {
    Section h(s.child("handoff"), "plans[].handoff", s.file(), where + ".handoff");
    p.handoff.times_minutes = clock_list(h, "times");
    p.handoff.minutes_per_flag = h.real("minutes_per_flag");
    p.handoff.follow_up_probability = h.real("follow_up_probability");
}

// The team's capacity per round: given, or from staffing (team_size x
// team_minutes_per_round / minutes_per_review, rounded down); none when neither.
std::optional<int> review_capacity(const Section& r, double minutes_per_review) {
    const bool by_max = r.has("max_reviews_per_round");
    const bool by_team = r.has("team_size") || r.has("team_minutes_per_round");
    if (by_max && by_team)
        r.fail("max_reviews_per_round", "give the team's capacity either as max_reviews_per_round or as team_size "
                                        "with team_minutes_per_round, not both");
    if (by_max) return static_cast<int>(*r.optional_integer("max_reviews_per_round"));
    if (!by_team) return std::nullopt;
    if (!r.has("team_size") || !r.has("team_minutes_per_round"))
        r.fail(r.has("team_size") ? "team_size" : "team_minutes_per_round",
               "team capacity needs both team_size and team_minutes_per_round");
    if (!(minutes_per_review > 0))
        r.fail("minutes_per_review", "a capacity in team minutes needs minutes_per_review above 0");
    const double reviews = static_cast<double>(*r.optional_integer("team_size")) *
                           *r.optional_real("team_minutes_per_round") / minutes_per_review;
    return static_cast<int>(std::floor(reviews + 1e-9));
}

void parse_review(const Section& s, Plan& p, const std::string& where) {
    Section r(s.child("review"), "plans[].review", s.file(), where + ".review");
    p.review.times_minutes = clock_list(r, "times");
    p.review.top_n = static_cast<int>(r.integer("top_n"));
    const std::string scope = r.text("scope");
    if (scope == "unit") p.review.scope = ReviewScope::unit;
    else if (scope == "hospital") p.review.scope = ReviewScope::hospital;
    else r.fail("scope", "unknown scope '" + scope + "' (expected: unit or hospital)");
    if (auto h = r.optional_real("skip_reviewed_hours")) p.review.skip_reviewed = static_cast<Seconds>(std::llround(*h * 3600));
    p.review.minutes_per_review = r.real("minutes_per_review");
    p.review.max_reviews_per_round = review_capacity(r, p.review.minutes_per_review);
    // One capacity model: the review team declared here does the reviews; the
    // roles' queues, escalation, rosters and task minutes do not apply to them.
    for (const char* key : {"queue", "at_shift_end", "escalation", "roster"})
        if (s.has(key))
            s.fail(key, "a ranked review is done by its review team at review.minutes_per_review each, within "
                        "review.max_reviews_per_round (or team_size and team_minutes_per_round); the roles' queues, "
                        "escalation and rosters do not apply, so leave " + std::string(key) + " out");
}

void parse_channel_settings(const Section& s, Plan& p, const Scenario& sc, const std::string& where) {
    check_channel_sections(s, p.channel);
    if (p.channel == Channel::chart_interruption) parse_chart(s, p, sc, where);
    else if (p.channel == Channel::score_lookup) parse_lookup(s, p, sc, where);
    else if (p.channel == Channel::handoff_list) parse_handoff(s, p, where);
    else if (p.channel == Channel::ranked_review) parse_review(s, p, where);
}

// Response that falls with load (sim/fatigue.hpp): a page states its own base
// response; a chart interruption starts from its acceptance probability.
void parse_fatigue(const Section& s, Plan& p, const std::string& where) {
    if (!s.has("fatigue")) return;
    Section f(s.child("fatigue"), "plans[].fatigue", s.file(), where + ".fatigue");
    if (p.channel != Channel::page && p.channel != Channel::chart_interruption)
        s.fail("fatigue", "fatigue applies to pages and chart interruptions; a " + std::string(to_string(p.channel)) +
                              " plan's notices are not answered one by one by the team that received them");
    FatigueEffect e;
    if (p.channel == Channel::page) {
        if (!f.has("base_response"))
            f.fail("base_response", "required for a page: the probability that a page leads to an evaluation when "
                                    "nothing came before it (below 1, or no factor can lower it)");
        e.base_response = f.real("base_response");
    } else if (f.has("base_response")) {
        f.fail("base_response", "a chart interruption starts from chart.acceptance_probability; leave base_response out");
    }
    e.repeat_odds_ratio = f.real("repeat_odds_ratio");
    e.recent_odds_ratio = f.real("recent_odds_ratio");
    e.window = static_cast<Seconds>(std::llround(f.real("window_hours") * 3600.0));
    const double base = p.channel == Channel::page ? e.base_response : p.chart.acceptance_probability;
    if (base >= 1.0 && (e.repeat_odds_ratio != 1.0 || e.recent_odds_ratio != 1.0))
        f.fail(p.channel == Channel::page ? "base_response" : "repeat_odds_ratio",
               "a base probability of 1 has infinite odds, which no odds ratio lowers: declare a base below 1 "
               "(for a chart interruption, chart.acceptance_probability)");
    p.fatigue = e;
}

// Who answers, in what order and what happens at shift end.
void parse_staffing(const Section& s, Plan& p, const SimulationSetup& setup) {
    if (setup.has_staff()) {
        std::vector<std::string> names;
        for (const Role& r : setup.roles) names.push_back(r.name);
        const auto at = std::find(names.begin(), names.end(), p.role);
        if (at == names.end()) {
            std::string best = names.front();
            for (const std::string& n : names)
                if (edit_distance(p.role, n) < edit_distance(p.role, best)) best = n;
            s.fail("role", "unknown role '" + p.role + "'; did you mean '" + best + "'? (declared roles: " +
                               joined(names) + ")");
        }
        p.staffing.first_role = static_cast<std::uint32_t>(at - names.begin());
    }
    const std::string queue = s.text("queue");
    if (queue == "priority") p.staffing.discipline = QueueDiscipline::priority_by_score;
    else if (queue != "fifo") s.fail("queue", "unknown queue '" + queue + "' (expected fifo or priority)");
    const std::string at_end = s.text("at_shift_end");
    if (at_end == "drop") p.staffing.at_shift_end = ShiftEndPolicy::drop;
    else if (at_end != "hand_over")
        s.fail("at_shift_end", "unknown policy '" + at_end + "' (expected hand_over or drop)");
    if (!setup.has_staff() && (s.has("queue") || s.has("at_shift_end")))
        s.fail(s.has("queue") ? "queue" : "at_shift_end", "needs roles; declare the roles that answer notices");
}

Plan parse_plan(const Section& s, const Scenario& sc, const std::string& where) {
    Plan p;
    p.name = s.text("name");
    if (p.name.empty()) s.fail("name", "plan name is empty");
    p.description = s.text("description");
    if (s.has("score")) {
        const std::string name = s.text("score");
        std::string known = sc.score_name;
        if (name != sc.score_name) {
            std::size_t k = 0;
            while (k < sc.other_scores.size() && sc.other_scores[k].name != name) known += ", " + sc.other_scores[k++].name;
            if (k == sc.other_scores.size())
                s.fail("score", "unknown score '" + name + "' (the scenario's scores: " + known + ")");
            p.score = k + 1;
        }
    }
    p.channel = parse_channel(s);
    // A chart interruption goes to whoever opens the chart unless a role is named.
    const bool at_openings = p.channel == Channel::chart_interruption || p.channel == Channel::score_lookup;
    p.role = at_openings && !s.has("role") ? "whoever opens the chart" : s.text("role");
    parse_staffing(s, p, sc.simulation);
    load_plan_staffing(s, p, sc.simulation, where);
    if (s.has("rule"))
        p.rule = parse_rule(Section(s.child("rule"), "plans[].rule", s.file(), where + ".rule"), p.channel);
    else if (p.channel == Channel::ranked_review)
        p.rule.threshold = -std::numeric_limits<double>::infinity();  // no floor
    else
        s.fail("rule", "required key 'rule' is missing (when the plan fires)");
    parse_channel_settings(s, p, sc, where);
    parse_fatigue(s, p, where);
    return p;
}

}  // namespace

ChartOpeningSource load_chart_openings(const Section& s, const std::string& directory) {
    ChartOpeningSource src;
    if (s.has("replay")) src.replay_path = resolve(directory, s.text("replay"));
    std::size_t i = 0;
    for (const auto& node : s.child("roles")) {
        Section r(node, "chart_openings.roles[]", s.file(), "chart_openings.roles[" + std::to_string(i++) + "]");
        ChartOpeningRole role;
        role.name = r.text("name");
        if (role.name.empty()) r.fail("name", "role name is empty");
        for (const auto& other : src.roles)
            if (other.name == role.name) r.fail("name", "two chart-opening roles are named '" + role.name + "'");
        role.clinicians_per_unit = r.real("clinicians_per_unit");
        if (!r.has("openings_per_hour") && src.replay_path.empty())
            r.fail("openings_per_hour", "generated chart openings need a rate for each role (or give chart_openings.replay)");
        if (r.has("openings_per_hour"))
            role.openings_per_hour = hourly_rates(r, "openings_per_hour", "openings per patient per hour");
        src.roles.push_back(std::move(role));
    }
    if (src.roles.empty()) s.fail("roles", "at least one role is needed");
    if (src.roles.size() > 255) s.fail("roles", "at most 255 chart-opening roles");
    return src;
}



std::vector<Plan> load_plans(const Section& top, const Scenario& sc) {
    std::vector<Plan> plans;
    std::set<std::string> names;
    std::size_t i = 0;
    for (const auto& node : top.child("plans")) {
        const std::string where = "plans[" + std::to_string(i++) + "]";
        Section s(node, "plans[]", top.file(), where);
        if (!names.insert(s.text("name")).second) s.fail("name", "two plans are named '" + s.text("name") + "'");
        plans.push_back(parse_plan(s, sc, where));
    }
    if (plans.empty()) top.fail("plans", "at least one plan is needed");
    return plans;
}

std::array<double, 24> hourly_rates(const Section& s, std::string_view key, const std::string& unit) {
    const std::vector<double> rates = s.real_list(key);
    if (rates.size() != 1 && rates.size() != 24)
        s.fail(key, "expected one rate (all day) or 24 rates (hour 00 first), found " + std::to_string(rates.size()));
    const Range& range = s.spec(key).range;
    for (double v : rates)
        if (!std::isfinite(v) || v < *range.min || v > *range.max)
            s.fail(key, "rates must be between " + number_text(*range.min) + " and " + number_text(*range.max) + " " +
                            unit);
    std::array<double, 24> out{};
    for (std::size_t h = 0; h < 24; ++h) out[h] = rates.size() == 1 ? rates[0] : rates[h];
    return out;
}

}  // namespace tocsin::scenario_load
