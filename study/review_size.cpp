#include "study/review_size.hpp"

#include <map>
#include <sstream>
#include <stdexcept>

#include "analysis/results.hpp"
#include "sim/channels.hpp"

namespace tocsin {

ReviewSizing size_review_list(const Scenario& sc, const Population& pop, const ShiftCalendar& cal, std::size_t p,
                              int smallest_size, int largest_size, double target, std::uint64_t replication) {
    if (p >= sc.simulation.plans.size() || sc.simulation.plans[p].channel != Channel::ranked_review)
        throw std::invalid_argument("list sizing needs a ranked_review plan");
    if (smallest_size < 1 || largest_size < smallest_size)
        throw std::invalid_argument("list sizes must be a range such as 1-30 (from at least 1)");
    ReviewSizing sizing;
    sizing.plan = sc.simulation.plans[p].name;
    sizing.target_catch_rate = target;
    const ReportingShifts rep = reporting_shifts(sc.analysis, pop, cal);
    for (int n = smallest_size; n <= largest_size; ++n) {
        Plan plan = sc.simulation.plans[p];
        plan.review.top_n = n;
        const PlanRecord record = run_round_channel(sc.simulation, pop, cal, plan, static_cast<std::uint32_t>(p), replication);
        const PlanFigures f = plan_figures(sc.analysis, pop, cal, rep, record);
        ReviewSizeRow row;
        row.top_n = n;
        row.cases = f.cases;
        row.caught = f.caught;
        row.catch_rate = f.sensitivity;
        row.reviews = static_cast<std::int64_t>(record.notices.size());
        for (const auto& listed_at : first_catch(sc.analysis, pop, record.listed)) row.on_list += listed_at.has_value();
        if (row.cases) row.on_list_share = static_cast<double>(row.on_list) / static_cast<double>(row.cases);
        std::map<Instant, std::pair<double, double>> per_round;  // reviews, minutes at one review time
        for (const Round& r : record.rounds) {
            if (r.at < rep.from || r.at >= rep.until) continue;
            auto& [reviews, minutes] = per_round[r.at];
            reviews += r.acted;
            minutes += r.minutes;
        }
        for (const auto& [at, work] : per_round) {
            row.reviews_per_round += work.first / static_cast<double>(per_round.size());
            row.minutes_per_round += work.second / static_cast<double>(per_round.size());
        }
        if (!sizing.smallest_n && row.catch_rate && *row.catch_rate >= target) sizing.smallest_n = n;
        sizing.rows.push_back(row);
    }
    return sizing;
}

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

}  // namespace tocsin
