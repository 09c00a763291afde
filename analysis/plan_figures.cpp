#include "analysis/plan_figures.hpp"

#include <algorithm>
#include <cstdint>

#include "analysis/averted.hpp"
#include "analysis/channel_burden.hpp"
#include "analysis/quantiles.hpp"
#include "sim/channels.hpp"

namespace tocsin {

std::vector<std::optional<Instant>> first_catch(const AnalysisSettings& settings, const Population& pop,
                                                const std::vector<std::pair<std::uint32_t, Instant>>& actions) {
    std::vector<std::optional<Instant>> first(pop.encounters.size());
    for (const auto& [e, at] : actions) {
        const Encounter& enc = pop.encounters[e];
        if (!enc.outcome_at) continue;
        const Instant t0 = *enc.outcome_at;
        if (at < t0 - settings.window || at > t0 - settings.min_lead) continue;
        if (!first[e] || at < *first[e]) first[e] = at;
    }
    return first;
}

namespace {

// Counts every notice by reason and by unit x reporting shift.
void count_notices(PlanFigures& f, const ShiftCalendar& cal, const ReportingShifts& rep, std::size_t n_units,
                   const PlanRecord& record) {
    const std::size_t n_shifts = rep.shifts.size();
    f.unit_shift_counts.assign(n_units * n_shifts, 0);
    // Position of each calendar shift among the reporting shifts, or npos.
    std::vector<std::size_t> slot(cal.size(), SIZE_MAX);
    for (std::size_t k = 0; k < n_shifts; ++k) slot[rep.shifts[k]] = k;
    for (const Notice& n : record.notices) {
        ++f.notices;
        if (n.reason == NoticeReason::first) ++f.notices_first;
        else if (n.reason == NoticeReason::repeat) ++f.notices_repeat;
        else if (n.reason == NoticeReason::rise) ++f.notices_rise;
        if (cal.contains(n.at)) {
            const std::size_t k = slot[cal.index_of(n.at)];
            if (k != SIZE_MAX) ++f.unit_shift_counts[n.unit * n_shifts + k];
        }
    }
}

// Mean, 90th percentile and worst notices per unit per shift, per night
// shift, and the worst unit's own night mean and 90th percentile.
void per_unit_shift_figures(PlanFigures& f, const ShiftCalendar& cal, const ReportingShifts& rep, std::size_t n_units) {
    const std::size_t n_shifts = rep.shifts.size();
    std::vector<double> all, night;
    for (std::size_t u = 0; u < n_units; ++u) {
        for (std::size_t k = 0; k < n_shifts; ++k) {
            const double c = static_cast<double>(f.unit_shift_counts[u * n_shifts + k]);
            all.push_back(c);
            if (cal.is_night(rep.shifts[k])) night.push_back(c);
        }
        const std::vector<double> own = unit_night_values(f.unit_shift_counts, u, cal, rep);
        if (own.empty()) continue;
        f.worst_unit_night_mean = std::max(f.worst_unit_night_mean.value_or(0.0), mean(own));
        f.worst_unit_night_p90 = std::max(f.worst_unit_night_p90.value_or(0.0), quantile_sorted(own, 0.9));
    }
    std::sort(all.begin(), all.end());
    std::sort(night.begin(), night.end());
    if (!all.empty()) {
        f.per_unit_shift_mean = mean(all);
        f.per_unit_shift_p90 = quantile_sorted(all, 0.9);
        f.per_unit_shift_max = all.back();
    }
    if (!night.empty()) {
        f.per_unit_night_mean = mean(night);
        f.per_unit_night_p90 = quantile_sorted(night, 0.9);
        f.per_unit_night_max = night.back();
    }
}

// A nurse manager counts the patients a night's pages were about, not only the
// pages: five pages for one patient are not five patients to go and see.
void patients_per_unit_night(PlanFigures& f, const ShiftCalendar& cal, const ReportingShifts& rep, std::size_t n_units,
                             const PlanRecord& record) {
    const std::vector<std::int64_t> patients = patients_per_unit_shift(cal, rep, n_units, record);
    std::vector<double> night;
    for (std::size_t u = 0; u < n_units; ++u) {
        const std::vector<double> own = unit_night_values(patients, u, cal, rep);
        night.insert(night.end(), own.begin(), own.end());
    }
    if (night.empty()) return;
    std::sort(night.begin(), night.end());
    f.patients_per_unit_night_mean = mean(night);
    f.patients_per_unit_night_p90 = quantile_sorted(night, 0.9);
    f.patients_per_unit_night_max = night.back();
}

// Only a notice before time zero can be "for a patient who went on to the
// outcome"; scores stop at time zero, so none should come after, but one that
// did would not count as a true positive.
void ppv_figures(PlanFigures& f, const Population& pop, const PlanRecord& record) {
    if (record.notices.empty()) return;
    enum : std::uint8_t { not_noticed, noticed, noticed_before_outcome };
    std::vector<std::uint8_t> state(pop.encounters.size(), not_noticed);
    std::int64_t true_notices = 0;
    for (const Notice& n : record.notices) {
        const auto& t0 = pop.encounters[n.encounter].outcome_at;
        const bool before_outcome = t0 && n.at < *t0;
        true_notices += before_outcome;
        if (before_outcome) state[n.encounter] = noticed_before_outcome;
        else if (state[n.encounter] == not_noticed) state[n.encounter] = noticed;
    }
    std::int64_t patients = 0, cases = 0;
    for (const std::uint8_t s : state) {
        patients += s != not_noticed;
        cases += s == noticed_before_outcome;
    }
    f.notice_ppv = static_cast<double>(true_notices) / static_cast<double>(record.notices.size());
    f.patient_ppv = static_cast<double>(cases) / static_cast<double>(patients);
}

// With staff, a case is caught by the start of an evaluation, not by the
// notice: the evaluations started and the waits before them.
void evaluation_starts(PlanFigures& f, const StaffRun& staff) {
    std::vector<double> waits;
    std::int64_t never = 0;
    for (const TaskRecord& t : staff.tasks) {
        never += t.fate == TaskFate::never_taken_up;
        if (t.started()) waits.push_back(static_cast<double>(t.wait_seconds()) / 60.0);
    }
    f.evaluations = static_cast<std::int64_t>(waits.size());
    f.never_taken_up = never;
    if (!waits.empty()) {
        std::sort(waits.begin(), waits.end());
        f.wait_median_minutes = quantile_sorted(waits, 0.5);
        f.wait_p90_minutes = quantile_sorted(waits, 0.9);
    }
}

// Cases caught and missed, lead times, and evaluations of patients without the outcome.
void catch_figures(PlanFigures& f, const Population& pop, const std::vector<std::pair<std::uint32_t, Instant>>& actions,
                   const std::vector<std::optional<Instant>>& caught_at,
                   const std::vector<std::optional<Instant>>& noticed_at) {
    std::vector<bool> evaluated(pop.encounters.size(), false);
    for (const auto& [e, at] : actions) evaluated[e] = true;
    for (std::size_t e = 0; e < evaluated.size(); ++e) f.evaluated_non_cases += evaluated[e] && !pop.encounters[e].outcome_at;
    std::vector<double> leads, notice_leads;
    for (std::size_t e = 0; e < pop.encounters.size(); ++e) {
        if (!pop.encounters[e].outcome_at) continue;
        ++f.cases;
        if (caught_at[e]) {
            ++f.caught;
            leads.push_back(static_cast<double>(*pop.encounters[e].outcome_at - *caught_at[e]) / 3600.0);
        }
        if (noticed_at[e]) {
            ++f.caught_by_notice;
            notice_leads.push_back(static_cast<double>(*pop.encounters[e].outcome_at - *noticed_at[e]) / 3600.0);
        }
    }
    if (!notice_leads.empty()) {
        std::sort(notice_leads.begin(), notice_leads.end());
        f.lead_from_notice_median_hours = quantile_sorted(notice_leads, 0.5);
    }
    f.missed = f.cases - f.caught;
    if (f.cases) f.sensitivity = static_cast<double>(f.caught) / static_cast<double>(f.cases);
    if (!leads.empty()) {
        std::sort(leads.begin(), leads.end());
        f.lead_median_hours = quantile_sorted(leads, 0.5);
        f.lead_q1_hours = quantile_sorted(leads, 0.25);
        f.lead_q3_hours = quantile_sorted(leads, 0.75);
    }
    if (f.caught) f.notices_per_catch = static_cast<double>(f.notices) / static_cast<double>(f.caught);
}

}  // namespace

std::vector<std::int64_t> patients_per_unit_shift(const ShiftCalendar& cal, const ReportingShifts& rep,
                                                  std::size_t n_units, const PlanRecord& record) {
    const std::size_t n_shifts = rep.shifts.size();
    std::vector<std::size_t> slot(cal.size(), SIZE_MAX);
    for (std::size_t k = 0; k < n_shifts; ++k)
        if (cal.is_night(rep.shifts[k])) slot[rep.shifts[k]] = k;
    // (unit-night, encounter) pairs, sorted so that repeats sit together.
    std::vector<std::pair<std::size_t, std::uint32_t>> seen;
    for (const Notice& n : record.notices) {
        if (!cal.contains(n.at)) continue;
        const std::size_t k = slot[cal.index_of(n.at)];
        if (k != SIZE_MAX) seen.emplace_back(n.unit * n_shifts + k, n.encounter);
    }
    std::sort(seen.begin(), seen.end());
    seen.erase(std::unique(seen.begin(), seen.end()), seen.end());
    std::vector<std::int64_t> patients(n_units * n_shifts, 0);
    for (const auto& [unit_night, e] : seen) ++patients[unit_night];
    return patients;
}

std::vector<double> unit_night_values(const std::vector<std::int64_t>& per_unit_shift, std::size_t unit,
                                      const ShiftCalendar& cal, const ReportingShifts& rep) {
    const std::size_t n_shifts = rep.shifts.size();
    std::vector<double> night;
    for (std::size_t k = 0; k < n_shifts; ++k)
        if (cal.is_night(rep.shifts[k])) night.push_back(static_cast<double>(per_unit_shift[unit * n_shifts + k]));
    std::sort(night.begin(), night.end());
    return night;
}

std::vector<std::pair<std::uint32_t, Instant>> evaluation_requests(const PlanRecord& record) {
    std::vector<std::pair<std::uint32_t, Instant>> actions;
    actions.reserve(record.notices.size());
    for (const Notice& n : record.notices)
        if (n.asks_evaluation) actions.emplace_back(n.encounter, n.at);
    return actions;
}

std::vector<std::pair<std::uint32_t, Instant>> catching_actions(const PlanRecord& record) {
    if (!record.staff) return evaluation_requests(record);
    std::vector<std::pair<std::uint32_t, Instant>> actions;
    for (const TaskRecord& t : record.staff->tasks)
        if (t.started()) actions.emplace_back(t.encounter, t.started_at);
    return actions;
}

PlanFigures plan_figures(const AnalysisSettings& settings, const Population& pop, const ShiftCalendar& cal,
                         const ReportingShifts& rep, const PlanRecord& record) {
    PlanFigures f;
    count_notices(f, cal, rep, pop.units.size(), record);
    per_unit_shift_figures(f, cal, rep, pop.units.size());
    patients_per_unit_night(f, cal, rep, pop.units.size(), record);
    ppv_figures(f, pop, record);
    const auto requests = evaluation_requests(record);
    const auto noticed_at = first_catch(settings, pop, requests);
    f.evaluations = static_cast<std::int64_t>(requests.size());
    if (record.staff) evaluation_starts(f, *record.staff);
    const auto actions = record.staff ? catching_actions(record) : requests;
    const auto caught_at = record.staff ? first_catch(settings, pop, actions) : noticed_at;
    catch_figures(f, pop, actions, caught_at, noticed_at);
    if (settings.averted) {
        f.assumed_averted = expected_averted(*settings.averted, settings.min_lead, pop, caught_at);
        if (*f.assumed_averted > 0)
            f.evaluations_per_assumed_averted = static_cast<double>(f.evaluations) / *f.assumed_averted;
    }
    return f;
}

void add_plan_burdens(PlanFigures& f, const SimulationSetup& setup, const Population& pop, const ShiftCalendar& cal,
                      const ReportingShifts& rep, const Plan& plan, const PlanRecord& record) {
    const ChannelBurden own = channel_burden(setup, pop, cal, rep, plan, record);
    if (!own.values.empty()) {
        std::vector<double> v = own.values;
        std::sort(v.begin(), v.end());
        f.channel_burden_mean = mean(v);
        f.channel_burden_p90 = quantile_sorted(v, 0.9);
    }
    const double unit_shifts = static_cast<double>(pop.units.size() * rep.shifts.size());
    if (unit_shifts == 0) return;
    auto in_period = [&](Instant at) { return at >= rep.from && at < rep.until; };
    double delivered = 0, evaluations = 0;
    for (const Notice& n : record.notices)
        if (in_period(n.at)) {
            delivered += 1;
            evaluations += n.asks_evaluation;
        }
    double minutes = delivered * delivery_minutes(plan);
    if (record.staff) {
        evaluations = 0;
        for (const TaskRecord& t : record.staff->tasks)
            if (in_period(t.created) && t.started()) {
                evaluations += 1;
                minutes += static_cast<double>(t.service_seconds) / 60.0;
            }
    }
    f.evaluations_per_unit_shift = evaluations / unit_shifts;
    // Without roles an evaluation has no minutes, so the figure would count a
    // page as free: it is given only when the staff are simulated. A ranked
    // review has no role tasks; its reviews' minutes are its delivery.
    if (setup.has_staff()) f.staff_minutes_per_unit_shift = minutes / unit_shifts;
}

}  // namespace tocsin
