#include "study/scenario.hpp"

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <sstream>

#include "models/errors.hpp"
#include "study/scenario_keys.hpp"
#include "study/scenario_load.hpp"

namespace tocsin {

namespace scenario_load {

Seconds seconds_from_minutes(double m) { return static_cast<Seconds>(std::llround(m * 60.0)); }

std::string resolve(const std::string& directory, const std::string& path) {
    std::filesystem::path p(path);
    if (p.is_absolute() || directory.empty()) return path;
    return (std::filesystem::path(directory) / p).lexically_normal().string();
}

std::string joined(const std::vector<std::string>& names) {
    std::string out;
    for (const std::string& n : names) out += (out.empty() ? "" : ", ") + n;
    return out;
}

Instant timestamp(const Section& s, std::string_view key, const TimeZone& zone) {
    auto t = parse_timestamp(s.text(key), zone);
    if (!t) s.fail(key, "expected a timestamp such as 2026-03-01T07:00:00 (local) or 2026-03-01T06:00:00Z");
    return *t;
}

YAML::Node section_or_empty(const Section& s, std::string_view key) {
    return s.has(key) ? s.child(key) : YAML::Node(YAML::NodeType::Map);
}

}  // namespace scenario_load

namespace {

using namespace scenario_load;

InputError located_yaml_error(const std::string& file, const YAML::Exception& e) {
    // yaml-cpp marks an exception with no position as -1.
    return InputError(file, e.mark.line >= 0 ? e.mark.line + 1 : 0, e.mark.column >= 0 ? e.mark.column + 1 : 0, "",
                      "not valid YAML: " + e.msg);
}

// The top level's own keys: name, zone, seed, replications, score label.
void load_top_level(const Section& top, const std::string& yaml_text, Scenario& sc) {
    sc.source_hash = 0xcbf29ce484222325ULL;  // FNV-1a, 64 bit
    for (unsigned char c : yaml_text) sc.source_hash = (sc.source_hash ^ c) * 0x100000001b3ULL;
    if (top.integer("scenario_schema") != scenario_schema_version) top.fail("scenario_schema", "unsupported schema version");
    sc.name = top.text("name");
    sc.description = top.text("description");
    sc.time_zone_name = top.text("time_zone");
    try {
        sc.simulation.zone = TimeZone::load(sc.time_zone_name);
    } catch (const std::runtime_error& e) {
        top.fail("time_zone", e.what());
    }
    sc.simulation.seed = static_cast<std::uint64_t>(top.integer("seed"));
    // The population reads its log in the same zone and draws from the same seed.
    sc.population.zone = sc.simulation.zone;
    sc.population.seed = sc.simulation.seed;
    sc.population.file = sc.file;
    sc.replications = static_cast<std::uint64_t>(top.integer("replications"));
    sc.score_label = top.text("score_label");
    sc.score_name = top.text("score_name");
}

// shifts[], sorted by start time.
ShiftPattern load_shifts(const Section& top) {
    struct Item { int start; std::string name; bool night; YAML::Node node; };
    std::vector<Item> items;
    std::size_t i = 0;
    for (const auto& node : top.child("shifts")) {
        Section s(node, "shifts[]", top.file(), "shifts[" + std::to_string(i++) + "]");
        items.push_back({*s.clock("starts"), s.text("name"), s.flag("night"), node});
    }
    if (items.empty()) top.fail("shifts", "at least one shift is needed");
    std::sort(items.begin(), items.end(), [](const Item& a, const Item& b) { return a.start < b.start; });
    ShiftPattern shifts;
    for (std::size_t k = 0; k < items.size(); ++k) {
        if (k && items[k].start == items[k - 1].start)
            throw yaml_error(top.file(), items[k].node, "shifts.starts", "two shifts start at the same time");
        for (std::size_t j = 0; j < k; ++j)
            if (items[j].name == items[k].name)
                throw yaml_error(top.file(), items[k].node, "shifts.name", "two shifts are named '" + items[k].name + "'");
        shifts.start_minutes.push_back(items[k].start);
        shifts.names.push_back(items[k].name);
        shifts.is_night.push_back(items[k].night);
    }
    return shifts;
}

// outcome.averted: the assumed effect of an evaluation by lead (analysis/averted.hpp).
AvertedEffect load_averted(const Section& s, Seconds min_lead) {
    AvertedEffect e;
    const std::string shape = s.text("shape");
    if (shape == "table") {
        e.shape = AvertedShape::table;
        for (const char* key : {"probability", "full_lead_hours"})
            if (s.has(key)) s.fail(key, "a table effect takes its probabilities from its rows; leave " + std::string(key) + " out");
        if (!s.has("table")) s.fail("table", "required for shape table: rows of lead_hours and probability");
        std::size_t i = 0;
        for (const auto& node : s.child("table")) {
            Section row(node, "outcome.averted.table[]", s.file(), "outcome.averted.table[" + std::to_string(i++) + "]");
            const AvertedStep step{static_cast<Seconds>(std::llround(row.real("lead_hours") * 3600)), row.real("probability")};
            if (!e.table.empty() && step.lead <= e.table.back().lead)
                row.fail("lead_hours", "rows must come by strictly ascending lead_hours");
            e.table.push_back(step);
        }
        if (e.table.empty()) s.fail("table", "a table effect needs at least one row");
        return e;
    }
    if (shape == "step") e.shape = AvertedShape::step;
    else if (shape != "linear") s.fail("shape", "unknown shape '" + shape + "' (expected linear, step or table)");
    for (const char* key : {"probability", "full_lead_hours"})
        if (!s.has(key)) s.fail(key, "required for shape " + shape);
    if (s.has("table")) s.fail("table", "only shape table takes rows");
    e.probability = s.real("probability");
    e.full_lead = static_cast<Seconds>(std::llround(s.real("full_lead_hours") * 3600));
    if (e.shape == AvertedShape::linear && e.full_lead <= min_lead)
        s.fail("full_lead_hours", "a linear effect rises from 0 at the minimum lead (outcome.min_lead_minutes) to its "
                                  "full probability here, so it must be longer than the minimum lead");
    return e;
}

// outcome: what counts as a catch.
void load_outcome(const Section& top, AnalysisSettings& analysis) {
    Section s(top.child("outcome"), "outcome", top.file(), "outcome");
    analysis.window = static_cast<Seconds>(std::llround(s.real("window_hours") * 3600));
    analysis.min_lead = seconds_from_minutes(s.real("min_lead_minutes"));
    if (analysis.min_lead >= analysis.window)
        s.fail("min_lead_minutes", "minimum lead must be shorter than the window, or nothing could be caught");
    if (s.has("averted"))
        analysis.averted = load_averted(Section(s.child("averted"), "outcome.averted", s.file(), "outcome.averted"),
                                        analysis.min_lead);
}

// reporting: the period per-shift figures are limited to.
void load_reporting(const Section& top, const TimeZone& zone, AnalysisSettings& analysis) {
    if (!top.has("reporting")) return;
    Section s(top.child("reporting"), "reporting", top.file(), "reporting");
    auto stamp = [&](std::string_view key) -> std::optional<Instant> {
        if (!s.has(key)) return std::nullopt;
        return timestamp(s, key, zone);
    };
    analysis.smallest_group = s.integer("smallest_group");
    analysis.period_start = stamp("from");
    analysis.period_end = stamp("until");
    if (analysis.period_start && analysis.period_end && *analysis.period_end <= *analysis.period_start)
        s.fail("until", "the reporting period ends before it starts");
}

Scenario scenario_from(const YAML::Node& root, const std::string& yaml_text, const std::string& file,
                       const std::string& directory) {
    Section top(root, "top level", file, "scenario");
    Scenario sc;
    sc.file = file;
    sc.directory = directory;
    load_top_level(top, yaml_text, sc);
    sc.simulation.shifts = load_shifts(top);
    load_outcome(top, sc.analysis);
    load_population(top, sc);
    load_reporting(top, sc.simulation.zone, sc.analysis);
    if (top.has("roles")) sc.simulation.roles = load_roles(top, sc.simulation.shifts);
    sc.simulation.escalation = load_escalation(top, sc.simulation.roles);
    if (top.has("chart_openings"))
        sc.simulation.chart_openings =
            load_chart_openings(Section(top.child("chart_openings"), "chart_openings", file, "chart_openings"), directory);
    sc.simulation.plans = load_plans(top, sc);
    return sc;
}

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

Scenario load_scenario(const std::string& path) {
    std::ifstream in(path);
    if (!in) throw InputError(path, 0, 0, "", "cannot open scenario file");
    std::stringstream text;
    text << in.rdbuf();
    const std::string dir = std::filesystem::path(path).parent_path().string();
    return parse_scenario(text.str(), path, dir);
}

ShiftCalendar calendar_for(const Scenario& sc, const Population& population) {
    return calendar_for(sc.simulation, population, sc.analysis.period_start, sc.analysis.period_end);
}

}  // namespace tocsin
