#pragma once
// The what-if page: one self-contained HTML file (inline style, inline SVG
// drawn by a small inline script, the figures as JSON in the page; no
// network, no font file) in which a committee moves a control per swept key
// and sees at once the plan of the precomputed grid at that point: its
// figures with their intervals, its place on the burden/benefit frontier and
// its neighbours, and whether it is within the budget.
//
// Every figure of a plan is carried twice: as shown (rounded for people,
// format_real) and exact (format_number, the text the CSV tables hold), so
// what the page shows can be checked against the CSV row of the plan; a
// ward's figures are carried as shown only, which keeps a 500-plan page of a
// twenty-ward hospital within 2 MB. Every name is text:
// the JSON escapes < > & U+2028 U+2029 so no name can close its script
// element, and the page's script inserts names with textContent only.
#include <cstddef>
#include <limits>
#include <optional>
#include <string>
#include <vector>

namespace tocsin {

struct WhatIfAxis {
    std::string key;    // as swept, e.g. "plan.rule.threshold"
    std::string label;  // for people, e.g. "threshold"
    std::vector<std::string> values;
};

struct WhatIfFigure {
    std::string name;   // the metric's column value in the CSV tables
    std::string label;  // for people
    int decimals = 2;   // shown with at most this many decimals
};

// A mean over replications and its interval; NaN where there is none.
struct WhatIfValue {
    static constexpr double none = std::numeric_limits<double>::quiet_NaN();
    double mean = none, low = none, high = none;
};

struct WhatIfPlan {
    std::string name;
    std::vector<std::size_t> at;  // its value's index on each axis; empty: not on the grid
    std::string channel;          // e.g. "page"
    std::string burden_unit;      // the channel's own unit of burden
    std::string group;            // the plans it is ranked with on the frontier, e.g. "page plans"
    bool on_frontier = false;
    std::optional<bool> within_budget;  // empty: no budget question asked
    WhatIfValue burden, benefit;
    std::vector<WhatIfValue> figures;             // one per WhatIfInput::figures
    std::vector<std::vector<WhatIfValue>> wards;  // [unit][WhatIfInput::ward_figures]
};

struct WhatIfInput {
    std::string title;
    std::string question;
    std::string cautions;       // empty: cautions_text()
    std::string interval_note;  // what the brackets are
    std::vector<WhatIfAxis> axes;  // empty: one control choosing among the plans
    std::vector<WhatIfFigure> figures;
    std::vector<std::string> units;
    std::vector<WhatIfFigure> ward_figures;
    WhatIfFigure burden, benefit;  // the frontier's axes
    std::string budget_answer;     // empty: no budget question asked
    std::vector<WhatIfPlan> plans;
};

// The page's embedded data: JSON safe inside <script type="application/json">.
std::string whatif_data_json(const WhatIfInput& input);
std::string render_whatif_page(const WhatIfInput& input);

}  // namespace tocsin
