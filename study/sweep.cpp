#include "study/sweep.hpp"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <optional>
#include <sstream>
#include <stdexcept>

#include <yaml-cpp/yaml.h>

#include "models/errors.hpp"
#include "models/text.hpp"
#include "study/scenario_keys.hpp"

namespace tocsin {

namespace {

InputError axis_error(const SweepAxis& axis, const std::string& message) {
    return InputError(axis.file, axis.line, axis.column, axis.field, message);
}

double parse_number(const std::string& text, const std::string& spec) {
    double v = 0;
    const char* first = text.data();
    const char* last = text.data() + text.size();
    auto [ptr, ec] = std::from_chars(first, last, v);
    if (text.empty() || ec != std::errc() || ptr != last)
        throw axis_error(SweepAxis{}, "sweep axis '" + spec + "': '" + text + "' is not a number");
    if (!std::isfinite(v)) throw axis_error(SweepAxis{}, "sweep axis '" + spec + "': '" + text + "' is not a finite number");
    return v;
}

bool is_number(const std::string& text) {
    double v = 0;
    auto [ptr, ec] = std::from_chars(text.data(), text.data() + text.size(), v);
    return !text.empty() && ec == std::errc() && ptr == text.data() + text.size();
}

std::vector<std::string> split(const std::string& s, char sep) {
    std::vector<std::string> out;
    std::string cur;
    std::istringstream in(s);
    while (std::getline(in, cur, sep)) out.push_back(cur);
    if (!s.empty() && s.back() == sep) out.emplace_back();
    return out;
}

std::string number_text(double v) {
    std::ostringstream o;
    o << v;
    return o.str();
}

// A count held in a double, written in full while it is a whole number a
// reader can take in.
std::string count_text(double n) {
    return n < 1e15 ? std::to_string(static_cast<std::uint64_t>(n)) : number_text(n);
}

// The values from..to by step; their count is worked out first, so a range
// of billions is refused instead of filling memory.
std::vector<std::string> range_values(double from, double to, double step, const SweepAxis& axis,
                                      const std::string& spec, std::size_t max_values) {
    if (!(step > 0)) throw axis_error(axis, "sweep axis '" + spec + "': the step must be positive");
    if (to < from) throw axis_error(axis, "sweep axis '" + spec + "': the range ends before it starts");
    const double count = std::floor((to - from) / step + 1e-9) + 1;
    if (!(count <= static_cast<double>(max_values)))
        throw axis_error(axis, "sweep axis '" + spec + "' has " + count_text(count) + " values, more than the limit of " +
                                   std::to_string(max_values) + " plans in a sweep; use a larger step");
    std::vector<std::string> out;
    const long n = static_cast<long>(count) - 1;
    for (long i = 0; i <= n; ++i) out.push_back(round_trip_text(from + static_cast<double>(i) * step));
    return out;
}

// Follows `segments` from `node`; a list item is matched by position or name.
YAML::Node descend(YAML::Node node, const std::vector<std::string>& segments, const SweepAxis& axis) {
    const std::string& path = axis.path;
    for (std::size_t i = 0; i + 1 < segments.size(); ++i) {
        const std::string& seg = segments[i];
        if (node.IsSequence()) {
            YAML::Node found;
            bool ok = false;
            for (std::size_t k = 0; k < node.size(); ++k) {
                const YAML::Node item = node[k];
                if (std::to_string(k) == seg || (item.IsMap() && item["name"] && item["name"].IsScalar() &&
                                                 item["name"].Scalar() == seg)) {
                    found.reset(item);
                    ok = true;
                    break;
                }
            }
            if (!ok) throw axis_error(axis, "sweep path '" + path + "': no list item '" + seg + "'");
            node.reset(found);  // rebind: Node::operator= would overwrite the content
        } else if (node.IsMap()) {
            if (!node[seg]) throw axis_error(axis, "sweep path '" + path + "': no key '" + seg + "'");
            YAML::Node next = node[seg];
            node.reset(next);
        } else {
            throw axis_error(axis, "sweep path '" + path + "': '" + seg + "' is not a section or list");
        }
    }
    if (!node.IsMap()) throw axis_error(axis, "sweep path '" + path + "' does not end in a key of a section");
    return node;
}

}  // namespace

SweepAxis parse_sweep_axis(const std::string& spec, std::size_t max_values) {
    const std::size_t eq = spec.find('=');
    SweepAxis axis;
    if (eq == std::string::npos || eq == 0)
        throw axis_error(axis, "sweep axis '" + spec + "': expected PATH=VALUES, e.g. plan.rule.threshold=50:80:5 "
                                 "or plan.rule.snooze_minutes=60,120,240");
    axis.path = spec.substr(0, eq);
    const std::string values = spec.substr(eq + 1);
    // A range is three numbers; anything else with a colon is a list of
    // values, such as local times ("08:00,20:00").
    const auto parts = split(values, ':');
    if (values.find(',') == std::string::npos && parts.size() == 3 && is_number(parts[0])) {
        axis.values = range_values(parse_number(parts[0], spec), parse_number(parts[1], spec),
                                   parse_number(parts[2], spec), axis, spec, max_values);
    } else {
        for (const auto& part : split(values, ',')) {
            if (part.empty()) throw axis_error(axis, "sweep axis '" + spec + "': an empty value (two commas in a row?)");
            axis.values.push_back(part);
        }
    }
    if (axis.values.empty()) throw axis_error(axis, "sweep axis '" + spec + "' has no values");
    return axis;
}

namespace {

// One axis of the file's sweep.vary[]: a list of values or from, to and step.
SweepAxis axis_from_file(const Section& v, const YAML::Node& node, const std::string& path, std::size_t max_plans) {
    SweepAxis axis;
    axis.path = v.text("key");
    axis.file = path;
    axis.line = node.Mark().line + 1;
    axis.column = node.Mark().column + 1;
    axis.field = v.where();
    if (v.has("values")) {
        axis.values = v.text_list("values");
    } else {
        if (!v.has("from") || !v.has("to") || !v.has("step")) v.fail("key", "give either values: [..] or from, to and step");
        axis.values = range_values(*v.optional_real("from"), *v.optional_real("to"), *v.optional_real("step"), axis,
                                   axis.path, max_plans);
    }
    if (axis.values.empty()) v.fail("values", "no values to sweep");
    return axis;
}

// What the file's sweep section adds to the request: the plan and the axes,
// each only when the command line gave none.
void read_sweep_section(const YAML::Node& root, const std::string& path, const SweepRequest& request,
                        std::string& base, std::vector<SweepAxis>& axes) {
    if (!root["sweep"]) return;
    Section s(root["sweep"], "sweep", path, "sweep");
    if (base.empty()) base = s.text("plan");
    if (!axes.empty() || !s.has("vary")) return;
    std::size_t i = 0;
    for (const auto& node : s.child("vary")) {
        Section v(node, "sweep.vary[]", path, "sweep.vary[" + std::to_string(i++) + "]");
        axes.push_back(axis_from_file(v, node, path, request.max_plans));
    }
}

YAML::Node find_base_plan(const YAML::Node& root, const std::string& base, const SweepRequest& request,
                          const std::string& path) {
    YAML::Node base_node;
    bool found = false;
    for (std::size_t k = 0; k < root["plans"].size(); ++k) {
        YAML::Node p = root["plans"][k];
        if (p["name"] && p["name"].Scalar() == base) {
            base_node.reset(p);
            found = true;
        }
    }
    if (!found) {
        const bool from_file = request.base_plan.empty();
        throw InputError(from_file ? path : "command line", 0, 0, from_file ? "sweep.plan" : "--plan",
                         "no plan named '" + base + "'");
    }
    return base_node;
}

// The number of grid points, as a product of the axes' counts in floating
// point so that many axes cannot overflow it, checked before a plan is built.
std::size_t grid_size(const std::vector<SweepAxis>& axes, std::size_t max_plans) {
    double size = 1;
    std::string factors;
    for (const auto& a : axes) {
        size *= static_cast<double>(a.values.size());
        factors += (factors.empty() ? "" : " x ") + std::to_string(a.values.size());
    }
    if (size > static_cast<double>(max_plans))
        throw axis_error(axes.front(), "the sweep grid has " + count_text(size) + " plans (" + factors +
                                           " values), more than the limit of " + std::to_string(max_plans) +
                                           "; use fewer values or larger steps");
    return static_cast<std::size_t>(size);
}

// Which axes vary staffing ("roles.<role>.<key>", the role the plan pages)
// rather than the plan ("plan.<key>").
std::vector<bool> staffing_axes(const std::vector<SweepAxis>& axes, const YAML::Node& root, const std::string& plan_role) {
    std::vector<bool> staffing(axes.size(), false);
    for (std::size_t a = 0; a < axes.size(); ++a) {
        const auto segments = split(axes[a].path, '.');
        if (segments.size() >= 3 && segments[0] == "roles") {
            staffing[a] = true;
            if (!root["roles"] || !root["roles"].IsSequence())
                throw axis_error(axes[a], "sweep path '" + axes[a].path + "': the scenario declares no roles");
            if (segments[1] != plan_role)
                throw axis_error(axes[a], "sweep path '" + axes[a].path + "': a staffing axis varies the role the "
                                         "swept plan pages ('" + plan_role + "'), not '" + segments[1] + "'");
        } else if (segments.size() < 2 || segments[0] != "plan") {
            throw axis_error(axes[a], "sweep path '" + axes[a].path + "': paths start with 'plan.' (a key of the "
                                     "swept plan, e.g. plan.rule.threshold) or 'roles.<role>.' (the role it pages, "
                                     "e.g. roles.cover nurse.roster.night)");
        }
    }
    return staffing;
}

// The declaration of the key an axis sets, when the schema has one: plan
// keys and their sections ("plans[].review", "times"); roster headcounts are
// keyed by shift name and have none.
const KeySpec* declared_key(const std::vector<std::string>& segments, bool staffing) {
    std::string section = staffing ? "roles[]" : "plans[]";
    for (std::size_t i = 0; i + 1 < segments.size(); ++i) section += "." + segments[i];
    for (const SectionSpec& s : scenario_sections())
        if (s.path == section)
            for (const KeySpec& k : s.keys)
                if (k.name == segments.back()) return &k;
    return nullptr;
}

std::optional<double> parse_value_number(const std::string& text) {
    if (!is_number(text)) return std::nullopt;
    double v = 0;
    std::from_chars(text.data(), text.data() + text.size(), v);
    if (!std::isfinite(v)) return std::nullopt;
    return v;
}

// Writes one value under holder[key] as the key takes it (a number, text, a
// flag, or a list from '+'-joined items); returns whether it was written as
// a number. A value the key cannot take is refused naming the axis.
bool set_value(YAML::Node& holder, const std::vector<std::string>& segments, bool staffing, const std::string& value,
               const SweepAxis& axis) {
    const std::string& key = segments.back();
    const KeySpec* k = declared_key(segments, staffing);
    const auto refuse = [&](const std::string& why) {
        return axis_error(axis, "sweep axis '" + axis.path + "': the value '" + value + "' is refused: " + why);
    };
    const KeyKind kind = k ? k->kind : KeyKind::real;  // undeclared: a roster headcount
    switch (kind) {
    case KeyKind::real:
    case KeyKind::integer: {
        const auto v = parse_value_number(value);
        if (!v) throw refuse("'" + key + "' takes a finite number");
        holder[key] = *v;
        return true;
    }
    case KeyKind::flag:
        if (value != "true" && value != "false") throw refuse("'" + key + "' takes true or false");
        holder[key] = value == "true";
        return false;
    case KeyKind::list: {
        YAML::Node items(YAML::NodeType::Sequence);
        for (const std::string& item : split(value, '+')) {
            if (item.empty()) throw refuse("an empty list item ('+' joins the items of a list)");
            items.push_back(item);
        }
        holder[key] = items;
        return false;
    }
    case KeyKind::section: throw refuse("'" + key + "' is a section; sweep one of its keys");
    case KeyKind::text:
    case KeyKind::clock: holder[key] = value; return false;
    }
    return false;
}

// Short tags for plan names: t for the threshold and s for the snooze, the
// key's own name otherwise; every key in full when two axes would share one.
std::vector<std::string> axis_tags(const std::vector<SweepAxis>& axes) {
    std::vector<std::string> tags, keys;
    for (const SweepAxis& a : axes) {
        const std::string key = split(a.path, '.').back();
        keys.push_back(key);
        tags.push_back(key == "threshold" ? "t" : key == "snooze_minutes" ? "s" : key);
    }
    for (std::size_t i = 0; i < tags.size(); ++i)
        for (std::size_t j = i + 1; j < tags.size(); ++j)
            if (tags[i] == tags[j]) return keys;
    return tags;
}

// Staffing axes ("roles.<role>.<key>") vary the role the swept plan pages.
// Each combination of their values becomes a copy of that role under its own
// name (with the escalation edge out of it), which that grid point's plan
// pages instead: every plan still has staff of its own, and the population
// does not depend on staffing, so all grid points share patients.
class Grid {
public:
    Grid(YAML::Node root, YAML::Node base_node, std::string base, const std::vector<SweepAxis>& axes)
        : root_(std::move(root)), base_node_(std::move(base_node)), base_(std::move(base)), axes_(axes) {
        plan_role_ = base_node_["role"] && base_node_["role"].IsScalar() ? base_node_["role"].Scalar() : "";
        staffing_ = staffing_axes(axes_, root_, plan_role_);
        tags_ = axis_tags(axes_);
        for (std::size_t a = 0; a < axes_.size(); ++a)
            if (staffing_[a] && base_node_["roster"])
                throw axis_error(axes_[a], "sweep path '" + axes_[a].path + "': plan '" + base_ +
                                               "' has its own roster, which replaces the role's; vary plan.roster.<shift> instead");
        if (std::find(staffing_.begin(), staffing_.end(), true) != staffing_.end()) find_role();
    }

