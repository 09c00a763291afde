#include "analysis/channel_burden.hpp"

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

std::optional<double> summary(const std::vector<double>& values, double q) {
    if (values.empty()) return std::nullopt;
    std::vector<double> v = values;
    std::sort(v.begin(), v.end());
    return q < 0 ? mean(v) : quantile_sorted(v, q);
}

ChannelBurdenSummary burden_summary(const Plan& plan, const PlanRecord& rec, const ChannelBurden& b) {
    ChannelBurdenSummary s;
    s.plan = plan.name;
    s.channel = plan.channel;
    s.occasions = rec.occasions;
    s.notices = static_cast<std::int64_t>(rec.notices.size());
    for (const Notice& n : rec.notices) s.evaluations += n.asks_evaluation;
    s.delivery_minutes = delivery_minutes(plan) * static_cast<double>(rec.notices.size());
    s.burden = b.measure;
    s.burden_mean = summary(b.values, -1);
    s.burden_p90 = summary(b.values, 0.9);
    if (!b.values.empty()) s.burden_max = *std::max_element(b.values.begin(), b.values.end());
    s.minutes_mean = summary(b.minutes, -1);
    s.minutes_p90 = summary(b.minutes, 0.9);
    return s;
}

// Each unit x reporting shift x opening role the plan interrupts.
void add_chart_interruptions(std::vector<ChartInterruptionCount>& out, const SimulationSetup& setup, const Population& pop,
                             const ShiftCalendar& cal, const ReportingShifts& rep, const Plan& plan, const ChannelBurden& b) {
    const auto roles = chart_roles(setup, plan);
    std::size_t i = 0;
    for (std::size_t u = 0; u < pop.units.size(); ++u)
        for (std::size_t k = 0; k < rep.shifts.size(); ++k)
            for (std::uint8_t r : roles) {
                const std::size_t s = rep.shifts[k];
                const double heads = setup.chart_openings->roles[r].clinicians_per_unit;
                const double per = b.values[i], mins = b.minutes[i];
                ++i;
                out.push_back({plan.name, pop.units[u], setup.chart_openings->roles[r].name, cal.shifts()[s].start,
                               cal.name_of(s), per * heads, heads, per, mins * heads});
            }
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
        case Channel::chart_interruption:
        case Channel::score_lookup: {
            b.measure = plan.channel == Channel::chart_interruption ? "interruptions per clinician per shift"
                                                                   : "look-ups per clinician per shift";
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

ChannelResults channel_results(const SimulationSetup& setup, const ReportingShifts& rep, const Population& pop,
                               const ShiftCalendar& cal, const ReplicationRecord& record) {
    ChannelResults out;
    for (std::size_t p = 0; p < setup.plans.size(); ++p) {
        const Plan& plan = setup.plans[p];
        const PlanRecord& rec = record.plans[p];
        const ChannelBurden b = channel_burden(setup, pop, cal, rep, plan, rec);
        out.burden.push_back(burden_summary(plan, rec, b));
        for (const Round& r : rec.rounds)
            out.rounds.push_back({plan.name, plan.channel, r.unit == whole_hospital ? std::string("hospital") : pop.units[r.unit],
                                  r.at, std::int64_t{r.listed}, std::int64_t{r.acted}, r.minutes});
        if (plan.channel == Channel::chart_interruption || plan.channel == Channel::score_lookup)
            add_chart_interruptions(out.chart_interruptions, setup, pop, cal, rep, plan, b);
    }
    return out;
}

}  // namespace tocsin
