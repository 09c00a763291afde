#include "study/scenario.hpp"

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <limits>
#include <numeric>
#include <set>
#include <sstream>

#include "models/errors.hpp"
#include "study/scenario_keys.hpp"

namespace tocsin {

namespace {

Seconds seconds_from_minutes(double m) { return static_cast<Seconds>(std::llround(m * 60.0)); }

std::string resolve(const std::string& directory, const std::string& path) {
    std::filesystem::path p(path);
    if (p.is_absolute() || directory.empty()) return path;
    return (std::filesystem::path(directory) / p).lexically_normal().string();
}

Rule parse_rule(const Section& s, Channel channel) {
    Rule r;
    const bool review = channel == Channel::ranked_review;
    if (s.has("threshold")) r.threshold = *s.optional_real("threshold");
    else if (review) r.threshold = -std::numeric_limits<double>::infinity();  // no floor
    else s.fail("threshold", "required key 'threshold' is missing (a score qualifies when >= threshold)");
    r.persistence = static_cast<int>(s.integer("persistence", 1));
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

constexpr const char* weekday_names[] = {"monday", "tuesday", "wednesday", "thursday", "friday", "saturday", "sunday"};

std::string joined(const std::vector<std::string>& names) {
    std::string out;
    for (const std::string& n : names) out += (out.empty() ? "" : ", ") + n;
    return out;
}

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

std::vector<Role> parse_roles(const Section& top, const ShiftPattern& shifts, const std::string& file) {
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
        const std::string team = s.text("team", "hospital");
        if (team != "hospital" && team != "each_unit")
            s.fail("team", "unknown team '" + team + "' (expected hospital or each_unit)");
        r.per_unit = team == "each_unit";
        r.roster.by_shift = parse_roster_row(s.child("roster"), shifts, file, where + ".roster");
        if (s.has("roster_by_weekday")) {
            const YAML::Node days = s.child("roster_by_weekday");
            r.roster.by_weekday.assign(7, r.roster.by_shift);
            for (auto it = days.begin(); it != days.end(); ++it) {
                const std::string day = it->first.as<std::string>();
                const auto at = std::find(std::begin(weekday_names), std::end(weekday_names), day);
                if (at == std::end(weekday_names))
                    throw yaml_error(file, it->first, where + ".roster_by_weekday." + day,
                                     "unknown weekday '" + day + "' (expected monday ... sunday, lower case)");
                r.roster.by_weekday[static_cast<std::size_t>(at - std::begin(weekday_names))] =
                    parse_roster_row(it->second, shifts, file, where + ".roster_by_weekday." + day);
            }
        }
        r.minutes_per_task = parse_minutes(Section(s.child("minutes"), "roles[].minutes", file, where + ".minutes"));
        roles.push_back(std::move(r));
    }
    if (roles.empty()) top.fail("roles", "the roles list is empty; leave it out for no staff model");
    return roles;
}

EscalationGraph parse_escalation(const Section& top, const std::vector<Role>& roles, const std::string& file) {
    std::vector<std::string> names;
    for (const Role& r : roles) names.push_back(r.name);
    std::vector<EscalationEdge> edges;
    std::vector<YAML::Node> nodes;
    if (top.has("escalation")) {
        if (roles.empty()) top.fail("escalation", "escalation needs roles; declare the roles first");
        std::size_t i = 0;
        for (const auto& node : top.child("escalation")) {
            Section s(node, "escalation[]", file, "escalation[" + std::to_string(i++) + "]");
            edges.push_back({s.text("from"), s.text("to"), *s.optional_real("after_minutes")});
            nodes.push_back(node);
        }
    }
    const auto problems = escalation_problems(names, edges, roles_ever_staffed(roles));
    if (!problems.empty()) {
        // Point at the first offending edge; the message names every one.
        std::string message = problems.front().message;
        for (std::size_t k = 1; k < problems.size(); ++k) message += "; also: " + problems[k].message;
        throw yaml_error(file, nodes[problems.front().edges.front()], "escalation", message);
    }
    return build_escalation_graph(names, edges, roles_ever_staffed(roles));
}

Channel parse_channel(const Section& s) {
    const std::string c = s.text("channel", "page");
    for (Channel k : {Channel::page, Channel::chart_interruption, Channel::handoff_list, Channel::ranked_review})
        if (c == to_string(k)) return k;
    s.fail("channel", "unknown channel '" + c + "' (expected: page, chart_interruption, handoff_list or ranked_review)");
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

ChartOpeningSource parse_chart_openings(const Section& s, const std::string& directory) {
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
        role.clinicians_per_unit = r.real("clinicians_per_unit", 1);
        const std::vector<double> rates = r.real_list("openings_per_hour");
        if (!r.has("openings_per_hour") && src.replay_path.empty())
            r.fail("openings_per_hour", "generated chart openings need a rate for each role (or give chart_openings.replay)");
        if (r.has("openings_per_hour")) {
            if (rates.size() != 1 && rates.size() != 24)
                r.fail("openings_per_hour", "expected one rate (all day) or 24 rates (hour 00 first), found " +
                                                std::to_string(rates.size()));
            for (double v : rates)
                if (!std::isfinite(v) || v < 0 || v > 1000)
                    r.fail("openings_per_hour", "rates must be between 0 and 1000 openings per patient per hour");
            for (std::size_t h = 0; h < 24; ++h) role.openings_per_hour[h] = rates.size() == 1 ? rates[0] : rates[h];
        }
        src.roles.push_back(std::move(role));
    }
    if (src.roles.empty()) s.fail("roles", "at least one role is needed");
    if (src.roles.size() > 255) s.fail("roles", "at most 255 chart-opening roles");
    return src;
}

// The channel's own section: required for its channel, rejected for others.
void parse_channel_settings(const Section& s, Plan& p, const Scenario& sc, const std::string& where) {
    struct Own { const char* key; Channel channel; };
    for (Own own : {Own{"chart", Channel::chart_interruption}, Own{"handoff", Channel::handoff_list},
                    Own{"review", Channel::ranked_review}}) {
        if (own.channel == p.channel && !s.has(own.key))
            s.fail("channel", "a " + std::string(to_string(own.channel)) + " plan needs a '" + own.key +
                                  "' section (see plans[]." + own.key + ")");
        if (own.channel != p.channel && s.has(own.key))
            s.fail(own.key, "a '" + std::string(own.key) + "' section applies only to channel " +
                                std::string(to_string(own.channel)) + ", not " + std::string(to_string(p.channel)));
    }
    if (p.channel == Channel::chart_interruption) {
        Section c(s.child("chart"), "plans[].chart", s.file(), where + ".chart");
        if (!sc.simulation.chart_openings)
            s.fail("channel", "a chart_interruption plan needs the top-level chart_openings section (when charts are opened)");
        p.chart.interruption_minutes = c.real("interruption_minutes", 0);
        p.chart.acceptance_probability = c.real("acceptance_probability", 1);
        if (s.has("role")) {
            const auto& roles = sc.simulation.chart_openings->roles;
            std::size_t r = 0;
            while (r < roles.size() && roles[r].name != p.role) ++r;
            if (r == roles.size())
                s.fail("role", "a chart interruption goes to whoever opens the chart: role must be one of the "
                               "chart_openings roles, or left out for every role");
            p.chart.role = static_cast<std::uint8_t>(r);
        }
    } else if (p.channel == Channel::handoff_list) {
        Section h(s.child("handoff"), "plans[].handoff", s.file(), where + ".handoff");
        p.handoff.times_minutes = clock_list(h, "times");
        p.handoff.minutes_per_flag = h.real("minutes_per_flag", 0);
        p.handoff.follow_up_probability = h.real("follow_up_probability", 1);
    } else if (p.channel == Channel::ranked_review) {
        Section r(s.child("review"), "plans[].review", s.file(), where + ".review");
        p.review.times_minutes = clock_list(r, "times");
        p.review.top_n = static_cast<int>(r.integer("top_n", 10));
        const std::string scope = r.text("scope", "unit");
        if (scope == "unit") p.review.scope = ReviewScope::unit;
        else if (scope == "hospital") p.review.scope = ReviewScope::hospital;
        else r.fail("scope", "unknown scope '" + scope + "' (expected: unit or hospital)");
        if (auto h = r.optional_real("skip_reviewed_hours")) p.review.skip_reviewed = static_cast<Seconds>(std::llround(*h * 3600));
        p.review.minutes_per_review = r.real("minutes_per_review", 0);
        const bool by_max = r.has("max_reviews_per_round");
        const bool by_team = r.has("team_size") || r.has("team_minutes_per_round");
        if (by_max && by_team)
            r.fail("max_reviews_per_round", "give the team's capacity either as max_reviews_per_round or as team_size "
                                            "with team_minutes_per_round, not both");
        if (by_max) p.review.max_reviews_per_round = static_cast<int>(*r.optional_integer("max_reviews_per_round"));
        if (by_team) {
            if (!r.has("team_size") || !r.has("team_minutes_per_round"))
                r.fail(r.has("team_size") ? "team_size" : "team_minutes_per_round",
                       "team capacity needs both team_size and team_minutes_per_round");
            if (!(p.review.minutes_per_review > 0))
                r.fail("minutes_per_review", "a capacity in team minutes needs minutes_per_review above 0");
            const double reviews = static_cast<double>(*r.optional_integer("team_size")) *
                                   *r.optional_real("team_minutes_per_round") / p.review.minutes_per_review;
            p.review.max_reviews_per_round = static_cast<int>(std::floor(reviews + 1e-9));
        }
    }
}

Instant timestamp(const Section& s, std::string_view key, const TimeZone& zone) {
    auto t = parse_timestamp(s.text(key), zone);
    if (!t) s.fail(key, "expected a timestamp such as 2026-03-01T07:00:00 (local) or 2026-03-01T06:00:00Z");
    return *t;
}

// 1 number (every hour), 24 (every day alike), 168, or 7 rows of 24.
WeeklyRate weekly_rate(const Section& s, std::string_view key) {
    const YAML::Node list = s.child(key);
    std::vector<double> flat;
    bool rows = list.size() == 7;
    for (const auto& item : list) rows = rows && item.IsSequence() && item.size() == 24;
    auto number = [&](const YAML::Node& item) {
        double d = 0;
        if (!item.IsScalar() || !YAML::convert<double>::decode(item, d) || d < 0)
            throw s.error(item, key, "expected a number of admissions per hour >= 0");
        if (!std::isfinite(d))
            throw s.error(item, key, "'" + item.Scalar() + "' is not a finite number (expected admissions per hour >= 0)");
        return d;
    };
    for (const auto& item : list) {
        if (rows) {
            for (const auto& cell : item) flat.push_back(number(cell));
        } else {
            flat.push_back(number(item));
        }
    }
    WeeklyRate rate{};
    if (flat.size() == 1) {
        rate.fill(flat[0]);
    } else if (flat.size() == 24) {
        for (int h = 0; h < hours_per_week; ++h) rate[static_cast<std::size_t>(h)] = flat[static_cast<std::size_t>(h % 24)];
    } else if (flat.size() == static_cast<std::size_t>(hours_per_week)) {
        std::copy(flat.begin(), flat.end(), rate.begin());
    } else {
        s.fail(key, "expected 1, 24 or 168 numbers, or 7 rows of 24; found " + std::to_string(flat.size()) + " numbers");
    }
    return rate;
}

ScoreScale score_scale(const Section& s, std::string_view key, ScoreScale fallback) {
    if (!s.has(key)) return fallback;
    const std::string v = s.text(key);
    if (v == "points") return ScoreScale::points;
    if (v == "probability") return ScoreScale::probability;
    s.fail(key, "unknown scale '" + v + "' (expected: points or probability)");
}

void parse_generator(const Section& g, Scenario& sc) {
    GeneratorConfig& c = sc.population.generator;
    c.zone = sc.simulation.zone;
    c.period_start = timestamp(g, "start", sc.simulation.zone);
    c.period_end = timestamp(g, "end", sc.simulation.zone);
    if (c.period_end <= c.period_start) g.fail("end", "the generated period ends before it starts");
    c.warmup_days = g.real("warmup_days", 14);
    std::size_t i = 0;
    for (const auto& node : g.child("units")) {
        Section u(node, "population.generate.units[]", g.file(), "population.generate.units[" + std::to_string(i++) + "]");
        UnitConfig unit;
        unit.name = u.text("name");
        if (unit.name.empty()) u.fail("name", "unit name is empty");
        for (const UnitConfig& other : c.units)
            if (other.name == unit.name) u.fail("name", "two units are named '" + unit.name + "'");
        unit.beds = static_cast<int>(u.integer("beds", 1));
        unit.arrivals_per_hour = weekly_rate(u, "arrivals_per_hour");
        c.units.push_back(std::move(unit));
    }
    if (c.units.empty()) g.fail("units", "at least one unit is needed");
    if (g.has("stay")) {
        Section s(g.child("stay"), "population.generate.stay", g.file(), "population.generate.stay");
        const std::string d = s.text("distribution", "lognormal");
        if (d == "lognormal") c.stay.distribution = StayDistribution::lognormal;
        else if (d == "gamma") c.stay.distribution = StayDistribution::gamma;
        else s.fail("distribution", "unknown distribution '" + d + "' (expected: lognormal or gamma)");
        c.stay.median_hours = s.real("median_hours", c.stay.median_hours);
        c.stay.log_sd = s.real("log_sd", c.stay.log_sd);
        c.stay.mean_hours = s.real("mean_hours", c.stay.mean_hours);
        c.stay.sd_hours = s.real("sd_hours", c.stay.sd_hours);
    }
    if (g.has("outcome")) {
        Section s(g.child("outcome"), "population.generate.outcome", g.file(), "population.generate.outcome");
        c.outcome.probability = s.real("probability", c.outcome.probability);
        c.outcome.earliest_fraction = s.real("earliest_fraction", c.outcome.earliest_fraction);
        c.outcome.latest_fraction = s.real("latest_fraction", c.outcome.latest_fraction);
        c.outcome.ends_stay = s.flag("ends_stay", c.outcome.ends_stay);
        if (c.outcome.latest_fraction < c.outcome.earliest_fraction)
            s.fail("latest_fraction", "must be at or above earliest_fraction");
    }
    if (g.has("scores")) {
        const YAML::Node node = g.child("scores");
        Section s(node, "population.generate.scores", g.file(), "population.generate.scores");
        ScoreConfig& k = c.scores;
        k.scale = score_scale(s, "scale", k.scale);
        k.cadence_minutes = s.real("cadence_minutes", k.cadence_minutes);
        k.jitter_minutes = s.real("jitter_minutes", k.jitter_minutes);
        if (k.jitter_minutes >= k.cadence_minutes) s.fail("jitter_minutes", "must be below cadence_minutes");
        k.missing_probability = s.real("missing_probability", k.missing_probability);
        k.latency_median_minutes = s.real("latency_median_minutes", k.latency_median_minutes);
        k.latency_log_sd = s.real("latency_log_sd", k.latency_log_sd);
        k.baseline = s.real("baseline", k.baseline);
        k.between_patient_sd = s.real("between_patient_sd", k.between_patient_sd);
        k.within_patient_sd = s.real("within_patient_sd", k.within_patient_sd);
        k.drift_size = s.real("drift_size", k.drift_size);
        k.drift_onset_min_hours = s.real("drift_onset_min_hours", k.drift_onset_min_hours);
        k.drift_onset_max_hours = s.real("drift_onset_max_hours", k.drift_onset_max_hours);
        if (k.drift_onset_max_hours < k.drift_onset_min_hours)
            s.fail("drift_onset_max_hours", "must be at or above drift_onset_min_hours");
        sc.population.target_auc = s.optional_real("target_auc");
        if (sc.population.target_auc) {
            const YAML::Node at = node["target_auc"];
            sc.population.target_auc_at = {at.Mark().line + 1, at.Mark().column + 1};
        }
    }
    try {
        validate(c);
    } catch (const std::invalid_argument& e) {
        g.fail("units", e.what());
    }
}

BootstrapConfig parse_bootstrap(const Section& s) {
    BootstrapConfig b;
    b.block_days = static_cast<int>(s.integer("block_days", 1));
    const std::string scheme = s.text("scheme", "stationary");
    if (scheme == "stationary") b.scheme = BlockScheme::stationary;
    else if (scheme == "moving_block") b.scheme = BlockScheme::moving_block;
    else s.fail("scheme", "unknown scheme '" + scheme + "' (expected: stationary or moving_block)");
    b.mean_run_blocks = s.real("mean_run_blocks", 7);
    b.same_weekday = s.flag("same_weekday", true);
    return b;
}

ShiftStress parse_shift(const Section& s, const Scenario& sc) {
    ShiftStress x;
    x.from = timestamp(s, "from", sc.simulation.zone);
    x.units = s.text_list("units");
    x.outcome_rate_multiplier = s.real("outcome_rate_multiplier", 1);
    x.scale = sc.population.source == PopulationSource::generate ? sc.population.generator.scores.scale : score_scale(s, "scale", ScoreScale::points);
    if (sc.population.source == PopulationSource::generate && s.has("scale") && score_scale(s, "scale", x.scale) != x.scale)
        s.fail("scale", "differs from population.generate.scores.scale; leave it out for generated populations");
    x.score_scale = s.real("score_scale", 1);
    x.score_offset = s.real("score_offset", 0);
    x.cadence_minutes = s.real("cadence_minutes", 0);
    x.outage_hours = s.real("outage_hours", 0);
    x.outage_start = s.has("outage_start") ? timestamp(s, "outage_start", sc.simulation.zone) : x.from;
    if (x.outage_start < x.from) s.fail("outage_start", "must not be before `from` (patients before the shift stay unchanged)");
    std::size_t i = 0;
    for (const auto& node : s.child("census")) {
        Section c(node, "population.shift.census[]", s.file(), "population.shift.census[" + std::to_string(i++) + "]");
        const std::string unit = c.text("unit");
        if (x.census_multiplier.count(unit)) c.fail("unit", "unit '" + unit + "' is listed twice");
        x.census_multiplier[unit] = c.real("multiplier", 1);
    }
    if (sc.population.source == PopulationSource::generate) {
        std::vector<std::string> known;
        for (const UnitConfig& u : sc.population.generator.units) known.push_back(u.name);
        auto check_unit = [&](const std::string& name, std::string_view key) {
            if (std::find(known.begin(), known.end(), name) == known.end()) {
                std::string list;
                for (const std::string& k : known) list += (list.empty() ? "" : ", ") + k;
                s.fail(key, "unknown unit '" + name + "' (units: " + list + ")");
            }
        };
        for (const std::string& u : x.units) check_unit(u, "units");
        for (const auto& [u, m] : x.census_multiplier) check_unit(u, "census");
    }
    return x;
}

}  // namespace

namespace {

InputError located_yaml_error(const std::string& file, const YAML::Exception& e) {
    // yaml-cpp marks an exception with no position as -1.
    return InputError(file, e.mark.line >= 0 ? e.mark.line + 1 : 0, e.mark.column >= 0 ? e.mark.column + 1 : 0, "",
                      "not valid YAML: " + e.msg);
}

Scenario scenario_from(const YAML::Node& root, const std::string& yaml_text, const std::string& file,
                       const std::string& directory);

}  // namespace

std::string replications_problem(const Scenario& sc, std::uint64_t replications) {
    if (replications > 1 && sc.population.source == PopulationSource::replay && !sc.population.bootstrap)
        return "a plain replay is the same in every replication; more than one replication needs a resampled "
               "(population.bootstrap) or generated population";
    return {};
}

void override_replications(Scenario& sc, std::string_view option, const std::string& text) {
    const std::int64_t n = option_integer(key_spec("top level", "replications"), option, text);
    if (std::string problem = replications_problem(sc, static_cast<std::uint64_t>(n)); !problem.empty())
        throw InputError("command line", 0, 0, std::string(option), problem);
    sc.replications = static_cast<std::uint64_t>(n);
}

Scenario parse_scenario(const std::string& yaml_text, const std::string& file, const std::string& directory) {
    // Any yaml-cpp exception, while parsing or while reading a node later, is
    // the file's fault and must name it.
    try {
        const YAML::Node root = YAML::Load(yaml_text);
        if (!root || root.IsNull()) throw InputError(file, 1, 1, "", "the scenario file is empty");
        check_mapping_keys(root, file);
        return scenario_from(root, yaml_text, file, directory);
    } catch (const YAML::Exception& e) {
        throw located_yaml_error(file, e);
    }
}

namespace {

Scenario scenario_from(const YAML::Node& root, const std::string& yaml_text, const std::string& file,
                       const std::string& directory) {
    Section top(root, "top level", file, "scenario");
    Scenario sc;
    sc.file = file;
    sc.directory = directory;
    sc.source_hash = 0xcbf29ce484222325ULL;  // FNV-1a, 64 bit
    for (unsigned char c : yaml_text) sc.source_hash = (sc.source_hash ^ c) * 0x100000001b3ULL;
    if (top.integer("scenario_schema", 0) != scenario_schema_version)
        top.fail("scenario_schema", "unsupported schema version");
    sc.name = top.text("name");
    sc.description = top.text("description");
    sc.time_zone_name = top.text("time_zone");
    try {
        sc.simulation.zone = TimeZone::load(sc.time_zone_name);
    } catch (const std::runtime_error& e) {
        top.fail("time_zone", e.what());
    }
    sc.simulation.seed = static_cast<std::uint64_t>(top.integer("seed", 1));
    // The population reads its log in the same zone and draws from the same seed.
    sc.population.zone = sc.simulation.zone;
    sc.population.seed = sc.simulation.seed;
    sc.population.file = file;
    sc.replications = static_cast<std::uint64_t>(top.integer("replications", 1));
    sc.score_label = top.text("score_label", "score");

    // Shifts, sorted by start time.
    {
        YAML::Node list = top.child("shifts");
        struct Item { int start; std::string name; bool night; YAML::Node node; };
        std::vector<Item> items;
        std::size_t i = 0;
        for (const auto& node : list) {
            Section s(node, "shifts[]", file, "shifts[" + std::to_string(i++) + "]");
            items.push_back({*s.clock("starts"), s.text("name"), s.flag("night", false), node});
        }
        if (items.empty()) top.fail("shifts", "at least one shift is needed");
        std::sort(items.begin(), items.end(), [](const Item& a, const Item& b) { return a.start < b.start; });
        for (std::size_t k = 0; k < items.size(); ++k) {
            if (k && items[k].start == items[k - 1].start)
                throw yaml_error(file, items[k].node, "shifts.starts", "two shifts start at the same time");
            for (std::size_t j = 0; j < k; ++j)
                if (items[j].name == items[k].name)
                    throw yaml_error(file, items[k].node, "shifts.name", "two shifts are named '" + items[k].name + "'");
            sc.simulation.shifts.start_minutes.push_back(items[k].start);
            sc.simulation.shifts.names.push_back(items[k].name);
            sc.simulation.shifts.is_night.push_back(items[k].night);
        }
    }
    {
        Section s(top.child("outcome"), "outcome", file, "outcome");
        sc.analysis.window = static_cast<Seconds>(std::llround(s.real("window_hours", 24) * 3600));
        sc.analysis.min_lead = seconds_from_minutes(s.real("min_lead_minutes", 0));
        if (sc.analysis.min_lead >= sc.analysis.window)
            s.fail("min_lead_minutes", "minimum lead must be shorter than the window, or nothing could be caught");
    }
    {
        Section pop(top.child("population"), "population", file, "population");
        if (pop.has("replay") == pop.has("generate"))
            pop.fail(pop.has("replay") ? "generate" : "replay",
                     "give exactly one population source: replay (a log) or generate (invented patients)");
        if (pop.has("replay")) {
            Section s(pop.child("replay"), "population.replay", file, "population.replay");
            sc.population.replay.encounters_path = resolve(directory, s.text("encounters"));
            sc.population.replay.scores_path = resolve(directory, s.text("scores"));
            sc.population.replay.latency_when_missing = seconds_from_minutes(s.real("latency_minutes", 0));
            sc.population.replay.max_stay_days = s.real("max_stay_days", sc.population.replay.max_stay_days);
            sc.population.replay.far_out_fence_iqr = s.real("far_out_fence_iqr", sc.population.replay.far_out_fence_iqr);
            if (s.has("score_range")) {
                const std::vector<double> range = s.real_list("score_range");
                if (range.size() != 2 || !std::isfinite(range[0]) || !std::isfinite(range[1]) || !(range[0] < range[1]))
                    s.fail("score_range", "expected [low, high] with two finite numbers, low below high");
                sc.population.replay.score_low = range[0];
                sc.population.replay.score_high = range[1];
            }
            const std::string bad_rows = s.text("bad_rows", "stop");
            if (bad_rows == "skip") sc.population.replay.bad_rows = BadRows::skip;
            else if (bad_rows != "stop") s.fail("bad_rows", "unknown value '" + bad_rows + "' (expected stop or skip)");
        } else {
            sc.population.source = PopulationSource::generate;
            parse_generator(Section(pop.child("generate"), "population.generate", file, "population.generate"), sc);
        }
        if (pop.has("bootstrap")) {
            if (sc.population.source != PopulationSource::replay)
                pop.fail("bootstrap", "bootstrap resamples a replayed log; a generated population makes every "
                                      "replication afresh, so leave bootstrap out");
            sc.population.bootstrap = parse_bootstrap(Section(pop.child("bootstrap"), "population.bootstrap", file, "population.bootstrap"));
        }
        if (pop.has("shift")) {
            const YAML::Node node = pop.child("shift");
            sc.population.shift = parse_shift(Section(node, "population.shift", file, "population.shift"), sc);
            sc.population.shift_at = {node.Mark().line + 1, node.Mark().column + 1};
        }
        if (std::string problem = replications_problem(sc, sc.replications); !problem.empty())
            top.fail("replications", problem);
    }
    if (top.has("reporting")) {
        Section s(top.child("reporting"), "reporting", file, "reporting");
        auto stamp = [&](std::string_view key) -> std::optional<Instant> {
            if (!s.has(key)) return std::nullopt;
            auto t = parse_timestamp(s.text(key), sc.simulation.zone);
            if (!t) s.fail(key, "expected a timestamp such as 2026-03-01T07:00:00 (local) or 2026-03-01T06:00:00Z");
            return t;
        };
        sc.analysis.period_start = stamp("from");
        sc.analysis.period_end = stamp("until");
        if (sc.analysis.period_start && sc.analysis.period_end && *sc.analysis.period_end <= *sc.analysis.period_start)
            s.fail("until", "the reporting period ends before it starts");
    }
    if (top.has("roles")) sc.simulation.roles = parse_roles(top, sc.simulation.shifts, file);
    sc.simulation.escalation = parse_escalation(top, sc.simulation.roles, file);
    if (top.has("chart_openings"))
        sc.simulation.chart_openings = parse_chart_openings(Section(top.child("chart_openings"), "chart_openings", file, "chart_openings"),
                                                 directory);
    {
        YAML::Node list = top.child("plans");
        std::set<std::string> names;
        std::size_t i = 0;
        for (const auto& node : list) {
            Section s(node, "plans[]", file, "plans[" + std::to_string(i++) + "]");
            Plan p;
            p.name = s.text("name");
            if (p.name.empty()) s.fail("name", "plan name is empty");
            if (!names.insert(p.name).second) s.fail("name", "two plans are named '" + p.name + "'");
            p.description = s.text("description");
            p.channel = parse_channel(s);
            p.role = s.text("role", p.channel == Channel::chart_interruption ? "whoever opens the chart" : "responder");
            if (sc.simulation.has_staff()) {
                std::vector<std::string> names;
                for (const Role& r : sc.simulation.roles) names.push_back(r.name);
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
            const std::string queue = s.text("queue", "fifo");
            if (queue == "priority") p.staffing.discipline = QueueDiscipline::priority_by_score;
            else if (queue != "fifo") s.fail("queue", "unknown queue '" + queue + "' (expected fifo or priority)");
            const std::string at_end = s.text("at_shift_end", "hand_over");
            if (at_end == "drop") p.staffing.at_shift_end = ShiftEndPolicy::drop;
            else if (at_end != "hand_over")
                s.fail("at_shift_end", "unknown policy '" + at_end + "' (expected hand_over or drop)");
            if (!sc.simulation.has_staff() && (s.has("queue") || s.has("at_shift_end")))
                s.fail(s.has("queue") ? "queue" : "at_shift_end", "needs roles; declare the roles that answer notices");
            const std::string where = "plans[" + std::to_string(i - 1) + "]";
            if (s.has("rule"))
                p.rule = parse_rule(Section(s.child("rule"), "plans[].rule", file, where + ".rule"), p.channel);
            else if (p.channel == Channel::ranked_review)
                p.rule.threshold = -std::numeric_limits<double>::infinity();  // no floor
            else
                s.fail("rule", "required key 'rule' is missing (when the plan fires)");
            parse_channel_settings(s, p, sc, where);
            sc.simulation.plans.push_back(std::move(p));
        }
        if (sc.simulation.plans.empty()) top.fail("plans", "at least one plan is needed");
    }
    return sc;
}

}  // namespace

Scenario load_scenario(const std::string& path) {
    std::ifstream in(path);
    if (!in) throw InputError(path, 0, 0, "", "cannot open scenario file");
    std::stringstream text;
    text << in.rdbuf();
    const std::string dir = std::filesystem::path(path).parent_path().string();
    return parse_scenario(text.str(), path, dir);
}

namespace {
std::string num(double v) {
    std::ostringstream o;
    o << v;
    return o.str();
}
std::string duration_words(Seconds s) {
    if (s % 3600 == 0) return num(static_cast<double>(s) / 3600) + " h";
    return num(static_cast<double>(s) / 60) + " min";
}
}  // namespace

std::string describe_rule(const Rule& r, const std::string& label) {
    std::string out = std::isinf(r.threshold) ? "any " + label : label + " >= " + num(r.threshold);
    if (r.persistence > 1) out += " on " + std::to_string(r.persistence) + " scores in a row";
    if (r.snooze) out += "; snooze " + duration_words(*r.snooze);
    if (r.rise) out += "; a rise of " + num(*r.rise) + " fires through snooze";
    if (r.rearm_below) out += "; re-arms below " + num(*r.rearm_below);
    if (r.max_per_shift) out += "; at most " + std::to_string(*r.max_per_shift) + " per patient per shift";
    if (r.quiet_start_minute)
        out += "; quiet " + format_clock_minutes(*r.quiet_start_minute) + "-" + format_clock_minutes(*r.quiet_end_minute);
    return out;
}

std::string describe_scenario(const Scenario& sc) {
    std::ostringstream o;
    o << "Scenario: " << sc.name << "\n";
    if (!sc.description.empty()) o << "  " << sc.description << "\n";
    o << "Time zone: " << sc.time_zone_name << "; seed " << sc.simulation.seed << "; " << sc.replications
      << (sc.replications == 1 ? " replication" : " replications") << "\n";
    o << "Shifts:";
    for (std::size_t i = 0; i < sc.simulation.shifts.names.size(); ++i)
        o << " " << sc.simulation.shifts.names[i] << " from " << format_clock_minutes(sc.simulation.shifts.start_minutes[i])
          << (sc.simulation.shifts.is_night[i] ? " (night)" : "") << (i + 1 < sc.simulation.shifts.names.size() ? "," : "");
    o << "\n";
    o << "Catch: an action starting between " << duration_words(sc.analysis.window) << " and " << duration_words(sc.analysis.min_lead)
      << " before time zero\n";
    if (sc.population.source == PopulationSource::replay) {
        o << "Population: replay of " << sc.population.replay.encounters_path << " and " << sc.population.replay.scores_path;
        if (sc.population.replay.latency_when_missing) o << " (latency " << duration_words(sc.population.replay.latency_when_missing) << " when available_at is empty)";
        if (sc.population.replay.bad_rows == BadRows::skip) o << "; bad rows are skipped and counted (bad_rows: skip)";
        if (sc.population.bootstrap)
            o << "\nReplications 1, 2, ...: " << (sc.population.bootstrap->scheme == BlockScheme::stationary ? "stationary" : "moving-block")
              << " bootstrap of " << sc.population.bootstrap->block_days << "-day blocks per unit, runs of " << num(sc.population.bootstrap->mean_run_blocks)
              << " blocks" << (sc.population.bootstrap->mean_run_blocks > 1 && sc.population.bootstrap->scheme == BlockScheme::stationary ? " on average" : "");
    } else {
        const GeneratorConfig& g = sc.population.generator;
        int beds = 0;
        for (const UnitConfig& u : g.units) beds += u.beds;
        o << "Population: generated, " << g.units.size() << " units with " << beds << " beds, " << format_local(g.period_start, sc.simulation.zone)
          << " to " << format_local(g.period_end, sc.simulation.zone) << "; outcome in " << num(100 * g.outcome.probability)
          << " % of stays; scores every " << num(g.scores.cadence_minutes) << " min";
        if (sc.population.target_auc) o << "; rise before time zero calibrated to an encounter-level AUC of " << num(*sc.population.target_auc);
    }
    if (sc.population.shift) {
        const ShiftStress& x = *sc.population.shift;
        std::vector<std::string> parts;
        auto part = [&](const std::string& text) { parts.push_back(text); };
        if (x.outcome_rate_multiplier != 1) part("outcome rate x " + num(x.outcome_rate_multiplier));
        if (x.score_scale != 1 || x.score_offset != 0) part("scores x " + num(x.score_scale) + " + " + num(x.score_offset));
        if (x.cadence_minutes > 0) part("at most one score per " + num(x.cadence_minutes) + " min");
        if (x.outage_hours > 0) part("feed outage of " + num(x.outage_hours) + " h from " + format_local(x.outage_start, sc.simulation.zone));
        for (const auto& [unit, m] : x.census_multiplier) part(unit + " admissions x " + num(m));
        o << "\nStress test from " << format_local(x.from, sc.simulation.zone) << ":";
        for (std::size_t k = 0; k < parts.size(); ++k) o << (k ? "; " : " ") << parts[k];
    }
    o << "\nPlans (" << sc.simulation.plans.size() << "):\n";
    for (const Plan& p : sc.simulation.plans) {
        o << "  - " << p.name << ": " << to_string(p.channel) << " to " << p.role << " when "
          << describe_rule(p.rule, sc.score_label) << "\n";
        if (p.channel == Channel::chart_interruption)
            o << "      at each chart opening; " << num(p.chart.interruption_minutes) << " min per interruption; "
              << num(p.chart.acceptance_probability) << " of interruptions lead to an evaluation\n";
        if (p.channel == Channel::handoff_list) {
            o << "      flagged at each handoff (";
            const auto& times = p.handoff.times_minutes.empty() ? sc.simulation.shifts.start_minutes : p.handoff.times_minutes;
            for (std::size_t k = 0; k < times.size(); ++k) o << (k ? ", " : "") << format_clock_minutes(times[k]);
            o << "); " << num(p.handoff.minutes_per_flag) << " min per flag; " << num(p.handoff.follow_up_probability)
              << " of flags lead to an evaluation\n";
        }
        if (p.channel == Channel::ranked_review) {
            o << "      top " << p.review.top_n << (p.review.scope == ReviewScope::unit ? " per unit" : " hospital-wide")
              << " at";
            for (int t : p.review.times_minutes) o << " " << format_clock_minutes(t);
            o << "; " << num(p.review.minutes_per_review) << " min per review";
            if (p.review.skip_reviewed) o << "; skips patients reviewed in the last " << duration_words(*p.review.skip_reviewed);
            if (p.review.max_reviews_per_round) o << "; at most " << *p.review.max_reviews_per_round << " reviews per round";
            o << "\n";
        }
        if (!p.description.empty()) o << "      " << p.description << "\n";
        if (sc.simulation.has_staff()) {
            o << "      escalation: " << describe(sc.simulation.escalation, escalation_path(sc.simulation.escalation, p.staffing.first_role))
              << "\n";
            o << "      queue " << (p.staffing.discipline == QueueDiscipline::fifo ? "first come first served" : "highest score first")
              << "; at shift end " << (p.staffing.at_shift_end == ShiftEndPolicy::hand_over ? "hand over" : "drop") << "\n";
        }
    }
    if (sc.simulation.has_staff()) {
        o << "Staff (" << sc.simulation.roles.size() << " roles):\n";
        for (const Role& r : sc.simulation.roles) {
            o << "  - " << r.name << (r.per_unit ? " (a team on each unit)" : " (one team for the hospital)") << ": ";
            for (std::size_t k = 0; k < sc.simulation.shifts.names.size(); ++k)
                o << (k ? ", " : "") << sc.simulation.shifts.names[k] << " " << r.roster.by_shift[k];
            if (!r.roster.by_weekday.empty())
                for (std::size_t d = 0; d < 7; ++d)
                    if (r.roster.by_weekday[d] != r.roster.by_shift) {
                        o << "; " << weekday_names[d];
                        for (std::size_t k = 0; k < sc.simulation.shifts.names.size(); ++k)
                            o << (k ? ", " : " ") << sc.simulation.shifts.names[k] << " " << r.roster.by_weekday[d][k];
                    }
            o << "; " << describe(r.minutes_per_task) << " per task\n";
        }
    } else {
        o << "Staff: none declared; every notice counts as evaluated at once.\n";
    }
    if (sc.simulation.chart_openings) {
        o << "Chart openings: " << (sc.simulation.chart_openings->replay_path.empty() ? "generated" : "replayed from " + sc.simulation.chart_openings->replay_path)
          << "; roles:";
        for (const auto& r : sc.simulation.chart_openings->roles) o << " " << r.name << " (" << num(r.clinicians_per_unit) << " per unit)";
        o << "\n";
    }
    return o.str();
}

ShiftCalendar calendar_for(const Scenario& sc, const Population& population) {
    return calendar_for(sc.simulation, population, sc.analysis.period_start, sc.analysis.period_end);
}

}  // namespace tocsin
