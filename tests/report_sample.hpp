#pragma once
// An invented ReportInput with every section filled, shared by the report
// tests. Values are drawn from fixed-seed Boost.Random streams so the page
// looks like a real run without depending on one.
#include <boost/random/mersenne_twister.hpp>
#include <boost/random/normal_distribution.hpp>
#include <boost/random/poisson_distribution.hpp>

#include <cmath>
#include <string>
#include <vector>

#include "report/report.hpp"

namespace tocsin::testing {

inline ReportInput sample_report_input(const std::string& hostile = "") {
    struct Plan {
        std::string name;
        double night_mean, caught, lead_median_hours;
        bool on_frontier;
    };
    // `hostile` is appended to one plan and one role name to test escaping in
    // every place a name appears (tables, chart labels, tooltips, lists).
    const std::vector<Plan> plans = {{"page-70", 0.4, 30, 5.6, true},
                                     {"page-55-rise" + hostile, 3.0, 47, 11.2, true},
                                     {"page-60-snooze-4h", 1.6, 41, 8.9, true},
                                     {"page-60-no-snooze", 4.1, 42, 9.0, false},
                                     {"review-top-8 at 07:00", 2.2, 36, 6.1, false}};
    ReportInput in;
    in.title = "Willowmere General: ward paging rules";
    in.question = "Which paging rule should the three medical wards pilot, given that the night teams can take "
                  "no more than 4 pages per ward per night, 9 nights in 10?";
    in.key_findings = {"page-60-snooze-4h stays within the budget and reaches 41 of 53 cases (36 to 46).",
                       "page-55-rise reaches 6 more cases for about 1.4 more pages per ward per night."};
    in.assumptions = {"Four weeks of an invented hourly deterioration score on three wards, replayed as logged.",
                      "A case is caught when a page comes between 24 hours and 1 hour before the unplanned ICU transfer.",
                      "The night shift runs from 19:00 to 07:00 local time (Europe/Berlin).",
                      "Every page is answered by the ward's charge nurse; evaluations take 10 to 25 minutes."};
    in.column_labels = {{"plan", "Plan"},
                        {"night_mean", "Pages per ward per night"},
                        {"night_p90", "9 nights in 10, at most"},
                        {"caught", "Cases caught"},
                        {"lead_median_h", "Median lead (hours)"}};
    in.comparison.name = "comparison";
    in.comparison.title = "Plans compared over 200 replications";
    in.comparison.columns = {"plan", "night_mean", "night_mean_lo", "night_mean_hi", "night_p90",
                             "caught", "caught_lo", "caught_hi", "lead_median_h", "notes"};
    for (const Plan& p : plans)
        in.comparison.add_row({p.name, p.night_mean, p.night_mean * 0.9, p.night_mean * 1.1, std::round(p.night_mean * 1.8 + 1),
                               static_cast<std::int64_t>(p.caught), p.caught - 4.5, p.caught + 4.0, p.lead_median_hours,
                               Cell{}});
    in.interval_note = "Brackets: 95% interval over 200 replications (2.5th to 97.5th percentile of the replications).";
    Table diff;
    diff.name = "differences";
    diff.title = "Each plan against page-60-snooze-4h";
    diff.columns = {"plan", "night_mean_difference", "night_mean_difference_lo", "night_mean_difference_hi"};
    for (const Plan& p : plans)
        diff.add_row({p.name, p.night_mean - 1.6, p.night_mean - 1.6 - 0.1, p.night_mean - 1.6 + 0.1});
    in.differences = diff;
    in.burden_limit = 4;
    in.per_night_limit = 4;
    in.burden_per_night_label = "pages per ward per night";
    in.budget_answer = "Within 4 pages per ward per night on 9 nights in 10, page-60-snooze-4h catches the most "
                       "cases; it was best in 172 of 200 replications (86%).";
    boost::random::mt19937 engine(20261201u);
    for (const Plan& p : plans) {
        in.frontier.push_back({p.name, p.night_mean, p.night_mean * 0.9, p.night_mean * 1.1, p.caught, p.caught - 4.5,
                               p.caught + 4.0, p.on_frontier, ""});
        PlanSeries nights{p.name, {}};
        boost::random::poisson_distribution<int> pages(p.night_mean);
        for (int i = 0; i < 3 * 28 * 4; ++i) nights.values.push_back(pages(engine));
        in.burden_per_night.push_back(nights);
        PlanSeries lead{p.name, {}}, lead_evaluation{p.name, {}};
        boost::random::normal_distribution<double> hours(p.lead_median_hours, 4.0);
        for (int i = 0; i < static_cast<int>(p.caught); ++i) {
            const double h = std::clamp(hours(engine), 1.0, 24.0);
            lead.values.push_back(h);
            lead_evaluation.values.push_back(std::max(1.0, h - 0.4));
        }
        in.lead_times_hours.push_back(lead);
        in.lead_times_from_evaluation_hours.push_back(lead_evaluation);
    }
    in.burden_note = "one ward-night of one replication";
    Table staff;
    staff.name = "staff";
    staff.title = "Staff minutes per shift and task waits, by role";
    staff.columns = {"plan", "role", "minutes_per_shift", "utilisation", "wait_median_min", "wait_p90_min"};
    staff.add_row({plans[1].name, "charge nurse" + hostile, 48.5, 0.067, 0.0, 6.5});
    staff.add_row({plans[2].name, "charge nurse", 26.0, 0.036, 0.0, 3.0});
    in.staff_and_waits = staff;
    Table auc;
    auc.name = "discrimination";
    auc.title = "Encounter-level discrimination";
    auc.columns = {"measure", "value", "value_lo", "value_hi"};
    auc.add_row({"AUC (DeLong interval)", 0.81, 0.75, 0.87});
    in.evaluation_tables.push_back(auc);
    std::vector<CurvePoint> roc, calibration, net_benefit, treat_all;
    for (int i = 0; i <= 20; ++i) {
        const double t = i / 20.0;
        roc.push_back({t, std::pow(t, 0.3)});
        calibration.push_back({t, std::min(1.0, t * 0.85 + 0.02)});
        const double prevalence = 0.08;
        const double pt = 0.01 + 0.3 * t;
        treat_all.push_back({pt, prevalence - (1 - prevalence) * pt / (1 - pt)});
        net_benefit.push_back({pt, std::max(0.0, prevalence * 0.8 - 0.2 * pt * 0.5)});
    }
    in.evaluation_charts = {roc_chart(roc), calibration_chart(calibration), decision_curve_chart(net_benefit, treat_all)};
    in.run.tool_version = "0.1.0";
    in.run.scenario_name = "willowmere-wards";
    in.run.scenario_hash = "sha256:3f9a0c1e";
    in.run.seed = 1;
    in.run.replications = 200;
    return in;
}

}  // namespace tocsin::testing
