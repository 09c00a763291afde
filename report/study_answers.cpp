#include "report/study_answers.hpp"

#include <cmath>
#include <sstream>

#include "report/cells.hpp"

namespace tocsin {

Table review_size_table(const ReviewSizing& s) {
    Table t;
    t.name = "review_size";
    t.title = "Review list length for plan " + s.plan + " (target catch rate " + format_real(s.target_catch_rate) + ")";
    t.columns = {"top_n", "cases", "caught", "catch_rate", "on_list", "on_list_share", "reviews", "reviews_per_round",
                 "minutes_per_round", "reaches_target"};
    for (const ReviewSizeRow& r : s.rows)
        t.add_row({std::int64_t{r.top_n}, r.cases, r.caught, r.catch_rate ? Cell(*r.catch_rate) : Cell(), r.on_list,
                   r.on_list_share ? Cell(*r.on_list_share) : Cell(), r.reviews, r.reviews_per_round,
                   r.minutes_per_round,
                   std::int64_t{r.catch_rate && *r.catch_rate >= s.target_catch_rate ? 1 : 0}});
    return t;
}

std::string review_size_answer(const ReviewSizing& s) {
    std::ostringstream o;
    if (!s.smallest_n) {
        o << "No list length from " << s.rows.front().top_n << " to " << s.rows.back().top_n
          << " reaches a catch rate of " << format_real(s.target_catch_rate) << ".";
        return o.str();
    }
    const ReviewSizeRow& r = s.rows[static_cast<std::size_t>(*s.smallest_n - s.rows.front().top_n)];
    o << "The shortest list reaching a catch rate of " << format_real(s.target_catch_rate) << " is N = " << r.top_n
      << ": " << r.caught << " of " << r.cases << " cases caught (" << format_real(*r.catch_rate, 3) << "), "
      << format_real(r.reviews_per_round, 1) << " reviews and " << format_real(r.minutes_per_round, 0)
      << " staff minutes per review round.";
    return o.str();
}

namespace {

std::string interval_text(const MeanInterval& m) {
    if (m.n == 0) return "n/a";
    std::string s = format_real(m.mean, 2);
    if (std::isfinite(m.low)) s += " (" + format_real(m.low, 2) + " to " + format_real(m.high, 2) + ")";
    return s;
}

void add_triple(std::vector<Cell>& row, const MeanInterval& mi) {
    if (mi.n == 0) {
        row.insert(row.end(), {Cell(), Cell(), Cell()});
        return;
    }
    row.insert(row.end(), {finite_or_empty(mi.mean), finite_or_empty(mi.low), finite_or_empty(mi.high)});
}

}  // namespace

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
