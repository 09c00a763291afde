#pragma once
// The report a committee member opens: one self-contained HTML file (inline
// style and inline SVG; no script, no font file, no network). The run fills a
// ReportInput; render_report turns it into the page. Every string in the
// input is treated as untrusted and escaped. Same input, same bytes.
//
// "Empty means not given": a section whose input is empty (an empty vector,
// a Table without columns, an empty optional) is left out of the page, and so
// is its entry in the contents. The question, the cautions and the run record
// are always there.
#include <cstdint>
#include <limits>
#include <map>
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "report/svg.hpp"
#include "report/table.hpp"

namespace tocsin {

// One plan's values of a figure, e.g. pages per unit per night, one value per
// unit-night (pooled over replications) or one per replication.
struct PlanSeries {
    std::string plan;
    std::vector<double> values;
};

// One plan on the burden-benefit plane. `*_lo` / `*_hi` are the ends of the
// interval of each figure (NaN when there is none); `on_frontier` is true when
// no other plan has lower-or-equal burden and higher-or-equal benefit with one
// of them strictly better.
struct ReportFrontierPoint {
    std::string plan;
    static constexpr double none = std::numeric_limits<double>::quiet_NaN();
    double burden = 0, burden_lo = none, burden_hi = none;
    double benefit = 0, benefit_lo = none, benefit_hi = none;
    bool on_frontier = false;
    std::string group;  // the plans it is compared with, e.g. "page plans"; empty: all plans
    std::size_t series = 0;  // index into ReportInput::frontier_series (the score the plan reads)
};

// How the numbers were made, printed at the end of the report. Leave `threads`
// and `seconds_taken` empty when the report must be byte-identical across
// thread counts and machines.
struct RunRecord {
    std::string tool_version;
    std::string scenario_name;
    std::string scenario_hash;
    std::uint64_t seed = 0;
    std::int64_t replications = 0;
    std::optional<unsigned> threads;
    std::optional<double> seconds_taken;
    std::vector<std::pair<std::string, std::string>> other;  // further (label, value) lines, in this order
};

struct ReportInput {
    std::string title;     // e.g. the scenario's name
    std::string question;  // the scenario's description: the question in plain words
    std::vector<std::string> key_findings;  // optional one-line answers shown under the question
    std::vector<std::string> assumptions;   // one plain-word line each
    std::string cautions;  // empty: cautions_text(); the report always carries cautions

    // Column headers for people, keyed by column name, used by every table.
    std::map<std::string, std::string> column_labels;

    // Plans side by side. Columns `x`, `x_lo`, `x_hi` are shown as "x (lo to hi)".
    Table comparison;
    std::string interval_note;             // e.g. "Brackets: 95% interval over 200 replications (percentile method)."
    std::optional<Table> differences;      // paired differences between plans, same interval columns
    std::string differences_note;

    // Names of the two figures the frontier trades off.
    std::string burden_label = "pages per unit per night";
    std::string benefit_label = "cases caught with at least the minimum lead";
    std::optional<double> burden_limit;    // the committee's budget in burden_label units, drawn on the frontier
    std::vector<std::string> frontier_series;  // with several scores: each score's name, marked apart on the frontier
    std::string budget_answer;             // plain-word answer to the budget question, if asked
    std::vector<ReportFrontierPoint> frontier;  // one chart per group, in the order groups first appear
    std::string comparison_basis;          // which plans are ranked together on the burden, and why
    std::optional<Table> channel_units;    // each plan's burden in its channel's own unit, with intervals
    std::string channel_units_note;

    // Each plan on each ward, interval columns as in `comparison`.
    std::optional<Table> per_ward;
    std::string per_ward_intro, per_ward_note;

    // Who is reached: each plan's benefit and burden by patient group, and the score by group.
    std::vector<IntervalChart> group_charts;
    std::vector<Table> group_tables;
    std::vector<std::string> group_lines;  // gaps between groups, thin and suppressed groups
    std::string group_intro, group_note;

    std::vector<PlanSeries> burden_per_night;
    std::string burden_per_night_label = "notices per unit per night";
    std::string burden_note;               // what one value is, e.g. "one unit-night of one replication"
    std::optional<double> per_night_limit; // a budget in burden_per_night_label units, drawn on that chart

    std::vector<PlanSeries> lead_times_hours;                  // from the first notice
    std::vector<PlanSeries> lead_times_from_evaluation_hours;  // from the start of the first evaluation
    std::string lead_time_note;

    std::optional<Table> staff_and_waits;  // staff minutes and task waits by role
    std::string staff_note;

    std::optional<Table> outcomes_averted;  // only with a declared averted effect
    std::string outcomes_averted_note;

    std::optional<Table> acceptance_by_load;  // plans that declare fatigue: realised against declared
    std::string acceptance_note;

    // Two scores of the same stays: the paired comparison, and both ROC curves.
    std::vector<Table> score_comparison_tables;
    std::optional<LineChart> score_comparison_roc;
    std::optional<LineChart> score_comparison_curves;  // decision curves, when the scores are probabilities
    std::string score_comparison_intro, score_comparison_note;
    std::vector<Table> evaluation_tables;       // model-evaluation measures
    std::vector<LineChart> evaluation_charts;   // e.g. roc_chart(), calibration_chart(), decision_curve_chart()
    std::string evaluation_note;

    RunRecord run;
};

// Ready-made evaluation charts with the usual axes and reference lines.
LineChart roc_chart(std::vector<CurvePoint> false_positive_rate_vs_sensitivity, const std::string& curve_name = "score");
LineChart calibration_chart(std::vector<CurvePoint> predicted_vs_observed, const std::string& curve_name = "score");
// Net benefit against threshold probability for the score, beside "evaluate
// everyone" (`treat_all`) and "evaluate no one" (net benefit 0).
LineChart decision_curve_chart(std::vector<CurvePoint> score, std::vector<CurvePoint> treat_all,
                               const std::string& curve_name = "score");

std::string render_report(const ReportInput& input);

}  // namespace tocsin
