#include "report/comparison_tables.hpp"

#include <algorithm>
#include <cmath>
#include <sstream>

#include "report/cells.hpp"

namespace tocsin {

namespace {

// Beside the means, the log's own figures, when replication 0 is the log and
// there are means over resamples to set them beside (with one replication the
// figure is the log's already).
bool shows_as_logged(const ReplicatedFigures& f) { return f.first_is_log && f.replications > 1; }

// The log's own figure (replication 0), or empty.
Cell as_logged(const ReplicatedFigures& f, std::size_t plan, std::size_t metric) {
    if (!shows_as_logged(f)) return {};
    return finite_or_empty(f.of(plan, metric)[0]);
}

const char* const as_logged_label = "  as logged";

// A difference in a figure whose unit differs by channel means nothing
// between plans of different channels (a review is not a page).
bool comparable(const ReplicatedFigures& f, std::size_t p, std::size_t ref, std::size_t metric) {
    return plan_metrics()[metric].unit == ChannelUnit::neutral || f.channels.size() <= std::max(p, ref) ||
           f.channels[p] == f.channels[ref];
}
}  // namespace

ComparisonTables comparison_tables(const ReplicatedFigures& f, std::size_t ref) {
    ComparisonTables t;
    const auto& metrics = plan_metrics();
    t.comparison.name = "plan_comparison";
    t.comparison.title = "Plans compared across replications (mean and 95% CI)";
    t.comparison.columns = {"plan", "metric", "mean", "ci_low", "ci_high", "replications", "as_logged"};
    t.differences.name = "plan_differences";
    t.differences.title = "Paired differences from " + f.plans[ref] +
                          " (same patients in each replication; empty where the plans' channels count notices in "
                          "different units)";
    t.differences.columns = {"plan", "versus", "metric", "mean_difference", "ci_low", "ci_high", "replications"};
    t.replication_figures.name = "replication_figures";
    t.replication_figures.title = "Every figure of every replication";
    t.replication_figures.columns = {"plan", "replication", "metric", "value"};
    for (std::size_t p = 0; p < f.plans.size(); ++p)
        for (std::size_t m = 0; m < metrics.size(); ++m) {
            if (!shown_metric(f, m)) continue;
            const std::string name(metrics[m].name);
            const MeanInterval mi = mean_interval(f.of(p, m));
            t.comparison.add_row({f.plans[p], name, finite_or_empty(mi.mean), finite_or_empty(mi.low),
                                  finite_or_empty(mi.high), static_cast<std::int64_t>(mi.n), as_logged(f, p, m)});
            for (std::uint64_t r = 0; r < f.replications; ++r)
                t.replication_figures.add_row({f.plans[p], static_cast<std::int64_t>(r), name,
                                               finite_or_empty(f.of(p, m)[r])});
            if (p == ref) continue;
            if (!comparable(f, p, ref, m)) {
                t.differences.add_row({f.plans[p], f.plans[ref], name, Cell(), Cell(), Cell(), std::int64_t{0}});
                continue;
            }
            const MeanInterval d = paired_difference(f, p, ref, m);
            t.differences.add_row({f.plans[p], f.plans[ref], name, finite_or_empty(d.mean), finite_or_empty(d.low),
                                   finite_or_empty(d.high), static_cast<std::int64_t>(d.n)});
        }
    return t;
}

namespace {

Table by_plan(const std::string& name, const std::string& title, const std::vector<std::size_t>& metrics) {
    Table t;
    t.name = name;
    t.title = title;
    t.columns = {"plan"};
    for (std::size_t m : metrics) {
        const std::string metric(plan_metrics()[m].name);
        t.columns.insert(t.columns.end(), {metric, metric + "_lo", metric + "_hi"});
    }
    return t;
}

void add_interval(std::vector<Cell>& row, const MeanInterval& mi) {
    row.insert(row.end(), {finite_or_empty(mi.mean), finite_or_empty(mi.low), finite_or_empty(mi.high)});
}

}  // namespace

Table comparison_by_plan(const ReplicatedFigures& f, const std::vector<std::size_t>& metrics) {
    Table t = by_plan("plan_comparison", "Plans compared across replications (mean and 95% CI)", metrics);
    for (std::size_t p = 0; p < f.plans.size(); ++p) {
        std::vector<Cell> row{f.plans[p]};
        for (std::size_t m : metrics) add_interval(row, mean_interval(f.of(p, m)));
        t.add_row(std::move(row));
        if (!shows_as_logged(f)) continue;
        std::vector<Cell> logged{std::string(as_logged_label)};
        for (std::size_t m : metrics) logged.insert(logged.end(), {as_logged(f, p, m), Cell{}, Cell{}});
        t.add_row(std::move(logged));
    }
    return t;
}

Table differences_by_plan(const ReplicatedFigures& f, const std::vector<std::size_t>& metrics, std::size_t ref) {
    Table t = by_plan("plan_differences",
                      "Paired differences from " + f.plans[ref] + " (same patients in each replication; empty where "
                      "the plans' channels count notices in different units)", metrics);
    for (std::size_t p = 0; p < f.plans.size(); ++p) {
        if (p == ref) continue;
        std::vector<Cell> row{f.plans[p]};
        for (std::size_t m : metrics)
            if (comparable(f, p, ref, m)) add_interval(row, paired_difference(f, p, ref, m));
            else row.insert(row.end(), {Cell(), Cell(), Cell()});
        t.add_row(std::move(row));
    }
    return t;
}

namespace {
// "page plans", or "all plans" when every plan is ranked together.
std::string group_name(const ComparisonGroup& g) {
    return g.channel ? std::string(to_string(*g.channel)) + " plans" : std::string("all plans");
}
}  // namespace

std::string comparison_basis_text(const ReplicatedFigures& f, std::size_t burden) {
    const auto groups = comparison_groups(f, burden);
    const Metric& m = plan_metrics()[burden];
    if (groups.size() > 1 || groups.front().channel) {
        const bool lookups = std::find(f.channels.begin(), f.channels.end(), Channel::score_lookup) != f.channels.end();
        return "Compared within each channel: " + std::string(m.name) + " (" + std::string(m.label) +
               ") counts notices, and a notice is a page, a chart interruption, a handoff flag" +
               (lookups ? ", a review or a look-up" : " or a review") +
               ", so plans "
               "of different channels are not ranked on it. For one ranking across channels choose a "
               "channel-neutral burden (staff_minutes_per_unit_shift or evaluations_per_unit_shift).";
    }
    std::vector<Channel> seen;
    for (Channel c : f.channels)
        if (std::find(seen.begin(), seen.end(), c) == seen.end()) seen.push_back(c);
    if (seen.size() > 1)
        return "Compared across channels on " + std::string(m.name) + " (" + std::string(m.label) +
               "), a burden that means the same for every channel.";
    return {};
}

Table frontier_table(const ReplicatedFigures& f, std::size_t burden, std::size_t benefit) {
    Table t;
    t.name = "frontier";
    t.title = "Trade-off frontier";
    t.columns = {"plan", "compared_within", "burden_metric", "burden", "benefit_metric", "benefit", "on_frontier"};
    const auto groups = comparison_groups(f, burden);
    for (const FrontierPoint& p : frontier(f, burden, benefit))
        t.add_row({f.plans[p.plan], group_name(groups[p.group]), std::string(plan_metrics()[burden].name),
                   finite_or_empty(p.burden), std::string(plan_metrics()[benefit].name), finite_or_empty(p.benefit),
                   std::int64_t{p.on_frontier ? 1 : 0}});
    return t;
}

Table channel_units_table(const ReplicatedFigures& f, const std::vector<ChannelBurdenSummary>& first) {
    std::vector<std::size_t> metrics;
    for (const char* name : {"channel_burden_mean", "channel_burden_p90", "staff_minutes_per_unit_shift",
                             "evaluations_per_unit_shift"})
        metrics.push_back(metric_index(*find_metric(name)));
    Table t;
    t.name = "channel_units";
    t.title = "Each channel's burden in its own unit, and the channel-neutral burdens (mean over " +
              std::to_string(f.replications) + (f.replications == 1 ? " replication)" : " replications, 95% CI)");
    t.columns = {"plan", "channel", "burden_unit"};
    for (std::size_t m : metrics) {
        const std::string metric(plan_metrics()[m].name);
        t.columns.insert(t.columns.end(), {metric, metric + "_lo", metric + "_hi"});
    }
    for (std::size_t p = 0; p < f.plans.size(); ++p) {
        std::vector<Cell> row{f.plans[p], p < f.channels.size() ? std::string(to_string(f.channels[p])) : std::string(),
                              p < first.size() ? first[p].burden : std::string()};
        for (std::size_t m : metrics) add_interval(row, mean_interval(f.of(p, m)));
        t.add_row(std::move(row));
    }
    return t;
}

std::string with_interval(const MeanInterval& m, int decimals) {
    if (!std::isfinite(m.mean)) return "-";
    auto fmt = [&](double v) { return format_real(v, decimals); };
    if (!std::isfinite(m.low)) return fmt(m.mean);
    return fmt(m.mean) + " (" + fmt(m.low) + " to " + fmt(m.high) + ")";
}

namespace {
std::size_t metric_index(std::string_view name) { return metric_index(*find_metric(name)); }
}  // namespace

std::string channel_units_text(const ReplicatedFigures& f, const std::vector<ChannelBurdenSummary>& first) {
    Table view;
    view.title = "Each channel in its own unit, and per unit per shift for every channel: mean \xC2\xB1 half-width "
                 "of its 95% CI over " + std::to_string(f.replications) + " replications";
    // Named as in channel_units and the options.
    view.columns = {"plan", "burden_unit", "channel_burden_mean", "channel_burden_p90", "staff_minutes_per_unit_shift",
                    "evaluations_per_unit_shift"};
    const std::size_t mean = metric_index(*find_metric("channel_burden_mean")),
                      p90 = metric_index(*find_metric("channel_burden_p90")),
                      minutes = metric_index(*find_metric("staff_minutes_per_unit_shift")),
                      evaluations = metric_index(*find_metric("evaluations_per_unit_shift"));
    for (std::size_t p = 0; p < f.plans.size(); ++p)
        view.add_row({f.plans[p], p < first.size() ? first[p].burden : std::string(),
                      with_margin(mean_interval(f.of(p, mean)), 2), with_margin(mean_interval(f.of(p, p90)), 1),
                      with_margin(mean_interval(f.of(p, minutes)), 1),
                      with_margin(mean_interval(f.of(p, evaluations)), 2)});
    return to_text(view);
}

std::string frontier_text(const ReplicatedFigures& f, std::size_t burden, std::size_t benefit) {
    const auto points = frontier(f, burden, benefit);
    const auto groups = comparison_groups(f, burden);
    std::ostringstream o;
    if (const std::string basis = comparison_basis_text(f, burden); !basis.empty()) o << basis << "\n";
    for (std::size_t g = 0; g < groups.size(); ++g) {
        std::vector<FrontierPoint> on;
        for (const auto& p : points)
            if (p.group == g && p.on_frontier) on.push_back(p);
        std::sort(on.begin(), on.end(), [](const FrontierPoint& a, const FrontierPoint& b) { return a.burden < b.burden; });
        o << "Trade-off frontier" << (groups[g].channel ? " of the " + group_name(groups[g]) : std::string()) << " ("
          << on.size() << " of " << groups[g].plans.size() << " plans are not beaten on both "
          << plan_metrics()[burden].name << " and " << plan_metrics()[benefit].name << "):\n";
        for (const auto& p : on)
            o << "  " << f.plans[p.plan] << ": " << format_real(p.burden, 2) << " " << plan_metrics()[burden].name
              << ", " << format_real(p.benefit, 2) << " " << plan_metrics()[benefit].name << "\n";
    }
    return o.str();
}

std::string with_margin(const MeanInterval& m, int decimals) {
    if (!std::isfinite(m.mean)) return "-";
    if (!std::isfinite(m.low)) return format_real(m.mean, decimals);
    // The t interval is symmetric about the mean, so its half-width says it all.
    return format_real(m.mean, decimals) + " \xC2\xB1" + format_real(m.high - m.mean, decimals);
}

std::string comparison_text(const ReplicatedFigures& f, std::size_t ref) {
    std::ostringstream o;
    const std::vector<std::pair<std::string_view, int>> shown = {
        {"per_unit_night_mean", 2}, {"per_unit_night_p90", 1}, {"caught", 1}, {"sensitivity", 2}, {"lead_median_h", 1},
        {"patients_per_unit_night_mean", 2}, {"notice_ppv", 2}};
    Table view;
    view.title = f.replications > 1
                     ? "Plans compared over " + std::to_string(f.replications) +
                           " replications: mean \xC2\xB1 half-width of its 95% CI"
                     : "Plans compared (one replication: no interval)";
    view.columns = {"plan"};  // each metric under the name options and CSV give it
    for (const auto& [name, d] : shown) view.columns.emplace_back(name);
    for (std::size_t p = 0; p < f.plans.size(); ++p) {
        std::vector<Cell> row{f.plans[p]};
        for (const auto& [name, d] : shown) row.push_back(with_margin(mean_interval(f.of(p, metric_index(name))), d));
        view.add_row(row);
        if (!shows_as_logged(f)) continue;
        std::vector<Cell> logged{std::string(as_logged_label)};
        for (const auto& [name, d] : shown) {
            const double v = f.of(p, metric_index(name))[0];
            logged.push_back(std::isfinite(v) ? format_real(v, d) : "-");
        }
        view.add_row(std::move(logged));
    }
    o << to_text(view);
    if (shows_as_logged(f))
        o << "(\"as logged\": the log's own figure, replication 0; the other replications resample its days)\n";
    if (f.replications > 1 && f.plans.size() > 1) {
        o << "\nPaired differences from " << f.plans[ref] << " (same patients in each replication):\n";
        const std::size_t night = metric_index("per_unit_night_mean"), caught = metric_index("caught");
        for (std::size_t p = 0; p < f.plans.size(); ++p) {
            if (p == ref) continue;
            const MeanInterval c = paired_difference(f, p, ref, caught);
            o << "  " << f.plans[p] << ": ";
            if (comparable(f, p, ref, night))
                o << with_interval(paired_difference(f, p, ref, night), 2) << " notices per unit per night, ";
            o << with_interval(c, 1) << " cases caught";
            if (!comparable(f, p, ref, night))
                o << " (a " << to_string(f.channels[p]) << " plan: its notices are not comparable with "
                  << to_string(f.channels[ref]) << " notices)";
            o << "\n";
        }
    }
    return o.str();
}

std::string budget_text(const ReplicatedFigures& f, const std::vector<BudgetAnswer>& answers, std::size_t burden,
                        double limit, std::size_t benefit) {
    std::ostringstream o;
    const Metric& bm = plan_metrics()[burden];
    const Metric& gm = plan_metrics()[benefit];
    o << "Budget: " << bm.label << " at most " << format_real(limit, 3) << " (mean over replications).\n";
    if (bm.name.rfind("worst_unit", 0) == 0)
        o << "Per ward: the worst ward decides (--budget-metric " << (bm.name == "worst_unit_night_p90" ? "per_unit_night_p90" : "per_unit_night_mean")
          << " pools the wards).\n";
    if (answers.size() > 1 || (!answers.empty() && answers.front().channel))
        o << comparison_basis_text(f, burden) << "\n";
    for (const BudgetAnswer& a : answers) {
        const std::string among = a.channel ? " among the " + std::string(to_string(*a.channel)) + " plans" : "";
        std::vector<std::size_t> plans = a.plans;
        if (plans.empty())
            for (std::size_t p = 0; p < f.plans.size(); ++p) plans.push_back(p);
        if (a.channel) o << std::string(to_string(*a.channel)) << " plans:\n";
        for (std::size_t p : plans) {
            const bool in = std::find(a.within.begin(), a.within.end(), p) != a.within.end();
            o << "  " << (in ? "within " : "over   ") << f.plans[p] << ": "
              << with_interval(mean_interval(f.of(p, burden)), 2) << " " << bm.name << ", within the limit in "
              << format_real(100 * a.share_within[p], 0) << "% of replications; "
              << with_interval(mean_interval(f.of(p, benefit)), 1) << " " << gm.name << "\n";
        }
        if (!a.best) {
            o << "No plan" << among << " keeps " << bm.label << " within " << format_real(limit, 3) << ".\n";
        } else {
            o << "Best within the budget" << among << ": " << f.plans[*a.best] << " (most " << gm.label
              << "); it had the most " << gm.name << " among the plans within the budget in "
              << format_real(100 * a.share_best, 0) << "% of " << f.replications << " replications.\n";
        }
    }
    return o.str();
}

Table plan_net_benefit_table(const std::vector<PlanNetBenefit>& rows) {
    Table t;
    t.name = "plan_net_benefit";
    t.title = "Net benefit of each plan (an evaluation as the intervention; replication 0)";
    t.columns = {"plan", "evaluations_per_case", "threshold_probability", "true_positives", "false_positives",
                 "encounters", "net_benefit", "net_benefit_treat_all"};
    for (const PlanNetBenefit& b : rows)
        t.add_row({b.plan, b.evaluations_per_case, b.threshold_probability, b.true_positives, b.false_positives,
                   b.encounters, b.net_benefit ? Cell(*b.net_benefit) : Cell(),
                   b.net_benefit_treat_all ? Cell(*b.net_benefit_treat_all) : Cell()});
    return t;
}

}  // namespace tocsin
