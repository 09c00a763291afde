#include "study/shift_effect.hpp"

#include <cmath>
#include <limits>
#include <stdexcept>

#include "analysis/results.hpp"

namespace tocsin {

namespace {

constexpr double nan_value = std::numeric_limits<double>::quiet_NaN();

enum Period { before = 0, after = 1 };
constexpr std::size_t n_metrics = 3;

// values[plan][metric][period][replication]; NaN where undefined.
using PeriodValues = std::vector<std::vector<std::vector<std::vector<double>>>>;

std::vector<double> defined(const std::vector<double>& x) {
    std::vector<double> out;
    for (double v : x)
        if (std::isfinite(v)) out.push_back(v);
    return out;
}

// The reporting shifts wholly before and wholly after `from`.
void split_reporting(ReportingShifts split[2], const ReportingShifts& all, const ShiftCalendar& cal, Instant from) {
    split[before].from = all.from;
    split[before].until = from;
    split[after].from = from;
    split[after].until = all.until;
    for (std::size_t k : all.shifts) {
        const Shift& s = cal.shifts()[k];
        if (s.end <= from) split[before].shifts.push_back(k);
        else if (s.start >= from) split[after].shifts.push_back(k);
    }
}

// Share of the cases caught, split by whether time zero falls before or after `from`.
void sensitivity_by_period(double out[2], const AnalysisSettings& settings, const Population& pop,
                           const PlanRecord& record, Instant from) {
    std::vector<std::pair<std::uint32_t, Instant>> actions;
    for (const Notice& n : record.notices) actions.emplace_back(n.encounter, n.at);
    const auto caught = first_catch(settings, pop, actions);
    double cases[2] = {0, 0}, hits[2] = {0, 0};
    for (std::size_t e = 0; e < pop.encounters.size(); ++e) {
        const auto& t0 = pop.encounters[e].outcome_at;
        if (!t0) continue;
        const int period = *t0 < from ? before : after;
        cases[period] += 1;
        hits[period] += caught[e] ? 1 : 0;
    }
    for (int period : {before, after}) out[period] = cases[period] > 0 ? hits[period] / cases[period] : nan_value;
}

// One replication's figures before and after `from`, for every plan.
void record_replication(PeriodValues& values, std::uint64_t r, const Scenario& sc, const Population& pop,
                        const ShiftCalendar& cal, const ReplicationRecord& rec, Instant from) {
    ReportingShifts split[2];
    split_reporting(split, reporting_shifts(sc.analysis, pop, cal), cal, from);
    for (std::size_t p = 0; p < values.size(); ++p) {
        for (int period : {before, after}) {
            const PlanFigures f = plan_figures(sc.analysis, pop, cal, split[period], rec.plans[p]);
            values[p][0][period][r] = f.per_unit_night_mean.value_or(nan_value);
            values[p][1][period][r] = split[period].shifts.empty() ? nan_value : f.per_unit_shift_mean;
        }
        double sensitivity[2];
        sensitivity_by_period(sensitivity, sc.analysis, pop, rec.plans[p], from);
        for (int period : {before, after}) values[p][2][period][r] = sensitivity[period];
    }
}

ShiftEffectFigure summarise(const std::string& plan, std::size_t metric, const std::vector<double>& b,
                            const std::vector<double>& a) {
    std::vector<double> change;
    for (std::size_t r = 0; r < a.size(); ++r)
        if (std::isfinite(a[r]) && std::isfinite(b[r])) change.push_back(a[r] - b[r]);
    return {plan, static_cast<ShiftEffectMetric>(metric), mean_interval(defined(b)), mean_interval(defined(a)),
            mean_interval(change)};
}

}  // namespace

std::string_view to_string(ShiftEffectMetric metric) {
    switch (metric) {
        case ShiftEffectMetric::per_unit_night_mean: return "per_unit_night_mean";
        case ShiftEffectMetric::per_unit_shift_mean: return "per_unit_shift_mean";
        case ShiftEffectMetric::sensitivity: return "sensitivity";
    }
    return "";
}

ShiftEffect shift_effect(const Scenario& sc, const PopulationFactory& make_population, unsigned threads) {
    if (!sc.population.shift) throw std::logic_error("shift_effect: the scenario declares no shift");
    const Instant from = sc.population.shift->from;
    const std::size_t n_plans = sc.simulation.plans.size();
    PeriodValues values(n_plans, std::vector<std::vector<std::vector<double>>>(
                                     n_metrics, std::vector<std::vector<double>>(2, std::vector<double>(sc.replications, nan_value))));
    ExperimentOptions options;
    options.replications = sc.replications;
    options.threads = threads;
    run_experiment(sc, make_population, options,
                   [&](std::uint64_t r, const Population& pop, const ShiftCalendar& cal, const ReplicationRecord& rec) {
                       record_replication(values, r, sc, pop, cal, rec, from);
                   });
    ShiftEffect out;
    out.from = from;
    out.replications = sc.replications;
    for (std::size_t p = 0; p < n_plans; ++p)
        for (std::size_t m = 0; m < n_metrics; ++m)
            out.figures.push_back(summarise(sc.simulation.plans[p].name, m, values[p][m][before], values[p][m][after]));
    return out;
}

}  // namespace tocsin
