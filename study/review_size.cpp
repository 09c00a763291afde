#include "study/review_size.hpp"

#include <cmath>
#include <limits>
#include <map>
#include <stdexcept>

#include "analysis/results.hpp"
#include "models/parallel.hpp"
#include "sim/channels.hpp"

namespace tocsin {

namespace {

// The team's work at each review time of the reporting period (all units
// together), averaged over those times.
void work_per_round(const PlanRecord& record, const ReportingShifts& rep, ReviewSizeRow& row) {
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
}

ReviewSizeRow size_row(const Scenario& sc, const Population& pop, const ShiftCalendar& cal, const ReportingShifts& rep,
                       std::size_t p, int n, std::uint64_t replication) {
    Plan plan = sc.simulation.plans[p];
    plan.review.top_n = n;
    const PlanRecord record = run_round_channel(sc.simulation, pop, cal, plan, static_cast<std::uint32_t>(p), replication);
    const PlanFigures f = plan_figures(sc.analysis, pop, cal, rep, record);
    ReviewSizeRow row;
    row.top_n = n;
    row.cases = f.cases;
    row.caught = f.caught;
    row.catch_rate = f.sensitivity;
    row.lead_median_hours = f.lead_median_hours;
    row.reviews = static_cast<std::int64_t>(record.notices.size());
    if (row.reviews > 0)
        row.caught_per_100_reviews = 100.0 * static_cast<double>(row.caught) / static_cast<double>(row.reviews);
    for (const auto& listed_at : first_catch(sc.analysis, pop, record.listed)) row.on_list += listed_at.has_value();
    if (row.cases) row.on_list_share = static_cast<double>(row.on_list) / static_cast<double>(row.cases);
    work_per_round(record, rep, row);
    return row;
}

void check_request(const Scenario& sc, std::size_t p, int smallest_size, int largest_size) {
    if (p >= sc.simulation.plans.size() || sc.simulation.plans[p].channel != Channel::ranked_review)
        throw std::invalid_argument("list sizing needs a ranked_review plan");
    if (smallest_size < 1 || largest_size < smallest_size)
        throw std::invalid_argument("list sizes must be a range such as 1-30 (from at least 1)");
}

std::vector<ReviewSizeRow> size_rows(const Scenario& sc, const Population& pop, const ShiftCalendar& cal, std::size_t p,
                                     int smallest_size, int largest_size, std::uint64_t replication) {
    const ReportingShifts rep = reporting_shifts(sc.analysis, pop, cal);
    std::vector<ReviewSizeRow> rows;
    for (int n = smallest_size; n <= largest_size; ++n) rows.push_back(size_row(sc, pop, cal, rep, p, n, replication));
    return rows;
}

double value_or_nan(const std::optional<double>& v) { return v ? *v : std::numeric_limits<double>::quiet_NaN(); }

}  // namespace

ReviewSizing summarise_review_sizes(std::string plan, double target, const std::vector<std::vector<ReviewSizeRow>>& by_rep) {
    ReviewSizing sizing;
    sizing.plan = std::move(plan);
    sizing.target_catch_rate = target;
    sizing.replications = by_rep.size();
    if (by_rep.empty()) return sizing;
    sizing.rows = by_rep.front();
    for (std::size_t i = 0; i < sizing.rows.size(); ++i) {
        // One value per replication for each figure.
        auto over_reps = [&](auto value) {
            std::vector<double> v;
            for (const auto& rows : by_rep) v.push_back(value(rows[i]));
            return mean_interval(v);
        };
        ReviewSizeSummary s;
        s.top_n = sizing.rows[i].top_n;
        s.cases = over_reps([](const ReviewSizeRow& r) { return static_cast<double>(r.cases); });
        s.caught = over_reps([](const ReviewSizeRow& r) { return static_cast<double>(r.caught); });
        s.catch_rate = over_reps([](const ReviewSizeRow& r) { return value_or_nan(r.catch_rate); });
        s.on_list = over_reps([](const ReviewSizeRow& r) { return static_cast<double>(r.on_list); });
        s.on_list_share = over_reps([](const ReviewSizeRow& r) { return value_or_nan(r.on_list_share); });
        s.reviews = over_reps([](const ReviewSizeRow& r) { return static_cast<double>(r.reviews); });
        s.reviews_per_round = over_reps([](const ReviewSizeRow& r) { return r.reviews_per_round; });
        s.minutes_per_round = over_reps([](const ReviewSizeRow& r) { return r.minutes_per_round; });
        s.lead_median_hours = over_reps([](const ReviewSizeRow& r) { return value_or_nan(r.lead_median_hours); });
        s.caught_per_100_reviews = over_reps([](const ReviewSizeRow& r) { return value_or_nan(r.caught_per_100_reviews); });
        std::size_t reached = 0;
        for (const auto& rows : by_rep) reached += rows[i].catch_rate && *rows[i].catch_rate >= target;
        s.reaches_target_share = static_cast<double>(reached) / static_cast<double>(by_rep.size());
        if (!sizing.smallest_n && s.catch_rate.n > 0 && s.catch_rate.mean >= target) sizing.smallest_n = s.top_n;
        sizing.summary.push_back(s);
    }
    return sizing;
}

ReviewSizing size_review_list(const Scenario& sc, const Population& pop, const ShiftCalendar& cal, std::size_t p,
                              int smallest_size, int largest_size, double target, std::uint64_t replication) {
    check_request(sc, p, smallest_size, largest_size);
    return summarise_review_sizes(sc.simulation.plans[p].name, target,
                                  {size_rows(sc, pop, cal, p, smallest_size, largest_size, replication)});
}

ReviewSizing size_review_list(const Scenario& sc, const PopulationFactory& make_population, std::size_t p,
                              int smallest_size, int largest_size, double target, unsigned threads) {
    check_request(sc, p, smallest_size, largest_size);
    std::vector<std::vector<ReviewSizeRow>> by_rep(sc.replications);
    // Each replication writes only its own slot: the result is the same whatever the thread count.
    parallel_for(by_rep.size(), threads, [&](std::size_t r) {
        const std::shared_ptr<const Population> shared = make_population(r);
        const Population& pop = *shared;
        const ShiftCalendar cal = calendar_for(sc, pop);
        by_rep[r] = size_rows(sc, pop, cal, p, smallest_size, largest_size, r);
    });
    return summarise_review_sizes(sc.simulation.plans[p].name, target, by_rep);
}

}  // namespace tocsin