    // The plan at one grid point (one value index per axis); a new role copy
    // is added to the scenario the first time its staffing is met.
    YAML::Node plan_at(const std::vector<std::size_t>& at) {
        YAML::Node plan = YAML::Clone(base_node_);
        std::string name = base_, staffing_label;
        YAML::Node role = role_node_ ? YAML::Clone(role_node_) : YAML::Node();
        std::string spelled;  // every key and value in full, for the description
        for (std::size_t a = 0; a < axes_.size(); ++a) {
            const SweepAxis& axis = axes_[a];
            const std::string& value = axis.values[at[a]];
            auto segments = split(axis.path, '.');
            segments.erase(segments.begin(), segments.begin() + (staffing_[a] ? 2 : 1));
            YAML::Node holder = descend(staffing_[a] ? role : plan, segments, axis);
            const bool number = set_value(holder, segments, staffing_[a], value, axis);
            const std::string shown = number ? number_text(*parse_value_number(value)) : value;
            const std::string label = segments.back() + "=" + shown;
            name += " " + tags_[a] + (number ? "" : "=") + shown;
            spelled += (a ? ", " : "") + label;
            if (staffing_[a]) staffing_label += (staffing_label.empty() ? "" : ", ") + label;
        }
        plan["description"] = "Swept from " + base_ + ": " + spelled + ".";
        if (!staffing_label.empty()) {
            plan["role"] = add_role_variant(role, plan_role_ + " (" + staffing_label + ")");
            own_escalation_for(plan, plan["role"].Scalar());
        }
        plan["name"] = name;
        return plan;
    }

private:
    void find_role() {
        for (std::size_t k = 0; k < root_["roles"].size(); ++k) {
            YAML::Node r = root_["roles"][k];
            if (r["name"] && r["name"].Scalar() == plan_role_) role_node_.reset(r);
        }
        if (!root_["escalation"]) return;
        for (std::size_t k = 0; k < root_["escalation"].size(); ++k) {
            YAML::Node e = root_["escalation"][k];
            if (e["from"] && e["from"].Scalar() == plan_role_) {
                escalation_out_.reset(e);
                has_escalation_out_ = true;
            }
        }
    }

