// A real run whose scenario, unit, plan and role names are hostile but valid
// text (quotes, backslashes, markup, a comma, emoji), every output read back by
// Python's standard json and csv modules, as strictly as they allow.
#include <doctest/doctest.h>

#include <string>

#include "test_support.hpp"

using namespace tocsin::testing;

namespace {

const std::string source_dir = TOCSIN_SOURCE_DIR;

// Replaces the one occurrence of `from` in `text` (the test fails when there
// is none or more than one, so a change to the demo cannot silently weaken it).
void replace_once(std::string& text, const std::string& from, const std::string& to) {
    const std::size_t at = text.find(from);
    REQUIRE_MESSAGE(at != std::string::npos, "demo.yaml no longer holds: " << from);
    REQUIRE_MESSAGE(text.find(from, at + 1) == std::string::npos, "demo.yaml holds more than one: " << from);
    text.replace(at, from.size(), to);
}

void replace_all(std::string& text, const std::string& from, const std::string& to) {
    for (std::size_t at = text.find(from); at != std::string::npos; at = text.find(from, at + to.size()))
        text.replace(at, from.size(), to);
}

}  // namespace

TEST_CASE("reference.hostile_names_make_strict_json_and_csv") {
    if (run_command("/usr/bin/python3 -c 'import json, csv'").exit_code != 0) {
        MESSAGE("SKIPPED: /usr/bin/python3 is not available");
        return;
    }
    // Each name as it should come back, and as YAML double-quoted text.
    const std::string scenario = "Ward \"Q\" \\ </script><b>bold</b> \xF0\x9F\x9A\x91, \xC3\xA9t\xC3\xA9";
    const std::string unit = "4 North, \"medicine\" <b>\\";
    const std::string plan = "page \"70\" </script> \xF0\x9F\x93\x9F, \\n not a newline";
    const std::string role = "rapid \\ response \"nurse\" <i>\xE2\x80\x94</i> \xF0\x9F\x91\xA9\xE2\x80\x8D\xE2\x9A\x95\xEF\xB8\x8F";
    auto yaml_quoted = [](const std::string& s) {
        std::string q = "\"";
        for (char c : s) {
            if (c == '"' || c == '\\') q += '\\';
            q += c;
        }
        return q + "\"";
    };
    std::string yaml = read_file(source_dir + "/scenarios/demo.yaml");
    replace_once(yaml, "name: Fernhollow District Hospital - deterioration pager, three wards (invented)",
                 "name: " + yaml_quoted(scenario));
    replace_once(yaml, "{name: 4 North medicine,", "{name: " + yaml_quoted(unit) + ",");
    replace_once(yaml, "name: page-70\n", "name: " + yaml_quoted(plan) + "\n");
    replace_once(yaml, "- name: rapid response nurse\n", "- name: " + yaml_quoted(role) + "\n");
    replace_once(yaml, "{from: rapid response nurse,", "{from: " + yaml_quoted(role) + ",");
    replace_all(yaml, "role: rapid response nurse\n", "role: " + yaml_quoted(role) + "\n");

    ScratchDir dir;
    const std::string path = dir.file("hostile.yaml", yaml);
    const auto r = run_tocsin("run " + path + " --replications 2 --threads 2 --notice-log --task-log --out " +
                              dir.path("out"));
    INFO(r.output);
    REQUIRE(r.exit_code == 0);
    const std::string expected = dir.file("expected.txt", "json\t" + scenario + "\nboth\t" + unit + "\nboth\t" + plan +
                                                              "\nboth\t" + role + "\n");
    const auto check = run_command("/usr/bin/python3 " + source_dir + "/tests/reference/strict_outputs.py " +
                                   dir.path("out") + " " + expected);
    INFO(check.output);
    CHECK(check.exit_code == 0);
    CHECK(check.output.find("ok: ") != std::string::npos);
}
