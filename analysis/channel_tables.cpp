#include "analysis/channel_tables.hpp"

#include <algorithm>

#include "analysis/quantiles.hpp"
#include "sim/channels.hpp"

namespace tocsin {

namespace {

// Position of each calendar shift among the reporting shifts, or SIZE_MAX.
std::vector<std::size_t> reporting_slots(const ShiftCalendar& cal, const ReportingShifts& rep) {
    std::vector<std::size_t> slot(cal.size(), SIZE_MAX);
    for (std::size_t k = 0; k < rep.shifts.size(); ++k) slot[rep.shifts[k]] = k;
    return slot;
}

std::size_t slot_of(const ShiftCalendar& cal, const std::vector<std::size_t>& slot, Instant at) {
    return cal.contains(at) ? slot[cal.index_of(at)] : SIZE_MAX;
}

// Roles whose openings the plan interrupts.
std::vector<std::uint8_t> chart_roles(const SimulationSetup& setup, const Plan& plan) {
    std::vector<std::uint8_t> roles;
    if (plan.chart.role) roles.push_back(*plan.chart.role);
    else if (setup.chart_openings)
        for (std::size_t r = 0; r < setup.chart_openings->roles.size(); ++r) roles.push_back(static_cast<std::uint8_t>(r));
    return roles;
}

Cell summary(const std::vector<double>& values, double q) {
    if (values.empty()) return Cell();
    std::vector<double> v = values;
    std::sort(v.begin(), v.end());
    return q < 0 ? Cell(mean(v)) : Cell(quantile_sorted(v, q));
}

}  // namespace

ChannelBurden channel_burden(const SimulationSetup& setup, const Population& pop, const ShiftCalendar& cal,
                             const ReportingShifts& rep, const Plan& plan, const PlanRecord& record) {
    ChannelBurden b;
    const std::size_t n_units = pop.units.size(), n_shifts = rep.shifts.size();
    const auto slot = reporting_slots(cal, rep);
    const double per_notice = delivery_minutes(plan);
    switch (plan.channel) {
        case Channel::page: {
            b.measure = "notices per unit per shift";
            b.values.assign(n_units * n_shifts, 0.0);
            b.minutes.assign(n_units * n_shifts, 0.0);
            for (const Notice& n : record.notices) {
                const std::size_t k = slot_of(cal, slot, n.at);
                if (k == SIZE_MAX) continue;
                b.values[n.unit * n_shifts + k] += 1;
                b.minutes[n.unit * n_shifts + k] += per_notice;
            }
            break;
        }
        case Channel::chart_interruption: {
            b.measure = "interruptions per clinician per shift";
            const auto roles = chart_roles(setup, plan);
            const std::size_t n_roles = setup.chart_openings ? setup.chart_openings->roles.size() : 0;
            std::vector<double> count(n_units * n_shifts * n_roles, 0.0), minutes(count.size(), 0.0);
            for (const Notice& n : record.notices) {
                const std::size_t k = slot_of(cal, slot, n.at);
                if (k == SIZE_MAX) continue;
                const std::size_t i = (n.unit * n_shifts + k) * n_roles + n.opener_role;
                count[i] += 1;
                minutes[i] += per_notice;
            }
            for (std::size_t u = 0; u < n_units; ++u)
                for (std::size_t k = 0; k < n_shifts; ++k)
                    for (std::uint8_t r : roles) {
                        const double heads = setup.chart_openings->roles[r].clinicians_per_unit;
                        const std::size_t i = (u * n_shifts + k) * n_roles + r;
                        b.values.push_back(count[i] / heads);
                        b.minutes.push_back(minutes[i] / heads);
                    }
            break;
        }
        case Channel::handoff_list:
        case Channel::ranked_review:
            b.measure = plan.channel == Channel::handoff_list ? "patients flagged per unit per handoff"
                        : plan.review.scope == ReviewScope::unit ? "patients reviewed per unit per review round"
                                                                 : "patients reviewed per review round";
            for (const Round& r : record.rounds) {
                if (r.at < rep.from || r.at >= rep.until) continue;
                b.values.push_back(r.acted);
                b.minutes.push_back(r.minutes);
            }
            break;
    }
    return b;
}

ChannelTables channel_tables(const SimulationSetup& setup, const AnalysisSettings& settings, const Population& pop, const ShiftCalendar& cal,
                             const ReplicationRecord& record) {
    ChannelTables t;
    const ReportingShifts rep = reporting_shifts(settings, pop, cal);
    t.channel_burden.name = "channel_burden";
    t.channel_burden.title = "Burden by channel, in each channel's own unit (reporting period)";
    t.channel_burden.columns = {"plan", "channel", "occasions", "notices", "evaluations", "delivery_minutes",
                                "burden", "burden_mean", "burden_p90", "burden_max", "minutes_mean", "minutes_p90"};
    t.rounds.name = "rounds";
    t.rounds.title = "Handoff lists and review rounds";
    t.rounds.columns = {"plan", "channel", "scope", "at", "listed", "acted", "minutes"};
    t.chart_interruptions.name = "chart_interruptions";
    t.chart_interruptions.title = "Chart interruptions per unit, shift and opening role";
    t.chart_interruptions.columns = {"plan", "unit", "role", "shift_start", "shift", "interruptions", "clinicians",
                                     "per_clinician", "minutes"};
    for (std::size_t p = 0; p < setup.plans.size(); ++p) {
        const Plan& plan = setup.plans[p];
        const PlanRecord& rec = record.plans[p];
        const ChannelBurden b = channel_burden(setup, pop, cal, rep, plan, rec);
        std::int64_t evaluations = 0;
        for (const Notice& n : rec.notices) evaluations += n.asks_evaluation;
        const double minutes = delivery_minutes(plan) * static_cast<double>(rec.notices.size());
        t.channel_burden.add_row({plan.name, std::string(to_string(plan.channel)), rec.occasions,
                                  static_cast<std::int64_t>(rec.notices.size()), evaluations, minutes, b.measure,
                                  summary(b.values, -1), summary(b.values, 0.9),
                                  b.values.empty() ? Cell() : Cell(*std::max_element(b.values.begin(), b.values.end())),
                                  summary(b.minutes, -1), summary(b.minutes, 0.9)});
        for (const Round& r : rec.rounds)
            t.rounds.add_row({plan.name, std::string(to_string(plan.channel)),
                              r.unit == whole_hospital ? std::string("hospital") : pop.units[r.unit],
                              format_local(r.at, setup.zone), std::int64_t{r.listed}, std::int64_t{r.acted}, r.minutes});
        if (plan.channel == Channel::chart_interruption) {
            const std::size_t n_shifts = rep.shifts.size();
            const auto roles = chart_roles(setup, plan);
            std::size_t i = 0;
            for (std::size_t u = 0; u < pop.units.size(); ++u)
                for (std::size_t k = 0; k < n_shifts; ++k)
                    for (std::uint8_t r : roles) {
                        const std::size_t s = rep.shifts[k];
                        const double heads = setup.chart_openings->roles[r].clinicians_per_unit;
                        const double per = b.values[i], mins = b.minutes[i];
                        ++i;
                        t.chart_interruptions.add_row({plan.name, pop.units[u], setup.chart_openings->roles[r].name,
                                                       format_local(cal.shifts()[s].start, setup.zone), cal.name_of(s),
                                                       per * heads, heads, per, mins * heads});
                    }
        }
    }
    return t;
}

void add_chart_opening_exclusions(Table& exclusions, const ChartOpeningLog& log) {
    for (const auto& [reason, n] : log.excluded_by_reason) exclusions.add_row({"chart openings", reason, n});
    for (const auto& [reason, n] : log.notes) exclusions.add_row({"timestamps", "chart openings: " + reason, n});
    for (const auto& [reason, rows] : log.rows_skipped)
        exclusions.add_row({"skipped rows", reason + " (" + describe_lines(rows) + ")", rows.count});
}

}  // namespace tocsin
