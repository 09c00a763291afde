#pragma once
// What `tocsin check` says will be simulated, as items built from a scenario.
// Two renderings read them: the terminal text of `tocsin check` (to_text) and
// the report's list of assumptions (report/report_run.cpp).
#include <string>
#include <vector>

#include "sim/rules.hpp"

namespace tocsin {

struct Scenario;

// One statement about the scenario. A list (the plans, the staff) is an item
// whose sub-items are its entries, each named by `entry_label` ("Plan",
// "Role") when it stands alone; an entry's own sub-items are the statements
// about it.
struct DescriptionItem {
    std::string text;                    // e.g. "Time zone: ...", "Plans (5)", "page-70: page to ..."
    std::string entry_label;             // for a list: what one entry is
    std::vector<DescriptionItem> items;  // a list's entries, or an entry's statements
};

struct ScenarioDescription {
    std::string name;
    std::string question;  // the scenario's description; empty when none
    std::vector<DescriptionItem> items;
};

ScenarioDescription scenario_description(const Scenario& scenario);
// The terminal text of `tocsin check`: the name, the question indented, one
// line per item, a list's entries as "  - " lines with their statements below.
std::string to_text(const ScenarioDescription& description);
std::string describe_scenario(const Scenario& scenario);  // to_text(scenario_description(scenario))
std::string describe_rule(const Rule& rule, const std::string& score_label);

}  // namespace tocsin
