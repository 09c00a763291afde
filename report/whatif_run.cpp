#include "report/whatif_run.hpp"

#include <algorithm>

#include "analysis/comparison.hpp"
#include "analysis/unit_figures.hpp"

namespace tocsin {

namespace {

// The figures the page shows, in order, with their decimals: the burden per
// ward per night (mean, 90th percentile, the worst ward's), patients reached
// and how early, the channel's own burden, staff minutes and waits.
const std::vector<std::pair<const char*, int>> page_figures = {
    {"per_unit_night_mean", 2},          {"per_unit_night_p90", 1},  {"worst_unit_night_p90", 1},
    {"patients_per_unit_night_mean", 2}, {"caught", 1},              {"sensitivity", 2},
    {"lead_median_h", 1},                {"channel_burden_mean", 2}, {"staff_minutes_per_unit_shift", 1},
    {"wait_median_min", 1},              {"wait_p90_min", 1}};
const std::vector<std::pair<const char*, int>> page_ward_figures = {{"per_unit_night_mean", 2},
                                                                    {"per_unit_night_p90", 1}};

// The very values the CSV tables print (a non-finite one is an empty cell in both).
WhatIfValue value_of(const MeanInterval& m) { return {m.mean, m.low, m.high}; }

// A figure no plan has (staff minutes without roles) is left off the page.
bool defined_for_some_plan(const ReplicatedFigures& f, std::size_t metric) {
    for (std::size_t p = 0; p < f.plans.size(); ++p)
        if (mean_interval(f.of(p, metric)).n > 0) return true;
    return false;
}

int decimals_of(const std::vector<WhatIfFigure>& shown, const Metric& m) {
    for (const WhatIfFigure& f : shown)
        if (f.name == m.name) return f.decimals;
    return 2;
}

WhatIfFigure figure_of(const Metric& m, int decimals) { return {std::string(m.name), std::string(m.label), decimals}; }

// A label for people from an axis path: the path after "plan." or "roles.",
// without "rule", in words ("plan.rule.snooze_minutes" -> "snooze minutes",
// "roles.cover nurse.roster.night" -> "cover nurse roster night").
std::string axis_label(const std::string& path) {
    std::string label;
    std::size_t start = path.find('.') == std::string::npos ? 0 : path.find('.') + 1;
    while (start <= path.size()) {
        const std::size_t end = std::min(path.find('.', start), path.size());
        const std::string part = path.substr(start, end - start);
        if (part != "rule" && !part.empty()) label += (label.empty() ? "" : " ") + part;
        start = end + 1;
    }
    std::replace(label.begin(), label.end(), '_', ' ');
    return label.empty() ? path : label;
}

std::vector<WhatIfAxis> axes_of(const SweepGrid& grid) {
    std::vector<WhatIfAxis> axes;
    for (const SweepAxis& a : grid.axes) axes.push_back({a.path, axis_label(a.path), a.values});
    return axes;
}

void add_frontier_and_budget(WhatIfInput& in, const RunOutput& out, std::size_t burden, std::size_t benefit) {
    const ReplicatedFigures& f = out.figures;
    const auto groups = comparison_groups(f, burden);
    for (const FrontierPoint& point : frontier(f, burden, benefit)) {
        WhatIfPlan& p = in.plans[point.plan];
        p.on_frontier = point.on_frontier;
        const ComparisonGroup& g = groups[point.group];
        p.group = g.channel ? std::string(to_string(*g.channel)) + " plans" : std::string("all plans");
    }
    if (in.budget_answer.empty()) return;
    for (WhatIfPlan& p : in.plans) p.within_budget = false;
    for (const BudgetAnswer& a : out.budget)
        for (std::size_t p : a.within) in.plans[p].within_budget = true;
}

}  // namespace

WhatIfInput whatif_input_for_run(const Scenario& sc, const RunOutput& out, const RunSettings& settings,
                                 const ReportInput& report, const SweepGrid* grid) {
    const ReplicatedFigures& f = out.figures;
    WhatIfInput in;
    in.title = sc.name;
    in.question = sc.description;
    in.interval_note = report.interval_note;  // cautions left empty: cautions_text(), as in the report
    in.budget_answer = report.budget_answer;
    if (grid) in.axes = axes_of(*grid);
    std::vector<std::size_t> metrics;
    for (const auto& [name, decimals] : page_figures) {
        const Metric* m = find_metric(name);
        if (!m || !defined_for_some_plan(f, metric_index(*m))) continue;
        metrics.push_back(metric_index(*m));
        in.figures.push_back(figure_of(*m, decimals));
    }
    const Metric& burden = *find_metric(settings.burden_metric);
    const Metric& benefit = *find_metric(settings.benefit_metric);
    in.burden = figure_of(burden, decimals_of(in.figures, burden));
    in.benefit = figure_of(benefit, decimals_of(in.figures, benefit));
    const ReplicatedUnitFigures& u = out.unit_figures;
    in.units = u.units;
    std::vector<std::size_t> ward_metrics;
    for (const auto& [name, decimals] : page_ward_figures) {
        ward_metrics.push_back(unit_metric_index(name));
        const UnitMetric& m = unit_metrics()[ward_metrics.back()];
        in.ward_figures.push_back({std::string(m.name), std::string(m.label), decimals});
    }
    const auto& burdens = out.first_replication.channels.burden;
    for (std::size_t p = 0; p < f.plans.size(); ++p) {
        WhatIfPlan plan;
        plan.name = f.plans[p];
        if (grid && p < grid->positions.size()) plan.at = grid->positions[p];
        if (p < f.channels.size()) plan.channel = std::string(to_string(f.channels[p]));
        if (p < burdens.size()) plan.burden_unit = burdens[p].burden;
        plan.burden = value_of(mean_interval(f.of(p, metric_index(burden))));
        plan.benefit = value_of(mean_interval(f.of(p, metric_index(benefit))));
        for (std::size_t m : metrics) plan.figures.push_back(value_of(mean_interval(f.of(p, m))));
        for (std::size_t w = 0; w < u.units.size() && p < u.plans.size(); ++w) {
            plan.wards.emplace_back();
            for (std::size_t m : ward_metrics) plan.wards.back().push_back(value_of(mean_interval(u.of(p, w, m))));
        }
        in.plans.push_back(std::move(plan));
    }
    add_frontier_and_budget(in, out, metric_index(burden), metric_index(benefit));
    return in;
}

}  // namespace tocsin
