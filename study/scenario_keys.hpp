#pragma once
// Scenario keys are declared once, in study/scenario_schema.cpp, with their kind,
// unit, typed default, valid range and one line of help. The same table drives
// validation, the loader's defaults, error messages ("did you mean ...?"),
// `tocsin keys` and the README's reference section, so they never disagree.
#include <cstdint>
#include <optional>
#include <string>
#include <string_view>
#include <variant>
#include <vector>

#include <yaml-cpp/yaml.h>

#include "models/errors.hpp"

namespace tocsin {

enum class KeyKind { integer, real, text, clock, flag, section, list };

// Inclusive bounds of a numeric key; a side left empty is open. `any_range`
// (both open) is the range of every key that is not a number.
struct Range {
    std::optional<double> min{};
    std::optional<double> max{};
};
inline constexpr Range any_range{};

// A key's value when the file leaves it out, of the key's own type: a whole
// number, a number, text, a flag or a list of numbers. `std::monostate` for a
// required key, or for an optional one whose absence means something that is
// not a value (its `absent` word says what, e.g. "none").
using KeyDefault = std::variant<std::monostate, std::int64_t, double, std::string_view, bool, std::vector<double>>;

struct KeySpec {
    std::string_view name{};
    KeyKind kind = KeyKind::text;
    std::string_view unit{};    // e.g. "minutes", "points"; empty when none
    KeyDefault fallback{};      // the value when left out
    std::string_view absent{};  // what leaving it out means when no value stands in ("none", "all", ...)
    bool required = false;
    Range range{};              // numbers only
    std::string_view help{};
};

// The default as the reference shows it: "required", the value, or the word
// for what absence means ("none"); empty when there is none of these.
std::string default_text(const KeySpec& k);

// Declaring keys, one builder per kind so a default has the key's type:
//   real_key("window_hours", {.unit = "hours", .fallback = 24, .range = {0.0166, 24 * 365}, .help = "..."})
struct IntegerKey {
    std::string_view unit{};
    std::optional<std::int64_t> fallback{};
    std::string_view absent{};
    bool required = false;
    Range range{};
    std::string_view help{};
};
struct RealKey {
    std::string_view unit{};
    std::optional<double> fallback{};
    std::string_view absent{};
    bool required = false;
    Range range{};
    std::string_view help{};
};
struct TextKey {
    std::string_view unit{};
    std::optional<std::string_view> fallback{};
    std::string_view absent{};
    bool required = false;
    std::string_view help{};
};
struct FlagKey {
    bool fallback = false;
    std::string_view help{};
};
struct OtherKey {  // a clock time, a section or a list
    std::string_view unit{};
    std::string_view absent{};
    bool required = false;
    std::string_view help{};
};
struct RealListKey {  // a list of numbers
    std::string_view unit{};
    std::vector<double> fallback{};
    bool required = false;
    Range range{};  // of each number
    std::string_view help{};
};
KeySpec integer_key(std::string_view name, IntegerKey k);
KeySpec real_key(std::string_view name, RealKey k);
KeySpec text_key(std::string_view name, TextKey k);
KeySpec flag_key(std::string_view name, FlagKey k);
KeySpec clock_key(std::string_view name, OtherKey k);
KeySpec section_key(std::string_view name, OtherKey k);
KeySpec list_key(std::string_view name, OtherKey k);
KeySpec real_list_key(std::string_view name, RealListKey k);

struct SectionSpec {
    std::string_view path;  // e.g. "plans[].rule"
    std::string_view help;
    std::vector<KeySpec> keys;
};

// Every section of the scenario file, in reference order.
const std::vector<SectionSpec>& scenario_sections();
const SectionSpec& section_spec(std::string_view path);
// Markdown reference of every key, for `tocsin keys` and the README.
std::string keys_reference_markdown();

// Reads one YAML mapping against its SectionSpec. Unknown keys, wrong types
// and out-of-range values are InputErrors at the key's file:line:column.
class Section {
public:
    Section(const YAML::Node& node, std::string_view spec_path, std::string file, std::string where);

    bool has(std::string_view key) const;
    // The value given, or else the key's declared default; a key read this
    // way must have one (or be required). Text with neither reads as empty.
    double real(std::string_view key) const;
    std::optional<double> optional_real(std::string_view key) const;
    std::int64_t integer(std::string_view key) const;
    std::optional<std::int64_t> optional_integer(std::string_view key) const;
    std::string text(std::string_view key) const;
    std::optional<int> clock(std::string_view key) const;  // "HH:MM" -> minutes after midnight
    bool flag(std::string_view key) const;
    YAML::Node child(std::string_view key) const;  // a sub-section or list; null when absent
    std::vector<std::string> text_list(std::string_view key) const;
    std::vector<double> real_list(std::string_view key) const;  // the declared default when absent

    const std::string& file() const { return file_; }
    const std::string& where() const { return where_; }
    [[noreturn]] void fail(std::string_view key, const std::string& message) const;
    InputError error(const YAML::Node& at, std::string_view key, const std::string& message) const;

    const KeySpec& spec(std::string_view key) const;  // the key's declaration

private:
    YAML::Node value(std::string_view key) const;
    double check_range(std::string_view key, double v) const;
    YAML::Node node_;
    const SectionSpec* spec_;
    std::string file_;
    std::string where_;
};

// What is wrong with `v` as a value of the numeric key `k`, written as
// `as_written`; empty when nothing is. Scenario keys and the command-line
// options that stand for them (or carry a KeySpec of their own) all go
// through this one check, so a range is declared once and worded alike.
std::string number_problem(const KeySpec& k, double v, std::string_view as_written);
const KeySpec& key_spec(std::string_view section_path, std::string_view key);

// A command-line option read against a KeySpec; a problem is an InputError
// naming "command line" and the option.
double option_real(const KeySpec& k, std::string_view option, const std::string& text);
std::int64_t option_integer(const KeySpec& k, std::string_view option, const std::string& text);

// Every mapping in the document: each key a plain name, none given twice.
// yaml-cpp keeps the first of two equal keys and drops nothing visibly, and
// throws its own exception for a list or section used as a key.
void check_mapping_keys(const YAML::Node& root, const std::string& file);

// Error for a node that is not where a section expected it.
InputError yaml_error(const std::string& file, const YAML::Node& at, std::string field, const std::string& message);
std::size_t edit_distance(std::string_view a, std::string_view b);

}  // namespace tocsin
