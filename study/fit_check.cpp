#include "study/fit_check.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <stdexcept>

#include "analysis/quantiles.hpp"
#include "analysis/results.hpp"
#include "models/discrimination.hpp"
#include "study/experiment.hpp"

namespace tocsin {

namespace {

constexpr double none = std::numeric_limits<double>::quiet_NaN();

double or_none(const std::optional<double>& x) { return x ? *x : none; }

// The rows' labels, in the order figures_of fills them.
std::vector<FitCheckRow> row_labels(const Scenario& sc, const std::vector<std::string>& units) {
    std::vector<FitCheckRow> rows;
    for (const std::string& u : units) rows.push_back({"admissions", u, FitCheckKind::population});
    for (const std::string& u : units) rows.push_back({"census, mean", u, FitCheckKind::population});
    rows.push_back({"outcome cases", "", FitCheckKind::population});
    rows.push_back({"encounter-level AUC", "", FitCheckKind::discrimination});
    for (const Plan& p : sc.simulation.plans) {
        rows.push_back({"notices per unit per night, mean", p.name, FitCheckKind::burden});
        rows.push_back({"notices per unit per night, p90", p.name, FitCheckKind::burden});
        rows.push_back({"sensitivity", p.name, FitCheckKind::benefit});
        rows.push_back({"median lead, hours", p.name, FitCheckKind::benefit});
    }
    return rows;
}

// One replication's figures, in row order. Admissions, census and cases count
// over the reporting period (else the population's); census is the
// time-weighted mean.
std::vector<double> figures_of(const Scenario& sc, const Population& pop, const ShiftCalendar& cal,
                               const ReplicationRecord& rec) {
    std::vector<double> admissions(pop.units.size()), bed_hours(pop.units.size());
    double cases = 0;
    const Instant from = sc.analysis.period_start.value_or(pop.period_start);
    const Instant until = sc.analysis.period_end.value_or(pop.period_end);
    for (const Encounter& e : pop.encounters) {
        if (e.admitted >= from && e.admitted < until) admissions[e.unit] += 1;
        const Instant a = std::max(e.admitted, from), b = std::min(e.discharged, until);
        if (b > a) bed_hours[e.unit] += static_cast<double>(b - a) / 3600.0;
        if (e.outcome_at && *e.outcome_at >= from && *e.outcome_at < until) cases += 1;
    }
    std::vector<double> out = admissions;
    const double hours = static_cast<double>(until - from) / 3600.0;
    for (double h : bed_hours) out.push_back(h / hours);
    out.push_back(cases);
    const EncounterMaxima maxima = encounter_maxima(pop);
    out.push_back(mann_whitney_auc(maxima.cases, maxima.controls));
    const ReportingShifts rep = reporting_shifts(sc.analysis, pop, cal);
    for (const PlanRecord& plan : rec.plans) {
        const PlanFigures f = plan_figures(sc.analysis, pop, cal, rep, plan);
        out.push_back(or_none(f.per_unit_night_mean));
        out.push_back(or_none(f.per_unit_night_p90));
        out.push_back(or_none(f.sensitivity));
        out.push_back(or_none(f.lead_median_hours));
    }
    return out;
}

std::vector<std::vector<double>> run_figures(const Scenario& sc, const PopulationFactory& make_population,
                                             std::uint64_t replications, unsigned threads) {
    std::vector<std::vector<double>> by_replication(replications);
    ExperimentOptions options;
    options.replications = replications;
    options.threads = threads;
    run_experiment(sc, make_population, options,
                   [&](std::uint64_t r, const Population& pop, const ShiftCalendar& cal, const ReplicationRecord& rec) {
                       by_replication[r] = figures_of(sc, pop, cal, rec);
                   });
    return by_replication;
}

}  // namespace

FitCheck check_fit(const Scenario& scenario, const Population& log, const GeneratorConfig& fitted,
                   std::uint64_t replications, unsigned threads) {
    if (replications < 2) throw std::invalid_argument("check_fit: at least 2 replications are needed for a range");
    std::vector<std::string> units;
    for (const UnitConfig& u : fitted.units) units.push_back(u.name);
    if (units != log.units) throw std::invalid_argument("check_fit: the fitted knobs name other units than the log");
    Scenario generated = scenario;
    generated.population.source = PopulationSource::generate;
    generated.population.generator = fitted;
    generated.population.target_auc.reset();
    generated.population.shift.reset();
    generated.population.bootstrap.reset();
    // The log itself, not a copy: a pointer that owns nothing (the caller keeps the log).
    const PopulationFactory the_log = [&](std::uint64_t) { return std::shared_ptr<const Population>(std::shared_ptr<const Population>(), &log); };
    const std::vector<double> log_figures = run_figures(scenario, the_log, 1, 1).front();
    const std::vector<std::vector<double>> fitted_figures =
        run_figures(generated, population_factory(generated.population), replications, threads);

    FitCheck check;
    check.replications = replications;
    check.rows = row_labels(scenario, units);
    for (std::size_t i = 0; i < check.rows.size(); ++i) {
        FitCheckRow& row = check.rows[i];
        std::vector<double> values;
        for (const std::vector<double>& r : fitted_figures)
            if (!std::isnan(r[i])) values.push_back(r[i]);
        std::sort(values.begin(), values.end());
        row.log_value = log_figures[i];
        row.replications_with_value = values.size();
        if (values.empty()) {
            row.fitted_mean = row.fitted_low = row.fitted_high = none;
        } else {
            row.fitted_mean = mean(values);
            row.fitted_low = quantile_sorted(values, 0.025);
            row.fitted_high = quantile_sorted(values, 0.975);
        }
        // A figure neither side has (no case caught anywhere) agrees; one side only does not.
        if (std::isnan(row.log_value) || values.empty())
            row.inside = std::isnan(row.log_value) && values.empty();
        else
            row.inside = row.log_value >= row.fitted_low && row.log_value <= row.fitted_high;
        if (row.inside) continue;
        ++check.outside;
        if (row.kind == FitCheckKind::benefit) check.benefit_outside.push_back(row.of + ": " + row.figure);
        if (row.kind == FitCheckKind::burden) check.burden_outside.push_back(row.of + ": " + row.figure);
    }
    return check;
}

}  // namespace tocsin
