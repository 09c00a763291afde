#include "sim/scenario.hpp"

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <limits>
#include <numeric>
#include <set>
#include <sstream>

#include "models/errors.hpp"
#include "sim/scenario_keys.hpp"

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
        if (!sc.chart_openings)
            s.fail("channel", "a chart_interruption plan needs the top-level chart_openings section (when charts are opened)");
        p.chart.interruption_minutes = c.real("interruption_minutes", 0);
        p.chart.acceptance_probability = c.real("acceptance_probability", 1);
        if (s.has("role")) {
            const auto& roles = sc.chart_openings->roles;
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
        if (auto h = r.optional_real("skip_reviewed_hours")) p.rule.snooze = static_cast<Seconds>(std::llround(*h * 3600));
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

}  // namespace

Scenario parse_scenario(const std::string& yaml_text, const std::string& file, const std::string& directory) {
    YAML::Node root;
    try {
        root = YAML::Load(yaml_text);
    } catch (const YAML::Exception& e) {
        throw InputError(file, e.mark.line + 1, e.mark.column + 1, "", "not valid YAML: " + e.msg);
    }
    if (!root || root.IsNull()) throw InputError(file, 1, 1, "", "the scenario file is empty");
    Section top(root, "top level", file, "scenario");
    Scenario sc;
    sc.file = file;
    sc.directory = directory;
    if (top.integer("scenario_schema", 0) != scenario_schema_version)
        top.fail("scenario_schema", "unsupported schema version");
    sc.name = top.text("name");
    sc.description = top.text("description");
    sc.time_zone_name = top.text("time_zone");
    try {
        sc.zone = TimeZone::load(sc.time_zone_name);
    } catch (const std::runtime_error& e) {
        top.fail("time_zone", e.what());
    }
    sc.seed = static_cast<std::uint64_t>(top.integer("seed", 1));
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
            sc.shifts.start_minutes.push_back(items[k].start);
            sc.shifts.names.push_back(items[k].name);
            sc.shifts.is_night.push_back(items[k].night);
        }
    }
    {
        Section s(top.child("outcome"), "outcome", file, "outcome");
        sc.window = static_cast<Seconds>(std::llround(s.real("window_hours", 24) * 3600));
        sc.min_lead = seconds_from_minutes(s.real("min_lead_minutes", 0));
        if (sc.min_lead >= sc.window)
            s.fail("min_lead_minutes", "minimum lead must be shorter than the window, or nothing could be caught");
    }
    {
        Section pop(top.child("population"), "population", file, "population");
        Section s(pop.child("replay"), "population.replay", file, "population.replay");
        sc.replay.encounters_path = resolve(directory, s.text("encounters"));
        sc.replay.scores_path = resolve(directory, s.text("scores"));
        sc.replay.latency_when_missing = seconds_from_minutes(s.real("latency_minutes", 0));
    }
    if (top.has("reporting")) {
        Section s(top.child("reporting"), "reporting", file, "reporting");
        auto stamp = [&](std::string_view key) -> std::optional<Instant> {
            if (!s.has(key)) return std::nullopt;
            auto t = parse_timestamp(s.text(key), sc.zone);
            if (!t) s.fail(key, "expected a timestamp such as 2026-03-01T07:00:00 (local) or 2026-03-01T06:00:00Z");
            return t;
        };
        sc.period_start = stamp("from");
        sc.period_end = stamp("until");
        if (sc.period_start && sc.period_end && *sc.period_end <= *sc.period_start)
            s.fail("until", "the reporting period ends before it starts");
    }
    if (top.has("chart_openings"))
        sc.chart_openings = parse_chart_openings(Section(top.child("chart_openings"), "chart_openings", file, "chart_openings"),
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
            const std::string where = "plans[" + std::to_string(i - 1) + "]";
            if (s.has("rule"))
                p.rule = parse_rule(Section(s.child("rule"), "plans[].rule", file, where + ".rule"), p.channel);
            else if (p.channel == Channel::ranked_review)
                p.rule.threshold = -std::numeric_limits<double>::infinity();  // no floor
            else
                s.fail("rule", "required key 'rule' is missing (when the plan fires)");
            parse_channel_settings(s, p, sc, where);
            sc.plans.push_back(std::move(p));
        }
        if (sc.plans.empty()) top.fail("plans", "at least one plan is needed");
    }
    return sc;
}

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
    o << "Time zone: " << sc.time_zone_name << "; seed " << sc.seed << "\n";
    o << "Shifts:";
    for (std::size_t i = 0; i < sc.shifts.names.size(); ++i)
        o << " " << sc.shifts.names[i] << " from " << format_clock_minutes(sc.shifts.start_minutes[i])
          << (sc.shifts.is_night[i] ? " (night)" : "") << (i + 1 < sc.shifts.names.size() ? "," : "");
    o << "\n";
    o << "Catch: an action starting between " << duration_words(sc.window) << " and " << duration_words(sc.min_lead)
      << " before time zero\n";
    o << "Population: replay of " << sc.replay.encounters_path << " and " << sc.replay.scores_path;
    if (sc.replay.latency_when_missing) o << " (latency " << duration_words(sc.replay.latency_when_missing) << " when available_at is empty)";
    o << "\nPlans (" << sc.plans.size() << "):\n";
    for (const Plan& p : sc.plans) {
        Rule shown = p.rule;
        if (p.channel == Channel::ranked_review) shown.snooze.reset();  // shown as the review's skip below
        o << "  - " << p.name << ": " << to_string(p.channel) << " to " << p.role << " when "
          << describe_rule(shown, sc.score_label) << "\n";
        if (p.channel == Channel::chart_interruption)
            o << "      at each chart opening; " << num(p.chart.interruption_minutes) << " min per interruption; "
              << num(p.chart.acceptance_probability) << " of interruptions lead to an evaluation\n";
        if (p.channel == Channel::handoff_list) {
            o << "      flagged at each handoff (";
            const auto& times = p.handoff.times_minutes.empty() ? sc.shifts.start_minutes : p.handoff.times_minutes;
            for (std::size_t k = 0; k < times.size(); ++k) o << (k ? ", " : "") << format_clock_minutes(times[k]);
            o << "); " << num(p.handoff.minutes_per_flag) << " min per flag; " << num(p.handoff.follow_up_probability)
              << " of flags lead to an evaluation\n";
        }
        if (p.channel == Channel::ranked_review) {
            o << "      top " << p.review.top_n << (p.review.scope == ReviewScope::unit ? " per unit" : " hospital-wide")
              << " at";
            for (int t : p.review.times_minutes) o << " " << format_clock_minutes(t);
            o << "; " << num(p.review.minutes_per_review) << " min per review";
            if (p.rule.snooze) o << "; skips patients reviewed in the last " << duration_words(*p.rule.snooze);
            if (p.review.max_reviews_per_round) o << "; at most " << *p.review.max_reviews_per_round << " reviews per round";
            o << "\n";
        }
        if (!p.description.empty()) o << "      " << p.description << "\n";
    }
    if (sc.chart_openings) {
        o << "Chart openings: " << (sc.chart_openings->replay_path.empty() ? "generated" : "replayed from " + sc.chart_openings->replay_path)
          << "; roles:";
        for (const auto& r : sc.chart_openings->roles) o << " " << r.name << " (" << num(r.clinicians_per_unit) << " per unit)";
        o << "\n";
    }
    return o.str();
}

}  // namespace tocsin
