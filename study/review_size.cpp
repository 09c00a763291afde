#include "study/review_size.hpp"

#include <map>
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

}  // namespace tocsin
