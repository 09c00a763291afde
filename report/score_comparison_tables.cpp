#include "report/score_comparison_tables.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>

#include "report/cells.hpp"
#include "report/evaluation_tables.hpp"
#include "report/report.hpp"
#include "report/report_evaluation.hpp"

namespace tocsin {

Table score_comparison_auc_table(const ScoreComparison& c) {
    Table t = make_table("score_comparison_auc", "Two scores on the same stays: encounter-level AUC, paired test",
                         {"first_score", "other_score", "stays_compared", "cases", "non_cases", "stays_first_only",
                          "stays_other_only", "stays_neither", "auc_first", "auc_other", "difference", "difference_se",
                          "difference_lower", "difference_upper", "z", "p_value", "confidence", "test"});
    for (const ScorePairAuc& a : c.auc) {
        std::vector<Cell> row{a.first, a.other, a.stays, a.cases, a.controls, a.only_first, a.only_other, a.neither};
        if (a.test) {
            const PairedAucComparison& x = *a.test;
            for (Cell cell : {Cell(x.auc_a), Cell(x.auc_b), Cell(x.difference), Cell(x.standard_error),
                              Cell(x.interval.lower), Cell(x.interval.upper), cell_or_empty(x.z), cell_or_empty(x.p),
                              Cell(a.confidence)})
                row.push_back(cell);
        } else {
            row.insert(row.end(), 9, Cell());
        }
        row.push_back(std::string("DeLong, DeLong & Clarke-Pearson 1988, paired"));
        t.add_row(std::move(row));
    }
    return t;
}

Table score_comparison_thresholds_table(const ScoreComparison& c) {
    Table t = make_table(
        "score_comparison_thresholds",
        "Each plan's threshold against the other score at the threshold flagging as many stays: who each flags, net benefit",
        {"plan", "plan_score", "plan_threshold", "other_score", "matched_threshold", "stays_compared", "cases",
         "cases_flagged_by_both", "cases_flagged_by_plan_score_only", "cases_flagged_by_other_score_only",
         "cases_flagged_by_neither", "non_cases_flagged_by_both", "non_cases_flagged_by_plan_score_only",
         "non_cases_flagged_by_other_score_only", "non_cases_flagged_by_neither", "evaluations_per_case",
         "threshold_probability", "net_benefit_plan_score", "net_benefit_other_score", "difference",
         "difference_lower", "difference_upper", "resamples"});
    for (const ThresholdComparison& x : c.thresholds) {
        std::vector<Cell> row{x.plan, x.plan_score, x.plan_threshold, x.other_score, finite_or_empty(x.matched_threshold),
                              x.stays, x.cases};
        for (std::int64_t n : x.cases_by) row.push_back(n);
        for (std::int64_t n : x.non_cases_by) row.push_back(n);
        row.push_back(x.evaluations_per_case);
        row.push_back(1.0 / x.evaluations_per_case);
        if (x.stays > 0) {
            for (double v : {x.net_benefit_plan, x.net_benefit_other, x.difference, x.difference_interval.lower,
                             x.difference_interval.upper})
                row.push_back(v);
        } else {
            row.insert(row.end(), 5, Cell());
        }
        row.push_back(std::int64_t{x.resamples});
        t.add_row(std::move(row));
    }
    return t;
}

Table matched_plans_table(const std::vector<MatchedPlans>& matched) {
    Table t = make_table("matched_plans",
                         "Each plan on another score against the plan on the first score nearest in burden, same patients",
                         {"plan", "plan_score", "versus", "versus_score", "burden_metric", "burden_difference",
                          "burden_difference_lower", "burden_difference_upper", "benefit_metric", "benefit_difference",
                          "benefit_difference_lower", "benefit_difference_upper", "replications"});
    for (const MatchedPlans& m : matched)
        t.add_row({m.plan, m.plan_score, m.versus, m.versus_score, m.burden_metric,
                   finite_or_empty(m.burden_difference.mean), finite_or_empty(m.burden_difference.low),
                   finite_or_empty(m.burden_difference.high), m.benefit_metric, finite_or_empty(m.benefit_difference.mean),
                   finite_or_empty(m.benefit_difference.low), finite_or_empty(m.benefit_difference.high),
                   static_cast<std::int64_t>(m.burden_difference.n)});
    return t;
}

std::vector<Table> other_score_evaluation_tables(const Evaluation& evaluation, std::size_t k, const std::string& name) {
    std::vector<Table> tables = evaluation_tables(evaluation);
    for (Table& t : tables) {
        t.name = "other_score_" + std::to_string(k) + "_" + t.name;
        t.title += " - score " + name;
    }
    return tables;
}

void add_score_comparison(ReportInput& in, const ScoreComparison& c, const Evaluation& first,
                          const std::vector<Evaluation>& others, const std::string& basis,
                          const std::vector<MatchedPlans>& matched, const std::string& matched_basis) {
    if (c.auc.empty()) return;
    in.score_comparison_intro =
        "Each score is compared with the first on the same stays: those with a usable value of both. At each plan's "
        "threshold, the other score is set to the threshold that flags as many stays, so the two are compared at the "
        "same stay-level burden: who each flags that the other does not, and net benefit with the difference's "
        "interval from resampling whole stays.";
    LineChart roc = roc_of(first.thresholds, c.auc.front().first);
    for (std::size_t k = 0; k < others.size() && k < c.auc.size(); ++k) {
        Curve other = roc_of(others[k].thresholds, c.auc[k].other).curves.front();
        other.dashed = true;
        roc.curves.push_back(std::move(other));
    }
    roc.title = "Both scores' ROC curves, encounter level";
    roc.description = "Each stay's highest usable value of each score; points are each score's threshold grid. "
                      "The first score is the solid line, the other dashed.";
    in.score_comparison_roc = std::move(roc);
    // Decision curves need each score read as a probability.
    if (first.decision_curve) {
        LineChart curves = decision_curve_of(*first.decision_curve, c.auc.front().first);
        bool added = false;
        for (std::size_t k = 0; k < others.size() && k < c.auc.size(); ++k)
            if (others[k].decision_curve) {
                added = true;
                Curve other = decision_curve_of(*others[k].decision_curve, c.auc[k].other).curves.front();
                other.name = c.auc[k].other;
                other.dashed = true;
                curves.curves.insert(curves.curves.begin() + static_cast<std::ptrdiff_t>(k + 1), std::move(other));
            }
        if (added) in.score_comparison_curves = std::move(curves);
    }
    in.score_comparison_tables.push_back(score_comparison_auc_table(c));
    in.score_comparison_tables.push_back(score_comparison_thresholds_table(c));
    for (Table& t : in.score_comparison_tables) t.basis = basis;
    if (!matched.empty()) {
        in.score_comparison_tables.insert(in.score_comparison_tables.begin(), matched_plans_table(matched));
        in.score_comparison_tables.front().basis = matched_basis;
    }
    in.score_comparison_note =
        std::string(in.score_comparison_curves
                        ? ""
                        : "Decision curves need each score read as a probability, which these scores are not; the "
                          "net benefit of each score at each plan's threshold is in the last table. ") +
        "A better score is not yet a better plan: the first table sets each plan on another score against the plan "
        "on the first score nearest to it in burden, run on the same patients. These figures rest on this log, its "
        "exclusions and the scenario's assumptions.";
}

namespace {

std::string number(double v, int decimals) {
    char buf[64];
    std::snprintf(buf, sizeof buf, "%.*f", decimals, v);
    return buf;
}

}  // namespace

std::string other_score_summaries(const std::vector<Evaluation>& others, const ScoreComparison& c) {
    std::string s;
    for (std::size_t k = 0; k < others.size() && k < c.auc.size(); ++k)
        s += "\nThe other score " + c.auc[k].other + " on the same population:\n" + evaluation_summary(others[k]);
    return s;
}

std::string matched_plans_text(const std::vector<MatchedPlans>& matched) {
    if (matched.empty()) return "";
    std::string s = "Plans on different scores, matched on burden (same patients; plan minus its match):\n";
    auto with_interval = [](const MeanInterval& m) {
        std::string out = (m.mean > 0 ? "+" : "") + number(m.mean, 2);
        if (std::isfinite(m.low) && std::isfinite(m.high)) out += " (" + number(m.low, 2) + " to " + number(m.high, 2) + ")";
        return out;
    };
    for (const MatchedPlans& m : matched)
        s += "  " + m.plan + " (" + m.plan_score + ") against " + m.versus + " (" + m.versus_score + "): " +
             m.burden_metric + " " + with_interval(m.burden_difference) + ", " + m.benefit_metric + " " +
             with_interval(m.benefit_difference) + "\n";
    return s;
}

std::string score_comparison_text(const ScoreComparison& c) {
    if (c.auc.empty()) return "";
    std::string s = "Two scores on the same stays (replication 0; a comparison of scores, not of outcomes)\n";
    for (const ScorePairAuc& a : c.auc) {
        s += "  " + a.first + " against " + a.other + ": " + std::to_string(a.stays) + " stays with both (" +
             std::to_string(a.cases) + " cases)";
        if (a.only_first + a.only_other > 0)
            s += "; left out: " + std::to_string(a.only_first) + " with " + a.first + " only, " +
                 std::to_string(a.only_other) + " with " + a.other + " only";
        s += "\n";
        if (!a.test) {
            s += "    AUC difference: needs cases and non-cases\n";
            continue;
        }
        const PairedAucComparison& x = *a.test;
        s += "    AUC " + number(x.auc_a, 3) + " against " + number(x.auc_b, 3) + ", difference " +
             number(x.difference, 3) + " (" + number(x.interval.lower, 3) + " to " + number(x.interval.upper, 3) + ")";
        if (x.p) s += ", z " + number(*x.z, 2) + ", p " + number(*x.p, 4);
        s += " (DeLong, paired)\n";
    }
    for (const ThresholdComparison& x : c.thresholds) {
        if (x.evaluations_per_case != 10 || x.stays == 0) continue;
        s += "  " + x.plan + " (" + x.plan_score + " >= " + number(x.plan_threshold, 2) + ") against " + x.other_score +
             (std::isfinite(x.matched_threshold) ? " >= " + number(x.matched_threshold, 2) : std::string(" (none)")) +
             ": cases flagged by one only " + std::to_string(x.cases_by[1]) + " / " + std::to_string(x.cases_by[2]) +
             ", non-cases " + std::to_string(x.non_cases_by[1]) + " / " + std::to_string(x.non_cases_by[2]) +
             "; net benefit difference at 10 evaluations per case " + number(x.difference * 100, 2) + " per 100 stays (" +
             number(x.difference_interval.lower * 100, 2) + " to " + number(x.difference_interval.upper * 100, 2) + ")\n";
    }
    return s;
}

}  // namespace tocsin