    // A plan with its own escalation list keeps it for the copy of its role:
    // the edge out of the role is repeated out of the copy.
    void own_escalation_for(YAML::Node& plan, const std::string& variant) const {
        if (!plan["escalation"] || !plan["escalation"].IsSequence()) return;
        YAML::Node edges = plan["escalation"];
        for (std::size_t k = 0, n = edges.size(); k < n; ++k) {
            const YAML::Node e = edges[k];
            if (e.IsMap() && e["from"] && e["from"].IsScalar() && e["from"].Scalar() == plan_role_) {
                YAML::Node copy = YAML::Clone(e);
                copy["from"] = variant;
                edges.push_back(copy);
            }
        }
    }

    std::string add_role_variant(YAML::Node role, const std::string& variant) {
        if (std::find(role_variants_.begin(), role_variants_.end(), variant) != role_variants_.end()) return variant;
        role_variants_.push_back(variant);
        role["name"] = variant;
        root_["roles"].push_back(role);
        if (has_escalation_out_) {
            YAML::Node edge = YAML::Clone(escalation_out_);
            edge["from"] = variant;
            root_["escalation"].push_back(edge);
        }
        return variant;
    }

    YAML::Node root_;
    YAML::Node base_node_;
    std::string base_;
    const std::vector<SweepAxis>& axes_;
    std::string plan_role_;
    std::vector<bool> staffing_;
    std::vector<std::string> tags_;  // one per axis, for plan names
    YAML::Node role_node_;
    YAML::Node escalation_out_;
    bool has_escalation_out_ = false;
    std::vector<std::string> role_variants_;  // names of role copies made so far
};

// Appends every grid point's plan, the last axis varying fastest, and its
// position to `positions`.
void add_grid_plans(YAML::Node& plans, Grid& grid, const std::vector<SweepAxis>& axes, std::size_t size,
                    std::vector<std::vector<std::size_t>>& positions) {
    std::vector<std::size_t> at(axes.size(), 0);
    for (std::size_t g = 0; g < size; ++g) {
        plans.push_back(grid.plan_at(at));
        positions.push_back(at);
        for (std::size_t a = axes.size(); a-- > 0;) {
            if (++at[a] < axes[a].values.size()) break;
            at[a] = 0;
        }
    }
}

// " in plan 'NAME'" when `field` starts with plans[k] and that plan has a
// name, else nothing.
std::string plan_named_in(const std::string& field, const YAML::Node& plans) {
    constexpr std::string_view prefix = "plans[";
    if (field.rfind(prefix, 0) != 0) return "";
    std::size_t k = 0;
    const char* first = field.data() + prefix.size();
    auto [ptr, ec] = std::from_chars(first, field.data() + field.size(), k);
    if (ec != std::errc() || ptr == first || k >= plans.size() || !plans[k]["name"]) return "";
    return " in plan '" + plans[k]["name"].Scalar() + "'";
}

SweptScenario build_sweep(const std::string& path, const SweepRequest& request) {
    std::ifstream in(path);
    if (!in) throw InputError(path, 0, 0, "", "cannot open scenario file");
    std::stringstream text;
    text << in.rdbuf();
    const std::string dir = std::filesystem::path(path).parent_path().string();
    // Validate the scenario as written first, so its own errors point at its own lines.
    const Scenario original = parse_scenario(text.str(), path, dir);
    YAML::Node root = YAML::Load(text.str());

    std::string base = request.base_plan;
    std::vector<SweepAxis> axes = request.axes;
    read_sweep_section(root, path, request, base, axes);
    if (base.empty()) base = original.simulation.plans.front().name;
    if (axes.empty())
        throw InputError("command line", 0, 0, "--vary", "nothing to sweep: give --vary PATH=VALUES or a sweep section");
    const YAML::Node base_node = find_base_plan(root, base, request, path);
    const std::size_t size = grid_size(axes, request.max_plans);

    Grid grid(root, base_node, base, axes);
    YAML::Node plans(YAML::NodeType::Sequence);
    SweepGrid placed{axes, {}};
    if (request.keep_other_plans)
        for (std::size_t k = 0; k < root["plans"].size(); ++k) {
            plans.push_back(YAML::Clone(root["plans"][k]));
            placed.positions.emplace_back();
        }
    add_grid_plans(plans, grid, axes, size, placed.positions);
    root["plans"] = plans;
    root.remove("sweep");
    YAML::Emitter out;
    out << root;
    try {
        return {parse_scenario(out.c_str(), path + " (swept)", dir), std::move(placed)};
    } catch (const InputError& e) {
        // The generated file's lines mean nothing to the user; name the
        // axes instead, one of which gave the value, and the grid point's
        // plan, whose name holds the values.
        throw axis_error(axes.front(), "a swept value is not valid" + plan_named_in(e.field, plans) + ": " + e.field +
                                           ": " + e.detail);
    }
}

}  // namespace

Scenario sweep_scenario(const std::string& path, const SweepRequest& request) {
    return sweep_with_grid(path, request).scenario;
}

SweptScenario sweep_with_grid(const std::string& path, const SweepRequest& request) {
    // The scenario's own text is checked by parse_scenario first; a yaml-cpp
    // exception from a later step is still the file's, and must name it.
    try {
        return build_sweep(path, request);
    } catch (const YAML::Exception& e) {
        throw InputError(path, e.mark.line >= 0 ? e.mark.line + 1 : 0, e.mark.column >= 0 ? e.mark.column + 1 : 0, "",
                         "cannot sweep this file: " + e.msg);
    }
}

}  // namespace tocsin
