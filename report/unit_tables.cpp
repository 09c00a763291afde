#include "report/unit_tables.hpp"

#include <cmath>

#include "analysis/comparison.hpp"
#include "report/cells.hpp"

namespace tocsin {

Table plan_unit_summary_table(const std::vector<UnitFigures>& units, std::uint64_t replication) {
    Table t = make_table("plan_unit_summary", "Plans on each ward (replication " + std::to_string(replication) + ")",
                         {"plan", "unit", "notices", "per_unit_shift_mean", "per_unit_shift_p90", "per_unit_shift_max",
                          "per_unit_night_mean", "per_unit_night_p90", "per_unit_night_max",
                          "patients_per_unit_night_mean", "patients_per_unit_night_p90", "patients_per_unit_night_max",
                          "notice_ppv", "cases", "caught", "sensitivity", "lead_median_h", "unit_team_minutes_per_shift_mean",
                          "unit_team_minutes_per_shift_p90"});
    for (const UnitFigures& u : units)
        t.add_row({u.plan, u.unit, u.notices, cell_or_empty(u.shift_mean), cell_or_empty(u.shift_p90),
                   cell_or_empty(u.shift_max), cell_or_empty(u.night_mean), cell_or_empty(u.night_p90),
                   cell_or_empty(u.night_max), cell_or_empty(u.patients_per_night_mean),
                   cell_or_empty(u.patients_per_night_p90), cell_or_empty(u.patients_per_night_max),
                   cell_or_empty(u.notice_ppv), u.cases, u.caught,
                   cell_or_empty(u.sensitivity), cell_or_empty(u.lead_median_hours),
                   cell_or_empty(u.team_minutes_per_shift_mean), cell_or_empty(u.team_minutes_per_shift_p90)});
    return t;
}

Table plan_unit_comparison_table(const ReplicatedUnitFigures& f) {
    Table t = make_table("plan_unit_comparison", "Plans on each ward across replications (mean and 95% CI)",
                         {"plan", "unit", "metric", "mean", "ci_low", "ci_high", "replications"});
    const auto& metrics = unit_metrics();
    for (std::size_t p = 0; p < f.plans.size(); ++p)
        for (std::size_t u = 0; u < f.units.size(); ++u)
            for (std::size_t m = 0; m < metrics.size(); ++m) {
                const MeanInterval mi = mean_interval(f.of(p, u, m));
                t.add_row({f.plans[p], f.units[u], std::string(metrics[m].name), finite_or_empty(mi.mean),
                           finite_or_empty(mi.low), finite_or_empty(mi.high), static_cast<std::int64_t>(mi.n)});
            }
    return t;
}

bool has_unit_teams(const ReplicatedUnitFigures& f) {
    const std::size_t minutes = unit_metric_index("unit_team_minutes_per_shift_mean");
    for (std::size_t p = 0; p < f.plans.size(); ++p)
        for (std::size_t u = 0; u < f.units.size(); ++u)
            for (double v : f.of(p, u, minutes))
                if (std::isfinite(v)) return true;
    return false;
}

namespace {

// The figures a ward's reader asks for first, in order; staff minutes only
// when some plan has a unit team.
std::vector<std::size_t> ward_metrics(const ReplicatedUnitFigures& f) {
    std::vector<std::size_t> shown;
    for (const char* name : {"per_unit_night_mean", "per_unit_night_p90", "per_unit_night_max", "caught",
                             "sensitivity", "lead_median_h"})
        shown.push_back(unit_metric_index(name));
    if (has_unit_teams(f)) shown.push_back(unit_metric_index("unit_team_minutes_per_shift_mean"));
    return shown;
}

}  // namespace

Table per_ward_table(const ReplicatedUnitFigures& f) {
    const std::vector<std::size_t> shown = ward_metrics(f);
    std::vector<std::string> columns{"unit", "plan"};
    for (std::size_t m : shown) {
        const std::string name(unit_metrics()[m].name);
        columns.insert(columns.end(), {name, name + "_lo", name + "_hi"});
    }
    Table t = make_table("per_ward", "Plans on each ward", columns);
    for (std::size_t u = 0; u < f.units.size(); ++u)
        for (std::size_t p = 0; p < f.plans.size(); ++p) {
            std::vector<Cell> row{f.units[u], f.plans[p]};
            for (std::size_t m : shown) {
                const MeanInterval mi = mean_interval(f.of(p, u, m));
                row.insert(row.end(), {finite_or_empty(mi.mean), finite_or_empty(mi.low), finite_or_empty(mi.high)});
            }
            t.add_row(std::move(row));
        }
    return t;
}

std::string per_ward_text(const ReplicatedUnitFigures& f) {
    if (f.units.size() < 2) return "";
    // A sweep's grid would fill the screen once per ward; the files hold it all.
    constexpr std::size_t most_plans_shown = 12;
    if (f.plans.size() > most_plans_shown)
        return "Per ward: " + std::to_string(f.plans.size()) + " plans on " + std::to_string(f.units.size()) +
               " wards, in plan_unit_summary and plan_unit_comparison (too many plans to show here).\n";
    const bool teams = has_unit_teams(f);
    std::string out = f.replications > 1
                          ? "Per ward, means over " + std::to_string(f.replications) +
                                " replications (intervals in plan_unit_comparison and the report)"
                          : "Per ward (notices per night on the ward; its own patients' catches; lead in hours)";
    out += teams ? ";\nunit_team_minutes_per_shift_mean: staff minutes per shift of the ward's own teams.\n" : ":\n";
    // Columns named as in plan_unit_summary and the options.
    std::vector<std::string_view> shown = {"per_unit_night_mean", "per_unit_night_p90", "per_unit_night_max",
                                           "caught",              "cases",              "lead_median_h"};
    if (teams) shown.emplace_back("unit_team_minutes_per_shift_mean");
    std::vector<std::string> columns = {"plan"};
    for (std::string_view name : shown) columns.emplace_back(name);
    for (std::size_t u = 0; u < f.units.size(); ++u) {
        Table view;
        view.title = "Ward: " + f.units[u];
        view.columns = columns;
        for (std::size_t p = 0; p < f.plans.size(); ++p) {
            std::vector<Cell> row{f.plans[p]};
            for (std::string_view name : shown)
                row.push_back(finite_or_empty(mean_interval(f.of(p, u, unit_metric_index(name))).mean));
            view.add_row(std::move(row));
        }
        out += to_text(view);
    }
    return out;
}

}  // namespace tocsin
