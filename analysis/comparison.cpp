#include "analysis/comparison.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <sstream>

#include <boost/math/distributions/students_t.hpp>

namespace tocsin {

namespace {
constexpr double nan = std::numeric_limits<double>::quiet_NaN();
double or_nan(const std::optional<double>& v) { return v ? *v : nan; }
}  // namespace

const std::vector<Metric>& plan_metrics() {
    static const std::vector<Metric> metrics = {
        {"per_unit_night_mean", "notices per unit per night", Better::lower,
         [](const PlanFigures& f) { return or_nan(f.per_unit_night_mean); }},
        {"per_unit_night_p90", "notices per unit per night, 90th percentile", Better::lower,
         [](const PlanFigures& f) { return or_nan(f.per_unit_night_p90); }},
        {"per_unit_night_max", "notices per unit per night, worst", Better::lower,
         [](const PlanFigures& f) { return or_nan(f.per_unit_night_max); }},
        {"per_unit_shift_mean", "notices per unit per shift", Better::lower,
         [](const PlanFigures& f) { return f.per_unit_shift_mean; }},
        {"per_unit_shift_p90", "notices per unit per shift, 90th percentile", Better::lower,
         [](const PlanFigures& f) { return f.per_unit_shift_p90; }},
        {"notices", "notices in all", Better::lower, [](const PlanFigures& f) { return static_cast<double>(f.notices); }},
        {"cases", "patients with the outcome", Better::neither,
         [](const PlanFigures& f) { return static_cast<double>(f.cases); }},
        {"caught", "cases caught", Better::higher, [](const PlanFigures& f) { return static_cast<double>(f.caught); }},
        {"missed", "cases missed", Better::lower, [](const PlanFigures& f) { return static_cast<double>(f.missed); }},
        {"sensitivity", "share of cases caught", Better::higher, [](const PlanFigures& f) { return or_nan(f.sensitivity); }},
        {"lead_median_h", "median lead time, hours", Better::higher,
         [](const PlanFigures& f) { return or_nan(f.lead_median_hours); }},
        {"notices_per_catch", "notices per case caught", Better::lower,
         [](const PlanFigures& f) { return or_nan(f.notices_per_catch); }},
        {"evaluations", "bedside evaluations started", Better::neither,
         [](const PlanFigures& f) { return static_cast<double>(f.evaluations); }},
        {"evaluated_non_cases", "patients without the outcome who were evaluated", Better::lower,
         [](const PlanFigures& f) { return static_cast<double>(f.evaluated_non_cases); }},
        {"caught_by_notice", "cases a notice reached in time (as if evaluation were instant)", Better::higher,
         [](const PlanFigures& f) { return static_cast<double>(f.caught_by_notice); }},
        {"lead_from_notice_median_h", "median lead time from the first notice, hours", Better::higher,
         [](const PlanFigures& f) { return or_nan(f.lead_from_notice_median_hours); }},
        {"wait_median_min", "median wait from notice to evaluation start, minutes", Better::lower,
         [](const PlanFigures& f) { return or_nan(f.wait_median_minutes); }},
        {"wait_p90_min", "90th percentile wait from notice to evaluation start, minutes", Better::lower,
         [](const PlanFigures& f) { return or_nan(f.wait_p90_minutes); }},
        {"never_taken_up", "tasks never taken up", Better::lower,
         [](const PlanFigures& f) { return f.never_taken_up ? static_cast<double>(*f.never_taken_up) : nan; }},
    };
    return metrics;
}

const Metric* find_metric(std::string_view name) {
    for (const Metric& m : plan_metrics())
        if (m.name == name) return &m;
    return nullptr;
}

std::string metric_names() {
    std::string out;
    for (const Metric& m : plan_metrics()) out += (out.empty() ? "" : ", ") + std::string(m.name);
    return out;
}

MeanInterval mean_interval(std::span<const double> values, double level) {
    MeanInterval m;
    double sum = 0;
    for (double v : values)
        if (std::isfinite(v)) sum += v, ++m.n;
    m.low = m.high = nan;
    if (m.n == 0) {
        m.mean = nan;
        return m;
    }
    m.mean = sum / static_cast<double>(m.n);
    if (m.n < 2) return m;
    double ss = 0;
    for (double v : values)
        if (std::isfinite(v)) ss += (v - m.mean) * (v - m.mean);
    const double sd = std::sqrt(ss / static_cast<double>(m.n - 1));
    const boost::math::students_t t(static_cast<double>(m.n - 1));
    const double half = boost::math::quantile(t, 0.5 + level / 2) * sd / std::sqrt(static_cast<double>(m.n));
    m.low = m.mean - half;
    m.high = m.mean + half;
    return m;
}

ReplicatedFigures collect_figures(const std::vector<std::string>& plan_names,
                                  const std::vector<std::vector<PlanFigures>>& by_replication) {
    ReplicatedFigures f;
    f.plans = plan_names;
    f.replications = by_replication.size();
    const auto& metrics = plan_metrics();
    f.values.assign(plan_names.size(), std::vector<std::vector<double>>(metrics.size()));
    for (const auto& rep : by_replication)
        for (std::size_t p = 0; p < plan_names.size(); ++p)
            for (std::size_t m = 0; m < metrics.size(); ++m) f.values[p][m].push_back(metrics[m].value(rep[p]));
    return f;
}

std::vector<FrontierPoint> frontier(const ReplicatedFigures& f, std::size_t burden, std::size_t benefit) {
    std::vector<FrontierPoint> points;
    for (std::size_t p = 0; p < f.plans.size(); ++p)
        points.push_back({p, mean_interval(f.of(p, burden)).mean, mean_interval(f.of(p, benefit)).mean, true});
    for (auto& a : points) {
        if (!std::isfinite(a.burden) || !std::isfinite(a.benefit)) {
            a.on_frontier = false;
            continue;
        }
        for (const auto& b : points) {
            if (&a == &b || !std::isfinite(b.burden) || !std::isfinite(b.benefit)) continue;
            if (b.burden <= a.burden && b.benefit >= a.benefit && (b.burden < a.burden || b.benefit > a.benefit)) {
                a.on_frontier = false;
                break;
            }
        }
    }
    return points;
}

BudgetAnswer best_within_budget(const ReplicatedFigures& f, std::size_t burden, double limit, std::size_t benefit) {
    BudgetAnswer a;
    const std::size_t n = f.plans.size();
    a.share_within.assign(n, 0.0);
    double best_benefit = -std::numeric_limits<double>::infinity(), best_burden = 0;
    for (std::size_t p = 0; p < n; ++p) {
        const auto values = f.of(p, burden);
        std::size_t ok = 0, defined = 0;
        for (double v : values)
            if (std::isfinite(v)) ++defined, ok += v <= limit;
        a.share_within[p] = defined ? static_cast<double>(ok) / static_cast<double>(defined) : 0.0;
        const double mean_burden = mean_interval(values).mean;
        if (!std::isfinite(mean_burden) || mean_burden > limit) continue;
        a.within.push_back(p);
        const double b = mean_interval(f.of(p, benefit)).mean;
        // Ties on benefit go to the lighter plan, then to the earlier one.
        if (std::isfinite(b) && (b > best_benefit || (b == best_benefit && mean_burden < best_burden))) {
            best_benefit = b;
            best_burden = mean_burden;
            a.best = p;
        }
    }
    if (a.best) {
        std::size_t wins = 0;
        for (std::uint64_t r = 0; r < f.replications; ++r) {
            const double mine = f.of(*a.best, benefit)[r];
            bool top = std::isfinite(mine);
            for (std::size_t q : a.within)
                if (q != *a.best && std::isfinite(f.of(q, benefit)[r]) && f.of(q, benefit)[r] > mine) top = false;
            wins += top;
        }
        a.share_best = f.replications ? static_cast<double>(wins) / static_cast<double>(f.replications) : 0.0;
    }
    return a;
}

namespace {
Cell real_or_empty(double v) { return std::isfinite(v) ? Cell(v) : Cell(); }
}  // namespace

ComparisonTables comparison_tables(const ReplicatedFigures& f, std::size_t ref) {
    ComparisonTables t;
    const auto& metrics = plan_metrics();
    t.comparison.name = "plan_comparison";
    t.comparison.title = "Plans compared across replications (mean and 95% CI)";
    t.comparison.columns = {"plan", "metric", "mean", "ci_low", "ci_high", "replications"};
    t.differences.name = "plan_differences";
    t.differences.title = "Paired differences from " + f.plans[ref] + " (same patients in each replication)";
    t.differences.columns = {"plan", "versus", "metric", "mean_difference", "ci_low", "ci_high", "replications"};
    t.replication_figures.name = "replication_figures";
    t.replication_figures.title = "Every figure of every replication";
    t.replication_figures.columns = {"plan", "replication", "metric", "value"};
    for (std::size_t p = 0; p < f.plans.size(); ++p)
        for (std::size_t m = 0; m < metrics.size(); ++m) {
            const std::string name(metrics[m].name);
            const MeanInterval mi = mean_interval(f.of(p, m));
            t.comparison.add_row({f.plans[p], name, real_or_empty(mi.mean), real_or_empty(mi.low),
                                  real_or_empty(mi.high), static_cast<std::int64_t>(mi.n)});
            for (std::uint64_t r = 0; r < f.replications; ++r)
                t.replication_figures.add_row({f.plans[p], static_cast<std::int64_t>(r), name,
                                               real_or_empty(f.of(p, m)[r])});
            if (p == ref) continue;
            std::vector<double> diff(f.replications);
            for (std::uint64_t r = 0; r < f.replications; ++r) diff[r] = f.of(p, m)[r] - f.of(ref, m)[r];
            const MeanInterval d = mean_interval(diff);
            t.differences.add_row({f.plans[p], f.plans[ref], name, real_or_empty(d.mean), real_or_empty(d.low),
                                   real_or_empty(d.high), static_cast<std::int64_t>(d.n)});
        }
    return t;
}

Table frontier_table(const ReplicatedFigures& f, std::size_t burden, std::size_t benefit) {
    Table t;
    t.name = "frontier";
    t.title = "Trade-off frontier";
    t.columns = {"plan", "burden_metric", "burden", "benefit_metric", "benefit", "on_frontier"};
    for (const FrontierPoint& p : frontier(f, burden, benefit))
        t.add_row({f.plans[p.plan], std::string(plan_metrics()[burden].name), real_or_empty(p.burden),
                   std::string(plan_metrics()[benefit].name), real_or_empty(p.benefit),
                   std::int64_t{p.on_frontier ? 1 : 0}});
    return t;
}

std::string with_interval(const MeanInterval& m, int decimals) {
    if (!std::isfinite(m.mean)) return "-";
    auto fmt = [&](double v) { return format_real(v, decimals); };
    if (!std::isfinite(m.low)) return fmt(m.mean);
    return fmt(m.mean) + " (" + fmt(m.low) + " to " + fmt(m.high) + ")";
}

std::size_t metric_index(const Metric& metric) { return static_cast<std::size_t>(&metric - plan_metrics().data()); }

namespace {
std::size_t metric_index(std::string_view name) { return metric_index(*find_metric(name)); }
}  // namespace

std::string frontier_text(const ReplicatedFigures& f, std::size_t burden, std::size_t benefit) {
    auto points = frontier(f, burden, benefit);
    std::vector<FrontierPoint> on;
    for (const auto& p : points)
        if (p.on_frontier) on.push_back(p);
    std::sort(on.begin(), on.end(), [](const FrontierPoint& a, const FrontierPoint& b) { return a.burden < b.burden; });
    std::ostringstream o;
    o << "Trade-off frontier (" << on.size() << " of " << points.size() << " plans are not beaten on both "
      << plan_metrics()[burden].name << " and " << plan_metrics()[benefit].name << "):\n";
    for (const auto& p : on)
        o << "  " << f.plans[p.plan] << ": " << format_real(p.burden, 2) << " " << plan_metrics()[burden].name << ", "
          << format_real(p.benefit, 2) << " " << plan_metrics()[benefit].name << "\n";
    return o.str();
}

std::string comparison_text(const ReplicatedFigures& f, std::size_t ref) {
    std::ostringstream o;
    const std::vector<std::pair<std::string_view, int>> shown = {
        {"per_unit_night_mean", 2}, {"per_unit_night_p90", 1}, {"caught", 1}, {"sensitivity", 2}, {"lead_median_h", 1}};
    Table view;
    view.title = f.replications > 1
                     ? "Plans compared over " + std::to_string(f.replications) + " replications: mean (95% CI)"
                     : "Plans compared (one replication: no interval)";
    view.columns = {"plan", "night_mean", "night_p90", "caught", "sensitivity", "lead_median_h"};
    for (std::size_t p = 0; p < f.plans.size(); ++p) {
        std::vector<Cell> row{f.plans[p]};
        for (const auto& [name, d] : shown) row.push_back(with_interval(mean_interval(f.of(p, metric_index(name))), d));
        view.add_row(row);
    }
    o << to_text(view);
    if (f.replications > 1 && f.plans.size() > 1) {
        o << "\nPaired differences from " << f.plans[ref] << " (same patients in each replication):\n";
        const std::size_t night = metric_index("per_unit_night_mean"), caught = metric_index("caught");
        for (std::size_t p = 0; p < f.plans.size(); ++p) {
            if (p == ref) continue;
            std::vector<double> dn(f.replications), dc(f.replications);
            for (std::uint64_t r = 0; r < f.replications; ++r) {
                dn[r] = f.of(p, night)[r] - f.of(ref, night)[r];
                dc[r] = f.of(p, caught)[r] - f.of(ref, caught)[r];
            }
            const MeanInterval a = mean_interval(dn), c = mean_interval(dc);
            o << "  " << f.plans[p] << ": " << with_interval(a, 2) << " notices per unit per night, "
              << with_interval(c, 1) << " cases caught\n";
        }
    }
    return o.str();
}

std::string budget_text(const ReplicatedFigures& f, const BudgetAnswer& a, std::size_t burden, double limit,
                        std::size_t benefit) {
    std::ostringstream o;
    const Metric& bm = plan_metrics()[burden];
    const Metric& gm = plan_metrics()[benefit];
    o << "Budget: " << bm.label << " at most " << format_real(limit, 3) << " (mean over replications).\n";
    for (std::size_t p = 0; p < f.plans.size(); ++p) {
        const bool in = std::find(a.within.begin(), a.within.end(), p) != a.within.end();
        o << "  " << (in ? "within " : "over   ") << f.plans[p] << ": " << with_interval(mean_interval(f.of(p, burden)), 2)
          << " " << bm.name << ", within the limit in " << format_real(100 * a.share_within[p], 0)
          << "% of replications; " << with_interval(mean_interval(f.of(p, benefit)), 1) << " " << gm.name << "\n";
    }
    if (!a.best) {
        o << "No plan keeps " << bm.label << " within " << format_real(limit, 3) << ".\n";
    } else {
        o << "Best within the budget: " << f.plans[*a.best] << " (most " << gm.label << "); it had the most "
          << gm.name << " among the plans within the budget in " << format_real(100 * a.share_best, 0) << "% of "
          << f.replications << " replications.\n";
    }
    return o.str();
}

}  // namespace tocsin
