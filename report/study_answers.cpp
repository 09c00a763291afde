#include "report/study_answers.hpp"

#include <cmath>
#include <sstream>

#include "report/cells.hpp"

namespace tocsin {

namespace {

// Each figure of a list length: mean, low, high (empty when undefined; no
// interval with fewer than two replications).
void add_triple(std::vector<Cell>& row, const MeanInterval& mi) {
    if (mi.n == 0) {
        row.insert(row.end(), {Cell(), Cell(), Cell()});
        return;
    }
    row.insert(row.end(), {finite_or_empty(mi.mean), finite_or_empty(mi.low), finite_or_empty(mi.high)});
}

std::string interval_text(const MeanInterval& m, int digits = 2) {
    if (m.n == 0) return "n/a";
    std::string s = format_real(m.mean, digits);
    if (std::isfinite(m.low)) s += " (" + format_real(m.low, digits) + " to " + format_real(m.high, digits) + ")";
    return s;
}

// The figures of review_size, in column order.
struct SizeFigure {
    const char* column;
    const char* heading;  // terminal
    int digits;
    MeanInterval ReviewSizeSummary::*figure;
};
constexpr SizeFigure size_figures[] = {
    {"cases", "cases", 1, &ReviewSizeSummary::cases},
    {"caught", "caught", 1, &ReviewSizeSummary::caught},
    {"catch_rate", "catch rate", 3, &ReviewSizeSummary::catch_rate},
    {"on_list", "on list", 1, &ReviewSizeSummary::on_list},
    {"on_list_share", "on-list share", 3, &ReviewSizeSummary::on_list_share},
    {"reviews", "reviews", 0, &ReviewSizeSummary::reviews},
    {"reviews_per_round", "reviews/round", 1, &ReviewSizeSummary::reviews_per_round},
    {"minutes_per_round", "minutes/round", 0, &ReviewSizeSummary::minutes_per_round},
    {"lead_median_h", "median lead h", 1, &ReviewSizeSummary::lead_median_hours},
    {"caught_per_100_reviews", "caught/100 reviews", 1, &ReviewSizeSummary::caught_per_100_reviews},
};

const ReviewSizeSummary& chosen(const ReviewSizing& s) {
    return s.summary[static_cast<std::size_t>(*s.smallest_n - s.summary.front().top_n)];
}

}  // namespace

Table review_size_table(const ReviewSizing& s) {
    Table t;
    t.name = "review_size";
    t.title = "Review list length for plan " + s.plan + " (target catch rate " + format_real(s.target_catch_rate) +
              "; mean over " + std::to_string(s.replications) + " replications, 95% CI)";
    t.columns = {"top_n", "replications"};
    for (const SizeFigure& f : size_figures)
        for (const char* suffix : {"", "_low", "_high"}) t.columns.push_back(std::string(f.column) + suffix);
    t.columns.insert(t.columns.end(), {"reaches_target", "reaches_target_share"});
    for (const ReviewSizeSummary& r : s.summary) {
        std::vector<Cell> row = {std::int64_t{r.top_n}, static_cast<std::int64_t>(s.replications)};
        for (const SizeFigure& f : size_figures) add_triple(row, r.*f.figure);
        row.push_back(flag_cell(r.catch_rate.n > 0 && r.catch_rate.mean >= s.target_catch_rate));
        row.push_back(r.reaches_target_share);
        t.add_row(std::move(row));
    }
    return t;
}

std::string review_size_text(const ReviewSizing& s) {
    Table t;
    t.title = "Review list length for plan " + s.plan + ": mean over " + std::to_string(s.replications) +
              (s.replications == 1 ? " replication" : " replications (95% CI)");
    t.columns = {"N"};
    for (const SizeFigure& f : size_figures)
        if (f.figure != &ReviewSizeSummary::cases && f.figure != &ReviewSizeSummary::on_list &&
            f.figure != &ReviewSizeSummary::reviews)
            t.columns.push_back(f.heading);
    for (const ReviewSizeSummary& r : s.summary) {
        std::vector<Cell> row = {std::int64_t{r.top_n}};
        for (const SizeFigure& f : size_figures)
            if (f.figure != &ReviewSizeSummary::cases && f.figure != &ReviewSizeSummary::on_list &&
                f.figure != &ReviewSizeSummary::reviews)
                row.push_back(interval_text(r.*f.figure, f.digits));
        t.add_row(std::move(row));
    }
    return to_text(t);
}

std::string review_size_answer(const ReviewSizing& s) {
    std::ostringstream o;
    const bool many = s.replications > 1;
    const std::string rate = many ? "a mean catch rate of " : "a catch rate of ";
    if (!s.smallest_n) {
        o << "No list length from " << s.summary.front().top_n << " to " << s.summary.back().top_n << " reaches " << rate
          << format_real(s.target_catch_rate) << ".";
        return o.str();
    }
    const ReviewSizeSummary& r = chosen(s);
    o << "The shortest list reaching " << rate << format_real(s.target_catch_rate) << " is N = " << r.top_n << ": "
      << interval_text(r.caught, 1) << " of " << format_real(r.cases.mean, 1) << " cases caught (catch rate "
      << interval_text(r.catch_rate, 3);
    if (many) o << ", reaching the target in " << format_real(100 * r.reaches_target_share, 0) << "% of replications";
    o << "), " << interval_text(r.reviews_per_round, 1) << " reviews and " << interval_text(r.minutes_per_round, 0)
      << " staff minutes per review round, " << interval_text(r.caught_per_100_reviews, 1)
      << " cases caught per 100 reviews.";
    return o.str();
}

Table shift_effect_table(const ShiftEffect& effect) {
    Table t;
    t.name = "shift_effect";
    t.basis = "every replication, each run with and without the stress test on the same patients";
    t.title = "Before and after the stress-test shift (mean over replications, 95% CI; change paired by replication)";
    t.columns = {"plan", "metric", "before", "before_low", "before_high", "after", "after_low", "after_high",
                 "change", "change_low", "change_high", "replications"};
    for (const ShiftEffectFigure& f : effect.figures) {
        std::vector<Cell> row = {f.plan, std::string(to_string(f.metric))};
        for (const MeanInterval* mi : {&f.before, &f.after, &f.change}) add_triple(row, *mi);
        row.push_back(static_cast<std::int64_t>(f.change.n));
        t.add_row(std::move(row));
    }
    return t;
}

std::string shift_effect_text(const ShiftEffect& effect, const TimeZone& zone) {
    std::ostringstream text;
    text << "Stress test from " << format_local(effect.from, zone) << ": before -> after (change), mean over "
         << effect.replications << (effect.replications == 1 ? " replication" : " replications") << "\n";
    auto before_after = [](const ShiftEffectFigure& f) {
        return interval_text(f.before) + " -> " + interval_text(f.after) + " (" + interval_text(f.change) + ")";
    };
    // Three figures per plan, in ShiftEffectMetric order; the per-shift mean is in the table only.
    for (std::size_t i = 0; i + 2 < effect.figures.size(); i += 3)
        text << "  " << effect.figures[i].plan << ": notices per unit per night " << before_after(effect.figures[i])
             << "; sensitivity " << before_after(effect.figures[i + 2]) << "\n";
    return text.str();
}

}  // namespace tocsin
