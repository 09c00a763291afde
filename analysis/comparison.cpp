#include "analysis/comparison.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include <boost/math/distributions/students_t.hpp>

namespace tocsin {

namespace {
constexpr double nan = std::numeric_limits<double>::quiet_NaN();
double or_nan(const std::optional<double>& v) { return v ? *v : nan; }
}  // namespace

const std::vector<Metric>& plan_metrics() {
    static const std::vector<Metric> metrics = {
        {"per_unit_night_mean", "notices per unit per night", Better::lower,
         [](const PlanFigures& f) { return or_nan(f.per_unit_night_mean); }, ChannelUnit::own},
        {"per_unit_night_p90", "notices per unit per night, 90th percentile", Better::lower,
         [](const PlanFigures& f) { return or_nan(f.per_unit_night_p90); }, ChannelUnit::own},
        {"per_unit_night_max", "notices per unit per night, worst", Better::lower,
         [](const PlanFigures& f) { return or_nan(f.per_unit_night_max); }, ChannelUnit::own},
        {"worst_unit_night_mean", "notices per night on the busiest unit (each unit's own mean)", Better::lower,
         [](const PlanFigures& f) { return or_nan(f.worst_unit_night_mean); }, ChannelUnit::own},
        {"worst_unit_night_p90", "notices per night on the worst unit, 90th percentile (each unit's own)", Better::lower,
         [](const PlanFigures& f) { return or_nan(f.worst_unit_night_p90); }, ChannelUnit::own},
        {"per_unit_shift_mean", "notices per unit per shift", Better::lower,
         [](const PlanFigures& f) { return f.per_unit_shift_mean; }, ChannelUnit::own},
        {"per_unit_shift_p90", "notices per unit per shift, 90th percentile", Better::lower,
         [](const PlanFigures& f) { return f.per_unit_shift_p90; }, ChannelUnit::own},
        {"notices", "notices in all", Better::lower, [](const PlanFigures& f) { return static_cast<double>(f.notices); }, ChannelUnit::own},
        {"cases", "patients with the outcome", Better::neither,
         [](const PlanFigures& f) { return static_cast<double>(f.cases); }},
        {"caught", "cases caught", Better::higher, [](const PlanFigures& f) { return static_cast<double>(f.caught); }},
        {"missed", "cases missed", Better::lower, [](const PlanFigures& f) { return static_cast<double>(f.missed); }},
        {"sensitivity", "share of cases caught", Better::higher, [](const PlanFigures& f) { return or_nan(f.sensitivity); }},
        {"lead_median_h", "median lead time, hours", Better::higher,
         [](const PlanFigures& f) { return or_nan(f.lead_median_hours); }},
        {"notices_per_catch", "notices per case caught", Better::lower,
         [](const PlanFigures& f) { return or_nan(f.notices_per_catch); }, ChannelUnit::own},
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
        {"patients_per_unit_night_mean", "patients noticed per unit per night", Better::lower,
         [](const PlanFigures& f) { return or_nan(f.patients_per_unit_night_mean); }, ChannelUnit::own},
        {"patients_per_unit_night_p90", "patients noticed per unit per night, 90th percentile", Better::lower,
         [](const PlanFigures& f) { return or_nan(f.patients_per_unit_night_p90); }, ChannelUnit::own},
        {"patients_per_unit_night_max", "patients noticed per unit per night, worst", Better::lower,
         [](const PlanFigures& f) { return or_nan(f.patients_per_unit_night_max); }, ChannelUnit::own},
        {"notice_ppv", "share of notices for patients who went on to the outcome", Better::higher,
         [](const PlanFigures& f) { return or_nan(f.notice_ppv); }},
        {"patient_ppv", "share of patients noticed who went on to the outcome", Better::higher,
         [](const PlanFigures& f) { return or_nan(f.patient_ppv); }},
        {"staff_minutes_per_unit_shift", "staff minutes per unit per shift (delivery and evaluations)", Better::lower,
         [](const PlanFigures& f) { return or_nan(f.staff_minutes_per_unit_shift); }},
        {"evaluations_per_unit_shift", "evaluations started per unit per shift", Better::lower,
         [](const PlanFigures& f) { return or_nan(f.evaluations_per_unit_shift); }},
        {"channel_burden_mean", "burden in the channel's own unit, mean", Better::lower,
         [](const PlanFigures& f) { return or_nan(f.channel_burden_mean); }, ChannelUnit::own},
        {"channel_burden_p90", "burden in the channel's own unit, 90th percentile", Better::lower,
         [](const PlanFigures& f) { return or_nan(f.channel_burden_p90); }, ChannelUnit::own},
        {"assumed_averted",
         "outcomes averted, expected under the declared effect (the declared effect applied to simulated catches, "
         "not an estimate from data)",
         Better::higher, [](const PlanFigures& f) { return or_nan(f.assumed_averted); }, ChannelUnit::neutral, true},
        {"evaluations_per_assumed_averted",
         "evaluations per outcome averted under the declared effect (the declared effect applied to simulated "
         "catches, not an estimate from data)",
         Better::lower, [](const PlanFigures& f) { return or_nan(f.evaluations_per_assumed_averted); },
         ChannelUnit::neutral, true},
    };
    return metrics;
}

bool shown_metric(const ReplicatedFigures& f, std::size_t metric) {
    if (!plan_metrics()[metric].declared_only) return true;
    // assumed_averted is a number (0 included) in every replication when the effect is declared.
    const std::size_t averted = metric_index(*find_metric("assumed_averted"));
    for (std::size_t p = 0; p < f.values.size(); ++p)
        for (double v : f.of(p, averted))
            if (!std::isnan(v)) return true;
    return false;
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
                                  const std::vector<std::vector<PlanFigures>>& by_replication,
                                  const std::vector<Channel>& channels) {
    ReplicatedFigures f;
    f.plans = plan_names;
    f.channels = channels;
    f.replications = by_replication.size();
    const auto& metrics = plan_metrics();
    f.values.assign(plan_names.size(), std::vector<std::vector<double>>(metrics.size()));
    for (const auto& rep : by_replication)
        for (std::size_t p = 0; p < plan_names.size(); ++p)
            for (std::size_t m = 0; m < metrics.size(); ++m) f.values[p][m].push_back(metrics[m].value(rep[p]));
    return f;
}

std::vector<ComparisonGroup> comparison_groups(const ReplicatedFigures& f, std::size_t burden) {
    std::vector<ComparisonGroup> groups;
    const bool own_unit = plan_metrics()[burden].unit == ChannelUnit::own;
    for (std::size_t p = 0; p < f.plans.size(); ++p) {
        const std::optional<Channel> channel =
            p < f.channels.size() ? std::optional<Channel>(f.channels[p]) : std::nullopt;
        auto g = std::find_if(groups.begin(), groups.end(), [&](const ComparisonGroup& x) { return x.channel == channel; });
        if (g == groups.end()) g = groups.insert(groups.end(), ComparisonGroup{channel, {}});
        g->plans.push_back(p);
    }
    if (own_unit && groups.size() > 1) return groups;
    ComparisonGroup all;
    for (std::size_t p = 0; p < f.plans.size(); ++p) all.plans.push_back(p);
    return {all};
}

std::vector<FrontierPoint> frontier(const ReplicatedFigures& f, std::size_t burden, std::size_t benefit) {
    std::vector<FrontierPoint> points;
    for (std::size_t p = 0; p < f.plans.size(); ++p)
        points.push_back({p, mean_interval(f.of(p, burden)).mean, mean_interval(f.of(p, benefit)).mean, true});
    const auto groups = comparison_groups(f, burden);
    for (std::size_t g = 0; g < groups.size(); ++g)
        for (std::size_t p : groups[g].plans) points[p].group = g;
    for (auto& a : points) {
        if (!std::isfinite(a.burden) || !std::isfinite(a.benefit)) {
            a.on_frontier = false;
            continue;
        }
        for (const auto& b : points) {
            if (&a == &b || a.group != b.group || !std::isfinite(b.burden) || !std::isfinite(b.benefit)) continue;
            if (b.burden <= a.burden && b.benefit >= a.benefit && (b.burden < a.burden || b.benefit > a.benefit)) {
                a.on_frontier = false;
                break;
            }
        }
    }
    return points;
}

BudgetAnswer best_within_budget(const ReplicatedFigures& f, std::size_t burden, double limit, std::size_t benefit,
                                const std::vector<std::size_t>& plans) {
    BudgetAnswer a;
    a.plans = plans;
    const std::size_t n = f.plans.size();
    std::vector<std::size_t> considered = plans;
    if (considered.empty())
        for (std::size_t p = 0; p < n; ++p) considered.push_back(p);
    a.share_within.assign(n, 0.0);
    double best_benefit = -std::numeric_limits<double>::infinity(), best_burden = 0;
    for (std::size_t p : considered) {
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

std::vector<BudgetAnswer> budget_by_group(const ReplicatedFigures& f, std::size_t burden, double limit,
                                          std::size_t benefit) {
    std::vector<BudgetAnswer> answers;
    for (const ComparisonGroup& g : comparison_groups(f, burden)) {
        answers.push_back(best_within_budget(f, burden, limit, benefit, g.channel ? g.plans : std::vector<std::size_t>{}));
        answers.back().channel = g.channel;
    }
    return answers;
}

MeanInterval paired_difference(const ReplicatedFigures& f, std::size_t plan, std::size_t versus, std::size_t metric) {
    std::vector<double> diff(f.replications);
    for (std::uint64_t r = 0; r < f.replications; ++r) diff[r] = f.of(plan, metric)[r] - f.of(versus, metric)[r];
    return mean_interval(diff);
}

std::size_t metric_index(const Metric& metric) { return static_cast<std::size_t>(&metric - plan_metrics().data()); }

}  // namespace tocsin
