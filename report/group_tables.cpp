#include "report/group_tables.hpp"

#include <algorithm>

#include "analysis/comparison.hpp"
#include "models/text.hpp"
#include "report/cells.hpp"

namespace tocsin {

namespace {

Cell count_or_suppressed(std::int64_t value, bool suppressed) { return suppressed ? Cell() : Cell(value); }
template <typename T>
Cell figure_or_suppressed(const std::optional<T>& value, bool suppressed) {
    return suppressed ? Cell() : cell_or_empty(value);
}

std::string share(double v) { return format_real(v, 2); }
std::string with_interval(double value, Interval i) {
    return share(value) + " (95% CI " + share(i.lower) + " to " + share(i.upper) + ")";
}

}  // namespace

Table plan_group_summary_table(const std::vector<GroupFigures>& rows, std::uint64_t replication) {
    Table t = make_table("plan_group_summary", "Who is reached: plans by patient group (replication " +
                                                   std::to_string(replication) + ")",
                         {"plan", "group", "value", "suppressed", "encounters", "patient_days", "notices",
                          "notices_per_100_patient_days", "notice_ppv", "cases", "caught", "sensitivity",
                          "sensitivity_ci_low", "sensitivity_ci_high", "lead_median_h"});
    for (const GroupFigures& g : rows) {
        const bool s = g.suppressed;
        const bool rate = !s && g.sensitivity;
        t.add_row({g.plan, g.group, g.value, flag_cell(s), count_or_suppressed(g.encounters, s),
                   s ? Cell() : Cell(g.patient_days), count_or_suppressed(g.notices, s),
                   figure_or_suppressed(g.notices_per_100_patient_days, s), figure_or_suppressed(g.notice_ppv, s),
                   count_or_suppressed(g.cases, s), count_or_suppressed(g.caught, s),
                   figure_or_suppressed(g.sensitivity, s), rate ? Cell(g.sensitivity_interval.lower) : Cell(),
                   rate ? Cell(g.sensitivity_interval.upper) : Cell(), figure_or_suppressed(g.lead_median_hours, s)});
    }
    return t;
}

Table plan_group_comparison_table(const ReplicatedGroupFigures& f) {
    Table t = make_table("plan_group_comparison", "Who is reached across replications (mean and 95% CI)",
                         {"plan", "group", "value", "metric", "mean", "ci_low", "ci_high", "replications"});
    const auto& metrics = group_metrics();
    for (std::size_t p = 0; p < f.plans.size(); ++p)
        for (std::size_t r = 0; r < f.rows.size(); ++r)
            for (std::size_t m = 0; m < metrics.size(); ++m) {
                const MeanInterval mi = mean_interval(f.of(p, r, m));
                t.add_row({f.plans[p], f.rows[r].first, f.rows[r].second, std::string(metrics[m].name),
                           finite_or_empty(mi.mean), finite_or_empty(mi.low), finite_or_empty(mi.high),
                           static_cast<std::int64_t>(mi.n)});
            }
    return t;
}

Table plan_group_differences_table(const ReplicatedGroupFigures& f) {
    Table t = make_table("plan_group_differences",
                         "Each group against its column's first value, paired by replication (mean and 95% CI)",
                         {"plan", "group", "value", "compared_with", "metric", "mean", "ci_low", "ci_high",
                          "replications"});
    std::vector<std::size_t> first(f.rows.size());
    for (std::size_t r = 0; r < f.rows.size(); ++r)
        first[r] = r > 0 && f.rows[r].first == f.rows[r - 1].first ? first[r - 1] : r;
    for (std::size_t p = 0; p < f.plans.size(); ++p)
        for (std::size_t r = 0; r < f.rows.size(); ++r) {
            if (first[r] == r) continue;
            for (const char* name : {"sensitivity", "notices_per_100_patient_days", "lead_median_h"}) {
                const std::size_t m = group_metric_index(name);
                const auto mine = f.of(p, r, m), theirs = f.of(p, first[r], m);
                std::vector<double> difference(mine.size());
                for (std::size_t k = 0; k < mine.size(); ++k) difference[k] = mine[k] - theirs[k];  // NaN stays NaN
                const MeanInterval mi = mean_interval(difference);
                t.add_row({f.plans[p], f.rows[r].first, f.rows[r].second, f.rows[first[r]].second, std::string(name),
                           finite_or_empty(mi.mean), finite_or_empty(mi.low), finite_or_empty(mi.high),
                           static_cast<std::int64_t>(mi.n)});
            }
        }
    return t;
}

Table group_score_table(const std::vector<GroupScoreFigures>& rows) {
    Table t = make_table("score_by_group", "The score by patient group (encounter level)",
                         {"group", "value", "suppressed", "encounters", "cases", "auc", "auc_ci_low", "auc_ci_high",
                          "observed_over_expected", "oe_ci_low", "oe_ci_high", "calibration_in_the_large",
                          "calibration_in_the_large_se"});
    for (const GroupScoreFigures& g : rows) {
        const bool s = g.suppressed;
        const bool auc = !s && g.auc, oe = !s && g.observed_expected;
        t.add_row({g.group, g.value, flag_cell(s), count_or_suppressed(g.encounters, s), count_or_suppressed(g.cases, s),
                   auc ? Cell(g.auc->auc) : Cell(), auc ? Cell(g.auc->interval.lower) : Cell(),
                   auc ? Cell(g.auc->interval.upper) : Cell(),
                   oe ? finite_or_empty(g.observed_expected->ratio) : Cell(),
                   oe ? finite_or_empty(g.observed_expected->interval.lower) : Cell(),
                   oe ? finite_or_empty(g.observed_expected->interval.upper) : Cell(),
                   figure_or_suppressed(g.calibration_in_the_large, s),
                   figure_or_suppressed(g.calibration_in_the_large_se, s)});
    }
    return t;
}

Table group_threshold_table(const std::vector<GroupScoreFigures>& rows) {
    Table t = make_table("score_by_group_at_thresholds",
                         "The score by patient group at each plan's threshold (a stay's highest score)",
                         {"group", "value", "plan", "threshold", "sensitivity", "sensitivity_ci_low",
                          "sensitivity_ci_high", "specificity", "specificity_ci_low", "specificity_ci_high"});
    for (const GroupScoreFigures& g : rows)
        for (const GroupScoreFigures::AtThreshold& at : g.at_plan_thresholds) {
            const bool sens = !g.suppressed && at.sensitivity && g.cases >= min_cases_for_figure;
            const bool spec = !g.suppressed && at.specificity;
            t.add_row({g.group, g.value, at.plan, at.threshold, sens ? Cell(at.sensitivity->value) : Cell(),
                       sens ? Cell(at.sensitivity->interval.lower) : Cell(),
                       sens ? Cell(at.sensitivity->interval.upper) : Cell(),
                       spec ? Cell(at.specificity->value) : Cell(), spec ? Cell(at.specificity->interval.lower) : Cell(),
                       spec ? Cell(at.specificity->interval.upper) : Cell()});
        }
    return t;
}

std::vector<std::string> group_warning_lines(const std::vector<GroupFigures>& figures,
                                             const std::vector<GroupScoreFigures>& scores, std::int64_t smallest_group) {
    std::vector<std::string> lines;
    for (const GroupGap& gap : group_gaps(figures, scores)) {
        const std::string what = gap.plan.empty() ? "The score's AUC" : "Plan " + gap.plan + ": the share of cases caught";
        lines.push_back("Warning: " + what + " for " + gap.group + " " + gap.below + ", " +
                        with_interval(gap.below_value, gap.below_interval) + ", lies wholly below that for " +
                        gap.above + ", " + with_interval(gap.above_value, gap.above_interval) + ".");
    }
    for (const GroupScoreFigures& s : scores) {
        const std::string who = s.group + " " + s.value;
        if (s.suppressed)
            lines.push_back("Note: " + who + " has fewer than " + std::to_string(smallest_group) +
                            " encounters (reporting.smallest_group), so its figures are suppressed in every output.");
        else if (s.cases < min_cases_for_figure || s.encounters - s.cases < min_cases_for_figure)
            lines.push_back("Note: " + who + " has " + std::to_string(s.cases) + (s.cases == 1 ? " case and " : " cases and ") +
                            std::to_string(s.encounters - s.cases) +
                            " other stays with a score, too few for a share of cases caught or an AUC (at least " +
                            std::to_string(min_cases_for_figure) + " of each), so none is given.");
    }
    return lines;
}

std::string group_caution_text() {
    return "Group figures describe this population under this scenario's assumptions. A difference between groups "
           "may come from the score, from the plan, or from how the groups' stays differ; it calls for local "
           "clinical and equity review before any conclusion, and a group too small to show a difference has not "
           "shown that there is none.";
}

std::string who_is_reached_text(const std::vector<GroupFigures>& figures, const std::vector<GroupScoreFigures>& scores,
                                std::int64_t smallest_group, const std::string& basis) {
    if (figures.empty()) return "";
    std::vector<std::string> plans, columns;
    for (const GroupFigures& g : figures) {
        if (plans.empty() || plans.back() != g.plan) plans.push_back(g.plan);
        if (std::find(columns.begin(), columns.end(), g.group) == columns.end()) columns.push_back(g.group);
    }
    // A sweep's grid would fill the screen once per group; the files hold it all.
    constexpr std::size_t most_plans_shown = 12;
    if (plans.size() > most_plans_shown)
        return "Who is reached: " + std::to_string(plans.size()) + " plans by patient group, in plan_group_summary "
               "and plan_group_comparison (too many plans to show here).\n";
    std::string out;
    for (const std::string& column : columns) {
        Table view;
        view.title = "Who is reached, by " + column + " (" + basis +
                     "; share of the group's cases caught with its 95% Wilson interval):";
        view.columns = {"plan", column, "stays", "cases", "caught", "share caught (95% CI)", "notices per 100 days",
                        "lead h"};
        for (const GroupFigures& g : figures) {
            if (g.group != column) continue;
            const bool first = view.rows.empty() || g.plan != figures[&g - figures.data() - 1].plan;
            std::vector<Cell> row{first ? g.plan : std::string(), g.value};
            if (g.suppressed) {
                row.insert(row.end(), {std::string("suppressed"), Cell(), Cell(), Cell(), Cell(), Cell()});
            } else {
                const std::string caught = g.sensitivity ? share(*g.sensitivity) + " (" +
                                                               share(g.sensitivity_interval.lower) + " to " +
                                                               share(g.sensitivity_interval.upper) + ")"
                                                         : std::string("too few cases");
                row.insert(row.end(), {g.encounters, g.cases, g.caught, caught, cell_or_empty(g.notices_per_100_patient_days),
                                       cell_or_empty(g.lead_median_hours)});
            }
            view.add_row(std::move(row));
        }
        out += to_text(view);
    }
    for (const std::string& line : group_warning_lines(figures, scores, smallest_group)) out += line + "\n";
    return out + group_caution_text() + "\n";
}

std::vector<IntervalChart> group_sensitivity_charts(const std::vector<GroupFigures>& figures,
                                                    std::int64_t smallest_group) {
    std::vector<IntervalChart> charts;
    for (std::size_t begin = 0; begin < figures.size();) {
        IntervalChart chart;
        chart.id = "fig-groups-" + std::to_string(charts.size() + 1);
        chart.title = "Share of cases caught by patient group: " + figures[begin].plan;
        chart.description = "Dot: the share of the group's cases caught; line: its 95% Wilson interval.";
        chart.value_label = "share of cases caught";
        std::size_t end = begin;
        for (; end < figures.size() && figures[end].plan == figures[begin].plan; ++end) {
            const GroupFigures& g = figures[end];
            IntervalRow row{g.group + ": " + g.value, std::nullopt, 0, 0, ""};
            if (g.suppressed) row.no_value = "suppressed: fewer than " + std::to_string(smallest_group) + " encounters";
            else if (!g.sensitivity) row.no_value = std::to_string(g.cases) + (g.cases == 1 ? " case" : " cases") + ": too few for a share";
            else row.value = g.sensitivity, row.lo = g.sensitivity_interval.lower, row.hi = g.sensitivity_interval.upper;
            chart.rows.push_back(std::move(row));
        }
        charts.push_back(std::move(chart));
        begin = end;
    }
    return charts;
}

}  // namespace tocsin
