#include "analysis/unit_figures.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <stdexcept>

#include "analysis/quantiles.hpp"
#include "analysis/workload.hpp"

namespace tocsin {

namespace {

constexpr double nan = std::numeric_limits<double>::quiet_NaN();
double or_nan(const std::optional<double>& v) { return v ? *v : nan; }

struct Spread {
    std::optional<double> mean, p90, max;
};
Spread spread_of(const std::vector<double>& sorted) {
    if (sorted.empty()) return {};
    return {mean(sorted), quantile_sorted(sorted, 0.9), sorted.back()};
}

// One unit's notices in every reporting shift, sorted.
std::vector<double> unit_shift_values(const std::vector<std::int64_t>& per_unit_shift, std::size_t unit,
                                      std::size_t n_shifts) {
    std::vector<double> values(per_unit_shift.begin() + static_cast<std::ptrdiff_t>(unit * n_shifts),
                               per_unit_shift.begin() + static_cast<std::ptrdiff_t>((unit + 1) * n_shifts));
    std::sort(values.begin(), values.end());
    return values;
}

// Notices, shifts, nights, patients per night and the notices' PPV of each
// unit (the PPV counted as plan_figures counts it).
void add_notice_figures(std::vector<UnitFigures>& rows, const Population& pop, const ShiftCalendar& cal,
                        const ReportingShifts& rep, const PlanRecord& record, const PlanFigures& figures) {
    std::vector<std::int64_t> true_notices(rows.size(), 0);
    for (const Notice& n : record.notices) {
        ++rows[n.unit].notices;
        const auto& t0 = pop.encounters[n.encounter].outcome_at;
        true_notices[n.unit] += t0 && n.at < *t0;
    }
    const std::vector<std::int64_t> patients = patients_per_unit_shift(cal, rep, rows.size(), record);
    for (std::size_t u = 0; u < rows.size(); ++u) {
        if (rows[u].notices)
            rows[u].notice_ppv = static_cast<double>(true_notices[u]) / static_cast<double>(rows[u].notices);
        const Spread shifts = spread_of(unit_shift_values(figures.unit_shift_counts, u, rep.shifts.size()));
        rows[u].shift_mean = shifts.mean, rows[u].shift_p90 = shifts.p90, rows[u].shift_max = shifts.max;
        const Spread notices = spread_of(unit_night_values(figures.unit_shift_counts, u, cal, rep));
        rows[u].night_mean = notices.mean, rows[u].night_p90 = notices.p90, rows[u].night_max = notices.max;
        const Spread people = spread_of(unit_night_values(patients, u, cal, rep));
        rows[u].patients_per_night_mean = people.mean;
        rows[u].patients_per_night_p90 = people.p90;
        rows[u].patients_per_night_max = people.max;
    }
}

// Cases, catches and lead times of each unit's patients, counted as plan_figures counts them.
void add_catch_figures(std::vector<UnitFigures>& rows, const AnalysisSettings& settings, const Population& pop,
                       const PlanRecord& record) {
    const auto caught_at = first_catch(settings, pop, catching_actions(record));
    std::vector<std::vector<double>> leads(rows.size());
    for (std::size_t e = 0; e < pop.encounters.size(); ++e) {
        const Encounter& enc = pop.encounters[e];
        if (!enc.outcome_at) continue;
        ++rows[enc.unit].cases;
        if (!caught_at[e]) continue;
        ++rows[enc.unit].caught;
        leads[enc.unit].push_back(static_cast<double>(*enc.outcome_at - *caught_at[e]) / 3600.0);
    }
    for (std::size_t u = 0; u < rows.size(); ++u) {
        if (rows[u].cases) rows[u].sensitivity = static_cast<double>(rows[u].caught) / static_cast<double>(rows[u].cases);
        std::sort(leads[u].begin(), leads[u].end());
        if (!leads[u].empty()) rows[u].lead_median_hours = quantile_sorted(leads[u], 0.5);
    }
}

void add_team_minutes(std::vector<UnitFigures>& rows, const PlanStaffRun& run, const ShiftCalendar& cal,
                      const ReportingShifts& rep) {
    std::vector<std::vector<double>> minutes = unit_team_minutes(run, cal, ReportPeriod{rep.from, rep.until});
    for (std::size_t u = 0; u < minutes.size() && u < rows.size(); ++u) {
        std::sort(minutes[u].begin(), minutes[u].end());
        const Spread s = spread_of(minutes[u]);
        rows[u].team_minutes_per_shift_mean = s.mean;
        rows[u].team_minutes_per_shift_p90 = s.p90;
    }
}

}  // namespace

std::vector<UnitFigures> unit_figures(const SimulationSetup& setup, const AnalysisSettings& settings,
                                      const Population& pop, const ShiftCalendar& cal, const ReportingShifts& rep,
                                      const ReplicationRecord& record, std::span<const PlanFigures> figures) {
    std::vector<UnitFigures> out;
    for (std::size_t p = 0; p < setup.plans.size(); ++p) {
        const Plan& plan = setup.plans[p];
        // Each plan has staff of its own (its own escalation and roster, when declared).
        std::optional<StaffModel> model;
        if (setup.has_staff()) model = staff_model(setup, plan, static_cast<std::uint32_t>(pop.units.size()));
        std::vector<UnitFigures> rows(pop.units.size());
        for (std::size_t u = 0; u < rows.size(); ++u) rows[u].plan = plan.name, rows[u].unit = pop.units[u];
        add_notice_figures(rows, pop, cal, rep, record.plans[p], figures[p]);
        add_catch_figures(rows, settings, pop, record.plans[p]);
        if (model && record.plans[p].staff)
            add_team_minutes(rows, {plan.name, &*model, plan.staffing, &*record.plans[p].staff}, cal, rep);
        out.insert(out.end(), std::make_move_iterator(rows.begin()), std::make_move_iterator(rows.end()));
    }
    return out;
}

const std::vector<UnitMetric>& unit_metrics() {
    static const std::vector<UnitMetric> metrics = {
        {"notices", "notices in all", [](const UnitFigures& f) { return static_cast<double>(f.notices); }},
        {"per_unit_night_mean", "notices per night on the unit", [](const UnitFigures& f) { return or_nan(f.night_mean); }},
        {"per_unit_night_p90", "notices per night on the unit, 90th percentile",
         [](const UnitFigures& f) { return or_nan(f.night_p90); }},
        {"per_unit_night_max", "notices per night on the unit, worst",
         [](const UnitFigures& f) { return or_nan(f.night_max); }},
        {"per_unit_shift_mean", "notices per shift on the unit", [](const UnitFigures& f) { return or_nan(f.shift_mean); }},
        {"per_unit_shift_p90", "notices per shift on the unit, 90th percentile",
         [](const UnitFigures& f) { return or_nan(f.shift_p90); }},
        {"per_unit_shift_max", "notices per shift on the unit, worst", [](const UnitFigures& f) { return or_nan(f.shift_max); }},
        {"patients_per_unit_night_mean", "patients noticed per night on the unit",
         [](const UnitFigures& f) { return or_nan(f.patients_per_night_mean); }},
        {"patients_per_unit_night_p90", "patients noticed per night on the unit, 90th percentile",
         [](const UnitFigures& f) { return or_nan(f.patients_per_night_p90); }},
        {"patients_per_unit_night_max", "patients noticed per night on the unit, worst",
         [](const UnitFigures& f) { return or_nan(f.patients_per_night_max); }},
        {"notice_ppv", "share of the unit's notices for patients who went on to the outcome",
         [](const UnitFigures& f) { return or_nan(f.notice_ppv); }},
        {"cases", "patients with the outcome", [](const UnitFigures& f) { return static_cast<double>(f.cases); }},
        {"caught", "cases caught", [](const UnitFigures& f) { return static_cast<double>(f.caught); }},
        {"sensitivity", "share of cases caught", [](const UnitFigures& f) { return or_nan(f.sensitivity); }},
        {"lead_median_h", "median lead time, hours", [](const UnitFigures& f) { return or_nan(f.lead_median_hours); }},
        {"unit_team_minutes_per_shift_mean", "staff minutes per shift of the unit's own teams",
         [](const UnitFigures& f) { return or_nan(f.team_minutes_per_shift_mean); }},
        {"unit_team_minutes_per_shift_p90", "staff minutes per shift of the unit's own teams, 90th percentile",
         [](const UnitFigures& f) { return or_nan(f.team_minutes_per_shift_p90); }},
    };
    return metrics;
}

std::size_t unit_metric_index(std::string_view name) {
    const auto& metrics = unit_metrics();
    for (std::size_t m = 0; m < metrics.size(); ++m)
        if (metrics[m].name == name) return m;
    throw std::out_of_range("no per-unit metric named " + std::string(name));
}

ReplicatedUnitFigures collect_unit_figures(const std::vector<std::string>& plan_names,
                                           const std::vector<std::vector<UnitFigures>>& by_replication) {
    ReplicatedUnitFigures f;
    f.plans = plan_names;
    f.replications = by_replication.size();
    for (const auto& rows : by_replication)
        for (const UnitFigures& row : rows)
            if (std::find(f.units.begin(), f.units.end(), row.unit) == f.units.end()) f.units.push_back(row.unit);
    const auto& metrics = unit_metrics();
    f.values.assign(f.plans.size(),
                    std::vector<std::vector<std::vector<double>>>(
                        f.units.size(), std::vector<std::vector<double>>(metrics.size(),
                                                                         std::vector<double>(f.replications, nan))));
    for (std::size_t r = 0; r < by_replication.size(); ++r)
        for (const UnitFigures& row : by_replication[r]) {
            const auto p = std::find(f.plans.begin(), f.plans.end(), row.plan) - f.plans.begin();
            const auto u = std::find(f.units.begin(), f.units.end(), row.unit) - f.units.begin();
            if (static_cast<std::size_t>(p) == f.plans.size())
                throw std::logic_error("per-unit figures of plan " + row.plan + ", which is not among the plans compared");
            for (std::size_t m = 0; m < metrics.size(); ++m) f.values[p][u][m][r] = metrics[m].value(row);
        }
    return f;
}

}  // namespace tocsin
