#include "sim/scenario.hpp"

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <fstream>
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

Rule parse_rule(const Section& s) {
    Rule r;
    r.threshold = *s.optional_real("threshold");
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
    return r;
}

Channel parse_channel(const Section& s) {
    const std::string c = s.text("channel", "page");
    if (c == "page") return Channel::page;
    s.fail("channel", "unknown channel '" + c + "' (expected: page)");
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
            p.role = s.text("role", "responder");
            p.rule = parse_rule(Section(s.child("rule"), "plans[].rule", file, "plans[" + std::to_string(i - 1) + "].rule"));
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
    std::string out = label + " >= " + num(r.threshold);
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
        o << "  - " << p.name << ": " << to_string(p.channel) << " to " << p.role << " when "
          << describe_rule(p.rule, sc.score_label) << "\n";
        if (!p.description.empty()) o << "      " << p.description << "\n";
    }
    return o.str();
}

}  // namespace tocsin
