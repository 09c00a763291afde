#include "study/scenario_keys.hpp"

#include <algorithm>
#include <cassert>
#include <charconv>
#include <cmath>
#include <cstdlib>
#include <limits>
#include <map>
#include <sstream>

#include "models/time.hpp"

namespace tocsin {

std::size_t edit_distance(std::string_view a, std::string_view b) {
    std::vector<std::size_t> row(b.size() + 1);
    for (std::size_t j = 0; j <= b.size(); ++j) row[j] = j;
    for (std::size_t i = 1; i <= a.size(); ++i) {
        std::size_t diag = row[0];
        row[0] = i;
        for (std::size_t j = 1; j <= b.size(); ++j) {
            std::size_t up = row[j];
            row[j] = std::min({row[j] + 1, row[j - 1] + 1, diag + (a[i - 1] == b[j - 1] ? 0 : 1)});
            diag = up;
        }
    }
    return row[b.size()];
}

InputError yaml_error(const std::string& file, const YAML::Node& at, std::string field, const std::string& message) {
    const YAML::Mark mark = at.Mark();
    const long line = mark.line >= 0 ? mark.line + 1 : 0;
    const long column = mark.column >= 0 ? mark.column + 1 : 0;
    return InputError(file, line, column, std::move(field), message);
}

const SectionSpec& section_spec(std::string_view path) {
    for (const SectionSpec& s : scenario_sections())
        if (s.path == path) return s;
    assert(false && "unknown section spec");
    throw std::logic_error("unknown section spec " + std::string(path));
}

namespace {

std::string_view kind_name(KeyKind k) {
    switch (k) {
        case KeyKind::integer: return "whole number";
        case KeyKind::real: return "number";
        case KeyKind::text: return "text";
        case KeyKind::clock: return "time of day HH:MM";
        case KeyKind::flag: return "true/false";
        case KeyKind::section: return "section";
        case KeyKind::list: return "list";
    }
    return "?";
}

std::string range_number(double v) {
    std::string s = std::to_string(v);
    s.erase(s.find_last_not_of('0') + 1);
    if (!s.empty() && s.back() == '.') s.pop_back();
    return s;
}

std::string range_text(const KeySpec& k) {
    const Range& r = k.range;
    if (r.min && r.max) return range_number(*r.min) + " to " + range_number(*r.max);
    if (r.min) return ">= " + range_number(*r.min);
    if (r.max) return "<= " + range_number(*r.max);
    return "";
}

std::string default_number(double v) {
    std::ostringstream o;
    o << v;
    return o.str();
}

struct DefaultText {
    std::string operator()(std::monostate) const { return {}; }
    std::string operator()(std::int64_t v) const { return std::to_string(v); }
    std::string operator()(double v) const { return default_number(v); }
    std::string operator()(std::string_view v) const { return std::string(v); }
    std::string operator()(bool v) const { return v ? "true" : "false"; }
    std::string operator()(const std::vector<double>& v) const {
        std::string out = "[";
        for (std::size_t i = 0; i < v.size(); ++i) out += (i ? ", " : "") + default_number(v[i]);
        return out + "]";
    }
};

std::string location_text(const YAML::Mark& m) {
    return "line " + std::to_string(m.line + 1) + ", column " + std::to_string(m.column + 1);
}

std::string node_kind(const YAML::Node& n) {
    if (n.IsSequence()) return "a list";
    if (n.IsMap()) return "a section";
    if (n.IsNull()) return "nothing";
    return "'" + n.Scalar() + "'";
}

// Aliases let a short file name the same mapping many times over; past this
// many visits the walk stops rather than run for ever.
constexpr std::size_t mapping_walk_budget = 1'000'000;

void check_keys_below(const YAML::Node& node, const std::string& file, std::size_t& visits) {
    if (++visits > mapping_walk_budget)
        throw yaml_error(file, node, "", "the document repeats itself through aliases more than " +
                                             std::to_string(mapping_walk_budget) + " times; write it out plainly");
    if (node.IsSequence()) {
        for (const auto& item : node) check_keys_below(item, file, visits);
        return;
    }
    if (!node.IsMap()) return;
    std::map<std::string, YAML::Mark> seen;
    for (auto it = node.begin(); it != node.end(); ++it) {
        if (!it->first.IsScalar())
            throw yaml_error(file, it->first, "",
                             "a key must be a plain name, found " + node_kind(it->first) + " used as a key");
        const std::string key = it->first.Scalar();
        const auto [first, inserted] = seen.emplace(key, it->first.Mark());
        if (!inserted)
            throw yaml_error(file, it->first, key,
                             "key '" + key + "' is given twice in the same section, first at " +
                                 location_text(first->second) + " and again at " + location_text(it->first.Mark()) +
                                 "; keep one");
        check_keys_below(it->second, file, visits);
    }
}

}  // namespace

void check_mapping_keys(const YAML::Node& root, const std::string& file) {
    std::size_t visits = 0;
    check_keys_below(root, file, visits);
}

std::string default_text(const KeySpec& k) {
    if (k.required) return "required";
    if (!std::holds_alternative<std::monostate>(k.fallback)) return std::visit(DefaultText{}, k.fallback);
    return std::string(k.absent);
}

namespace {

template <class T>
KeyDefault default_of(const std::optional<T>& v) {
    if (v) return *v;
    return std::monostate{};
}

KeySpec other(std::string_view name, KeyKind kind, const OtherKey& k) {
    return {.name = name, .kind = kind, .unit = k.unit, .absent = k.absent, .required = k.required, .help = k.help};
}

}  // namespace

KeySpec integer_key(std::string_view name, IntegerKey k) {
    return {.name = name, .kind = KeyKind::integer, .unit = k.unit, .fallback = default_of(k.fallback),
            .absent = k.absent, .required = k.required, .range = k.range, .help = k.help};
}

KeySpec real_key(std::string_view name, RealKey k) {
    return {.name = name, .kind = KeyKind::real, .unit = k.unit, .fallback = default_of(k.fallback),
            .absent = k.absent, .required = k.required, .range = k.range, .help = k.help};
}

KeySpec text_key(std::string_view name, TextKey k) {
    return {.name = name, .kind = KeyKind::text, .unit = k.unit, .fallback = default_of(k.fallback),
            .absent = k.absent, .required = k.required, .help = k.help};
}

KeySpec flag_key(std::string_view name, FlagKey k) {
    return {.name = name, .kind = KeyKind::flag, .fallback = k.fallback, .help = k.help};
}

KeySpec clock_key(std::string_view name, OtherKey k) { return other(name, KeyKind::clock, k); }
KeySpec section_key(std::string_view name, OtherKey k) { return other(name, KeyKind::section, k); }
KeySpec list_key(std::string_view name, OtherKey k) { return other(name, KeyKind::list, k); }

KeySpec real_list_key(std::string_view name, RealListKey k) {
    KeyDefault fallback = std::monostate{};  // an empty list is no default
    if (!k.fallback.empty()) fallback = std::move(k.fallback);
    return {.name = name, .kind = KeyKind::list, .unit = k.unit, .fallback = std::move(fallback),
            .required = k.required, .range = k.range, .help = k.help};
}

const KeySpec& key_spec(std::string_view section_path, std::string_view key) {
    for (const KeySpec& k : section_spec(section_path).keys)
        if (k.name == key) return k;
    assert(false && "key not declared in its section spec");
    throw std::logic_error("undeclared key " + std::string(key));
}

std::string number_problem(const KeySpec& k, double v, std::string_view as_written) {
    const std::string range = range_text(k);
    const std::string expected =
        range.empty() ? std::string() : " (expected " + range + (k.unit.empty() ? "" : " " + std::string(k.unit)) + ")";
    if (!std::isfinite(v)) return "'" + std::string(as_written) + "' is not a finite number" + expected;
    if ((k.range.min && v < *k.range.min) || (k.range.max && v > *k.range.max)) return "'" + std::string(as_written) + "' is out of range" + expected;
    return {};
}

double option_real(const KeySpec& k, std::string_view option, const std::string& text) {
    double v = 0;
    const char* last = text.data() + text.size();
    const auto [ptr, ec] = std::from_chars(text.data(), last, v);
    if (text.empty() || ptr != last || (ec != std::errc() && ec != std::errc::result_out_of_range))
        throw InputError("command line", 0, 0, std::string(option), "expected a number, found '" + text + "'");
    if (ec == std::errc::result_out_of_range) {
        // from_chars leaves v unset: strtod tells a too-large value (kept as
        // the largest double, so it is out of range, not "not finite") from
        // a too-small one (near zero).
        v = std::strtod(text.c_str(), nullptr);
        if (std::isinf(v)) v = std::copysign(std::numeric_limits<double>::max(), v);
    }
    if (std::string problem = number_problem(k, v, text); !problem.empty())
        throw InputError("command line", 0, 0, std::string(option), problem);
    return v;
}

std::int64_t option_integer(const KeySpec& k, std::string_view option, const std::string& text) {
    long long n = 0;
    const char* last = text.data() + text.size();
    const auto [ptr, ec] = std::from_chars(text.data(), last, n);
    if (ec == std::errc::result_out_of_range && ptr == last)
        throw InputError("command line", 0, 0, std::string(option), number_problem(k, std::numeric_limits<double>::max(), text));
    if (text.empty() || ptr != last || ec != std::errc())
        throw InputError("command line", 0, 0, std::string(option), "expected a whole number, found '" + text + "'");
    if (std::string problem = number_problem(k, static_cast<double>(n), text); !problem.empty())
        throw InputError("command line", 0, 0, std::string(option), problem);
    return n;
}

std::string keys_reference_markdown() {
    std::string out;
    for (const SectionSpec& s : scenario_sections()) {
        out += "#### `" + std::string(s.path) + "`\n\n" + std::string(s.help) + "\n\n";
        out += "| key | kind | unit | default | range | meaning |\n| --- | --- | --- | --- | --- | --- |\n";
        for (const KeySpec& k : s.keys) {
            out += "| `" + std::string(k.name) + "` | " + std::string(kind_name(k.kind)) + " | " + std::string(k.unit) +
                   " | " + default_text(k) + " | " +
                   range_text(k) + " | " + std::string(k.help) + " |\n";
        }
        out += "\n";
    }
    return out;
}

Section::Section(const YAML::Node& node, std::string_view spec_path, std::string file, std::string where)
    : node_(node), spec_(&section_spec(spec_path)), file_(std::move(file)), where_(std::move(where)) {
    if (!node_.IsMap())
        throw yaml_error(file_, node_, where_, "expected a section of keys (" + std::string(spec_->help) + ")");
    for (auto it = node_.begin(); it != node_.end(); ++it) {
        const std::string key = it->first.as<std::string>();
        const bool known = std::any_of(spec_->keys.begin(), spec_->keys.end(), [&](const KeySpec& k) { return k.name == key; });
        if (known) continue;
        std::string_view best;
        std::size_t best_d = SIZE_MAX;
        for (const KeySpec& k : spec_->keys) {
            std::size_t d = edit_distance(key, k.name);
            if (d < best_d) best_d = d, best = k.name;
        }
        std::string valid;
        for (const KeySpec& k : spec_->keys) valid += (valid.empty() ? "" : ", ") + std::string(k.name);
        std::string message = "unknown key '" + key + "' in " + where_;
        if (!best.empty() && best_d <= std::max<std::size_t>(2, key.size() / 3))
            message += "; did you mean '" + std::string(best) + "'?";
        message += " (valid keys: " + valid + ")";
        throw yaml_error(file_, it->first, where_ + "." + key, message);
    }
    for (const KeySpec& k : spec_->keys)
        if (k.required && !has(k.name))
            throw yaml_error(file_, node_, where_ + "." + std::string(k.name),
                             "required key '" + std::string(k.name) + "' is missing (" + std::string(k.help) + ")");
}

const KeySpec& Section::spec(std::string_view key) const {
    for (const KeySpec& k : spec_->keys)
        if (k.name == key) return k;
    assert(false && "key not declared in its section spec");
    throw std::logic_error("undeclared key " + std::string(key));
}

bool Section::has(std::string_view key) const {
    spec(key);
    const YAML::Node v = node_[std::string(key)];
    return v.IsDefined() && !v.IsNull();
}

YAML::Node Section::value(std::string_view key) const { return node_[std::string(key)]; }

void Section::fail(std::string_view key, const std::string& message) const {
    YAML::Node v = value(key);
    throw error(v.IsDefined() ? v : node_, key, message);
}

InputError Section::error(const YAML::Node& at, std::string_view key, const std::string& message) const {
    return yaml_error(file_, at, where_ + "." + std::string(key), message);
}

double Section::check_range(std::string_view key, double v) const {
    const YAML::Node at = value(key);
    if (std::string problem = number_problem(spec(key), v, at.IsScalar() ? at.Scalar() : std::to_string(v));
        !problem.empty())
        fail(key, problem);
    return v;
}

std::optional<double> Section::optional_real(std::string_view key) const {
    assert(spec(key).kind == KeyKind::real);
    if (!has(key)) return std::nullopt;
    YAML::Node v = value(key);
    double d = 0;
    if (!v.IsScalar() || !YAML::convert<double>::decode(v, d))
        fail(key, "expected a number" + (spec(key).unit.empty() ? std::string() : " of " + std::string(spec(key).unit)) +
                      ", found '" + (v.IsScalar() ? v.Scalar() : std::string("a list or section")) + "'");
    return check_range(key, d);
}

namespace {

// The declared default of `k`, of type T; a key read with a default must declare one.
template <class T>
T declared_default(const KeySpec& k) {
    const T* v = std::get_if<T>(&k.fallback);
    assert(v && "key read with its default declares none of this type");
    if (!v) throw std::logic_error("key '" + std::string(k.name) + "' declares no default of this type");
    return *v;
}

}  // namespace

double Section::real(std::string_view key) const {
    if (auto v = optional_real(key)) return *v;
    return declared_default<double>(spec(key));
}

std::optional<std::int64_t> Section::optional_integer(std::string_view key) const {
    assert(spec(key).kind == KeyKind::integer);
    if (!has(key)) return std::nullopt;
    YAML::Node v = value(key);
    long long n = 0;
    if (!v.IsScalar() || !YAML::convert<long long>::decode(v, n)) {
        // .inf, .nan and 1e30 read as numbers: say what is wrong with them
        // rather than only that they are not whole.
        double d = 0;
        if (v.IsScalar() && YAML::convert<double>::decode(v, d) && (!std::isfinite(d) || std::fabs(d) > 9.2e18))
            check_range(key, std::isfinite(d) ? d : std::numeric_limits<double>::quiet_NaN());
        fail(key, "expected a whole number, found '" + (v.IsScalar() ? v.Scalar() : std::string("a list or section")) + "'");
    }
    check_range(key, static_cast<double>(n));
    return n;
}

std::int64_t Section::integer(std::string_view key) const {
    if (auto v = optional_integer(key)) return *v;
    return declared_default<std::int64_t>(spec(key));
}

std::string Section::text(std::string_view key) const {
    if (!has(key)) {
        const KeySpec& k = spec(key);
        return std::holds_alternative<std::monostate>(k.fallback) ? std::string()
                                                                 : std::string(declared_default<std::string_view>(k));
    }
    YAML::Node v = value(key);
    if (!v.IsScalar()) fail(key, "expected text, found a list or section");
    return v.Scalar();
}

std::optional<int> Section::clock(std::string_view key) const {
    assert(spec(key).kind == KeyKind::clock);
    if (!has(key)) return std::nullopt;
    YAML::Node v = value(key);
    std::optional<int> m;
    if (v.IsScalar()) m = parse_clock_minutes(v.Scalar());
    if (!m) fail(key, "expected a local time of day as \"HH:MM\" (quoted), found '" + (v.IsScalar() ? v.Scalar() : std::string("?")) + "'");
    return m;
}

bool Section::flag(std::string_view key) const {
    if (!has(key)) return declared_default<bool>(spec(key));
    YAML::Node v = value(key);
    bool b = false;
    if (!v.IsScalar() || !YAML::convert<bool>::decode(v, b)) fail(key, "expected true or false");
    return b;
}

YAML::Node Section::child(std::string_view key) const {
    if (!has(key)) return YAML::Node();
    YAML::Node v = value(key);
    const KeySpec& k = spec(key);
    if (k.kind == KeyKind::section && !v.IsMap()) fail(key, "expected a section of keys");
    if (k.kind == KeyKind::list && !v.IsSequence()) fail(key, "expected a list (one '- ' item per entry)");
    return v;
}

std::vector<std::string> Section::text_list(std::string_view key) const {
    std::vector<std::string> out;
    if (!has(key)) return out;
    YAML::Node v = child(key);
    for (const auto& item : v) {
        if (!item.IsScalar()) throw error(item, key, "expected a list of text values");
        out.push_back(item.Scalar());
    }
    return out;
}

std::vector<double> Section::real_list(std::string_view key) const {
    std::vector<double> out;
    if (!has(key)) {
        const KeySpec& k = spec(key);
        return std::holds_alternative<std::monostate>(k.fallback) ? out : declared_default<std::vector<double>>(k);
    }
    YAML::Node v = child(key);
    for (const auto& item : v) {
        double d = 0;
        if (!item.IsScalar() || !YAML::convert<double>::decode(item, d)) throw error(item, key, "expected a list of numbers");
        if (!std::isfinite(d)) throw error(item, key, "'" + item.Scalar() + "' is not a finite number");
        out.push_back(d);
    }
    return out;
}

}  // namespace tocsin
