#include "study/shift_effect.hpp"

#include <cmath>
#include <limits>
#include <sstream>
#include <stdexcept>

#include "analysis/comparison.hpp"
#include "analysis/results.hpp"

namespace tocsin {

namespace {

constexpr double nan_value = std::numeric_limits<double>::quiet_NaN();

enum Period { before = 0, after = 1 };
const char* const metric_names_in_order[] = {"per_unit_night_mean", "per_unit_shift_mean", "sensitivity"};
constexpr std::size_t n_metrics = 3;

std::vector<double> defined(const std::vector<double>& x) {
    std::vector<double> out;
    for (double v : x)
        if (std::isfinite(v)) out.push_back(v);
    return out;
}

std::string interval_text(const MeanInterval& m) {
    if (m.n == 0) return "n/a";
    std::string s = format_real(m.mean, 2);
    if (std::isfinite(m.low)) s += " (" + format_real(m.low, 2) + " to " + format_real(m.high, 2) + ")";
    return s;
}

Cell cell(double v) { return std::isfinite(v) ? Cell(v) : Cell(); }

}  // namespace

ShiftEffect shift_effect(const Scenario& sc, const PopulationFactory& make_population, unsigned threads) {
    if (!sc.population.shift) throw std::logic_error("shift_effect: the scenario declares no shift");
    const Instant from = sc.population.shift->from;
    const std::size_t n_plans = sc.simulation.plans.size();
    // values[plan][metric][period][replication]
    std::vector<std::vector<std::vector<std::vector<double>>>> values(
        n_plans, std::vector<std::vector<std::vector<double>>>(
                     n_metrics, std::vector<std::vector<double>>(2, std::vector<double>(sc.replications, nan_value))));
    ExperimentOptions options;
    options.replications = sc.replications;
    options.threads = threads;
    run_experiment(sc, make_population, options,
                   [&](std::uint64_t r, const Population& pop, const ShiftCalendar& cal, const ReplicationRecord& rec) {
                       const ReportingShifts all = reporting_shifts(sc.analysis, pop, cal);
                       ReportingShifts split[2];
                       split[before].from = all.from;
                       split[before].until = from;
                       split[after].from = from;
                       split[after].until = all.until;
                       for (std::size_t k : all.shifts) {
                           const Shift& s = cal.shifts()[k];
                           if (s.end <= from) split[before].shifts.push_back(k);
                           else if (s.start >= from) split[after].shifts.push_back(k);
                       }
                       for (std::size_t p = 0; p < n_plans; ++p) {
                           for (int period : {before, after}) {
                               const PlanFigures f = plan_figures(sc.analysis, pop, cal, split[period], rec.plans[p]);
                               values[p][0][period][r] = f.per_unit_night_mean.value_or(nan_value);
                               values[p][1][period][r] = split[period].shifts.empty() ? nan_value : f.per_unit_shift_mean;
                           }
                           std::vector<std::pair<std::uint32_t, Instant>> actions;
                           for (const Notice& n : rec.plans[p].notices) actions.emplace_back(n.encounter, n.at);
                           const auto caught = first_catch(sc.analysis, pop, actions);
                           double cases[2] = {0, 0}, hits[2] = {0, 0};
                           for (std::size_t e = 0; e < pop.encounters.size(); ++e) {
                               const auto& t0 = pop.encounters[e].outcome_at;
                               if (!t0) continue;
                               const int period = *t0 < from ? before : after;
                               cases[period] += 1;
                               hits[period] += caught[e] ? 1 : 0;
                           }
                           for (int period : {before, after})
                               values[p][2][period][r] = cases[period] > 0 ? hits[period] / cases[period] : nan_value;
                       }
                   });

    ShiftEffect out;
    out.table.name = "shift_effect";
    out.table.title = "Before and after the stress-test shift (mean over replications, 95% CI; change paired by replication)";
    out.table.columns = {"plan", "metric", "before", "before_low", "before_high", "after", "after_low", "after_high",
                         "change", "change_low", "change_high", "replications"};
    std::ostringstream text;
    text << "Stress test from " << format_local(from, sc.simulation.zone) << ": before -> after (change), mean over "
         << sc.replications << (sc.replications == 1 ? " replication" : " replications") << "\n";
    for (std::size_t p = 0; p < n_plans; ++p) {
        text << "  " << sc.simulation.plans[p].name << ":";
        for (std::size_t m = 0; m < n_metrics; ++m) {
            const auto& b = values[p][m][before];
            const auto& a = values[p][m][after];
            std::vector<double> change;
            for (std::size_t r = 0; r < sc.replications; ++r)
                if (std::isfinite(a[r]) && std::isfinite(b[r])) change.push_back(a[r] - b[r]);
            const std::vector<double> bd = defined(b), ad = defined(a);
            const MeanInterval mb = mean_interval(bd), ma = mean_interval(ad), mc = mean_interval(change);
            auto triple = [](const MeanInterval& mi) -> std::vector<Cell> {
                if (mi.n == 0) return {Cell(), Cell(), Cell()};
                return {cell(mi.mean), cell(mi.low), cell(mi.high)};
            };
            std::vector<Cell> row = {sc.simulation.plans[p].name, std::string(metric_names_in_order[m])};
            for (const MeanInterval* mi : {&mb, &ma, &mc})
                for (Cell c : triple(*mi)) row.push_back(c);
            row.push_back(static_cast<std::int64_t>(change.size()));
            out.table.add_row(std::move(row));
            if (m != 1)
                text << (m ? ";" : "") << " " << (m == 0 ? "notices per unit per night " : "sensitivity ")
                     << interval_text(mb) << " -> " << interval_text(ma) << " (" << interval_text(mc) << ")";
        }
        text << "\n";
    }
    out.text = text.str();
    return out;
}

}  // namespace tocsin
