#include "analysis/group_figures.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <stdexcept>

#include "analysis/plan_figures.hpp"
#include "analysis/quantiles.hpp"

namespace tocsin {

namespace {

constexpr double nan = std::numeric_limits<double>::quiet_NaN();
double or_nan(const std::optional<double>& v) { return v ? *v : nan; }

// Rows of one plan, one per column and level, with the encounters' counts and stay days.
std::vector<GroupFigures> empty_rows(const std::string& plan, const Population& pop, const AnalysisSettings& settings) {
    std::vector<GroupFigures> rows;
    std::vector<std::size_t> first(pop.groups.size());
    for (std::size_t g = 0; g < pop.groups.size(); ++g) {
        first[g] = rows.size();
        for (std::size_t l = 0; l < pop.groups[g].levels(); ++l) {
            GroupFigures row;
            row.plan = plan;
            row.group = pop.groups[g].name;
            row.value = pop.groups[g].level_name(l);
            rows.push_back(std::move(row));
        }
    }
    for (const Encounter& e : pop.encounters)
        for (std::size_t g = 0; g < pop.groups.size(); ++g) {
            GroupFigures& row = rows[first[g] + e.groups[g]];
            ++row.encounters;
            row.patient_days += static_cast<double>(e.discharged - e.admitted) / 86400.0;
        }
    for (GroupFigures& row : rows) row.suppressed = row.encounters < settings.smallest_group;
    return rows;
}

// The row of encounter e's level in column g, given each column's first row.
std::size_t row_of(const Population& pop, const std::vector<std::size_t>& first, std::size_t e, std::size_t g) {
    return first[g] + pop.encounters[e].groups[g];
}

void add_plan(std::vector<GroupFigures>& rows, const AnalysisSettings& settings, const Population& pop,
              const PlanRecord& record) {
    std::vector<std::size_t> first(pop.groups.size());
    for (std::size_t g = 0, at = 0; g < pop.groups.size(); at += pop.groups[g].levels(), ++g) first[g] = at;
    std::vector<std::int64_t> true_notices(rows.size(), 0);
    for (const Notice& n : record.notices) {
        const auto& t0 = pop.encounters[n.encounter].outcome_at;
        for (std::size_t g = 0; g < pop.groups.size(); ++g) {
            const std::size_t r = row_of(pop, first, n.encounter, g);
            ++rows[r].notices;
            true_notices[r] += t0 && n.at < *t0;
        }
    }
    const auto caught_at = first_catch(settings, pop, catching_actions(record));
    std::vector<std::vector<double>> leads(rows.size());
    for (std::size_t e = 0; e < pop.encounters.size(); ++e) {
        const Encounter& enc = pop.encounters[e];
        if (!enc.outcome_at) continue;
        for (std::size_t g = 0; g < pop.groups.size(); ++g) {
            const std::size_t r = row_of(pop, first, e, g);
            ++rows[r].cases;
            if (!caught_at[e]) continue;
            ++rows[r].caught;
            leads[r].push_back(static_cast<double>(*enc.outcome_at - *caught_at[e]) / 3600.0);
        }
    }
    for (std::size_t r = 0; r < rows.size(); ++r) {
        GroupFigures& row = rows[r];
        if (row.patient_days > 0) row.notices_per_100_patient_days = 100.0 * static_cast<double>(row.notices) / row.patient_days;
        if (row.notices) row.notice_ppv = static_cast<double>(true_notices[r]) / static_cast<double>(row.notices);
        row.sensitivity_interval = wilson_interval(row.caught, row.cases);
        if (row.cases >= min_cases_for_figure)
            row.sensitivity = static_cast<double>(row.caught) / static_cast<double>(row.cases);
        std::sort(leads[r].begin(), leads[r].end());
        if (!leads[r].empty()) row.lead_median_hours = quantile_sorted(leads[r], 0.5);
    }
}

}  // namespace

std::vector<GroupFigures> group_figures(const SimulationSetup& setup, const AnalysisSettings& settings,
                                        const Population& pop, const ReplicationRecord& record) {
    std::vector<GroupFigures> out;
    if (pop.groups.empty()) return out;
    for (std::size_t p = 0; p < setup.plans.size(); ++p) {
        std::vector<GroupFigures> rows = empty_rows(setup.plans[p].name, pop, settings);
        add_plan(rows, settings, pop, record.plans[p]);
        out.insert(out.end(), std::make_move_iterator(rows.begin()), std::make_move_iterator(rows.end()));
    }
    return out;
}

std::vector<PlanThreshold> plan_thresholds(const SimulationSetup& setup) {
    std::vector<PlanThreshold> out;
    for (const Plan& p : setup.plans) out.emplace_back(p.name, p.rule.threshold);
    return out;
}

namespace {

// The encounter-level measures of one group's stays.
void add_score_measures(GroupScoreFigures& row, const std::vector<EncounterScore>& scores,
                        std::span<const PlanThreshold> thresholds, const std::optional<ProbabilityMapping>& mapping,
                        double confidence) {
    row.encounters = static_cast<std::int64_t>(scores.size());
    for (const EncounterScore& s : scores) row.cases += s.is_case;
    const std::int64_t non_cases = row.encounters - row.cases;
    if (row.cases >= min_cases_for_figure && non_cases >= min_cases_for_figure)
        row.auc = encounter_level_auc(scores, confidence);
    if (mapping && !scores.empty()) {
        const StayCalibration c = stay_level_calibration(scores, *mapping, 1, confidence);
        row.observed_expected = c.observed_expected;
        if (c.recalibration.converged) {
            row.calibration_in_the_large = c.recalibration.calibration_in_the_large;
            row.calibration_in_the_large_se = c.recalibration.calibration_in_the_large_se;
        }
    }
    ThresholdList list;
    for (const auto& [plan, t] : thresholds) list.values.push_back(t), list.source.push_back("given");
    const std::vector<ThresholdMeasures> at = encounter_threshold_measures(scores, list, confidence);
    for (std::size_t i = 0; i < thresholds.size(); ++i)
        row.at_plan_thresholds.push_back({thresholds[i].first, thresholds[i].second, at[i].sensitivity, at[i].specificity});
}

}  // namespace

std::vector<GroupScoreFigures> group_score_figures(const Population& pop, std::span<const PlanThreshold> thresholds,
                                                   const std::optional<ProbabilityMapping>& mapping,
                                                   std::int64_t smallest_group, double confidence) {
    std::vector<GroupScoreFigures> out;
    if (pop.groups.empty()) return out;  // no pass over a year of scores for nothing
    const std::vector<EncounterScore> all = encounter_level_scores(pop);
    for (std::size_t g = 0; g < pop.groups.size(); ++g)
        for (std::size_t l = 0; l < pop.groups[g].levels(); ++l) {
            GroupScoreFigures row;
            row.group = pop.groups[g].name;
            row.value = pop.groups[g].level_name(l);
            std::vector<EncounterScore> mine;
            std::int64_t encounters = 0;
            for (const Encounter& e : pop.encounters) encounters += e.groups[g] == l;
            for (const EncounterScore& s : all)
                if (pop.encounters[s.encounter].groups[g] == l) mine.push_back(s);
            row.suppressed = encounters < smallest_group;
            add_score_measures(row, mine, thresholds, mapping, confidence);
            out.push_back(std::move(row));
        }
    return out;
}

namespace {

struct Named {
    std::string group, value;
    std::optional<std::pair<double, Interval>> figure;
};

void add_gaps(std::vector<GroupGap>& out, const std::string& plan, const std::vector<Named>& rows) {
    for (const Named& a : rows)
        for (const Named& b : rows)
            if (&a != &b && a.figure && b.figure && a.group == b.group && a.figure->second.upper < b.figure->second.lower)
                out.push_back({plan, a.group, a.value, b.value, a.figure->first, b.figure->first, a.figure->second,
                               b.figure->second});
}

}  // namespace

std::vector<GroupGap> group_gaps(std::span<const GroupFigures> figures, std::span<const GroupScoreFigures> scores) {
    std::vector<GroupGap> out;
    std::vector<Named> rows;
    for (const GroupScoreFigures& s : scores) {
        rows.push_back({s.group, s.value, {}});
        if (!s.suppressed && s.auc) rows.back().figure = std::pair{s.auc->auc, s.auc->interval};
    }
    add_gaps(out, "", rows);
    for (std::size_t begin = 0; begin < figures.size();) {
        std::size_t end = begin;
        rows.clear();
        for (; end < figures.size() && figures[end].plan == figures[begin].plan; ++end) {
            const GroupFigures& f = figures[end];
            rows.push_back({f.group, f.value, {}});
            if (!f.suppressed && f.sensitivity) rows.back().figure = std::pair{*f.sensitivity, f.sensitivity_interval};
        }
        add_gaps(out, figures[begin].plan, rows);
        begin = end;
    }
    return out;
}

const std::vector<GroupMetric>& group_metrics() {
    static const std::vector<GroupMetric> metrics = {
        {"encounters", "encounters", [](const GroupFigures& f) { return static_cast<double>(f.encounters); }},
        {"cases", "patients with the outcome", [](const GroupFigures& f) { return static_cast<double>(f.cases); }},
        {"caught", "cases caught", [](const GroupFigures& f) { return static_cast<double>(f.caught); }},
        {"sensitivity", "share of cases caught", [](const GroupFigures& f) { return or_nan(f.sensitivity); }},
        {"lead_median_h", "median lead time, hours", [](const GroupFigures& f) { return or_nan(f.lead_median_hours); }},
        {"notices", "notices in all", [](const GroupFigures& f) { return static_cast<double>(f.notices); }},
        {"notices_per_100_patient_days", "notices per 100 patient-days",
         [](const GroupFigures& f) { return or_nan(f.notices_per_100_patient_days); }},
        {"notice_ppv", "share of notices for patients who went on to the outcome",
         [](const GroupFigures& f) { return or_nan(f.notice_ppv); }},
    };
    return metrics;
}

std::size_t group_metric_index(std::string_view name) {
    const auto& metrics = group_metrics();
    for (std::size_t m = 0; m < metrics.size(); ++m)
        if (metrics[m].name == name) return m;
    throw std::out_of_range("no per-group metric named " + std::string(name));
}

ReplicatedGroupFigures collect_group_figures(const std::vector<std::string>& plan_names,
                                             const std::vector<std::vector<GroupFigures>>& by_replication) {
    ReplicatedGroupFigures f;
    f.plans = plan_names;
    f.replications = by_replication.size();
    if (!by_replication.empty())
        for (const GroupFigures& row : by_replication[0])
            if (row.plan == plan_names.front()) f.rows.emplace_back(row.group, row.value);
    const auto& metrics = group_metrics();
    f.values.assign(f.plans.size(), std::vector<std::vector<std::vector<double>>>(
                                        f.rows.size(), std::vector<std::vector<double>>(
                                                           metrics.size(), std::vector<double>(f.replications, nan))));
    for (std::size_t r = 0; r < by_replication.size(); ++r) {
        const auto& rows = by_replication[r];
        if (rows.size() != f.plans.size() * f.rows.size())
            throw std::logic_error("per-group figures of replication " + std::to_string(r) + " have another shape");
        for (std::size_t i = 0; i < rows.size(); ++i) {
            if (rows[i].suppressed) continue;
            for (std::size_t m = 0; m < metrics.size(); ++m)
                f.values[i / f.rows.size()][i % f.rows.size()][m][r] = metrics[m].value(rows[i]);
        }
    }
    return f;
}

}  // namespace tocsin
