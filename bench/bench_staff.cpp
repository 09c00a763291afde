// Benchmark (not a test): time the staff simulation for a year of pages from
// a 1,000-bed hospital through four plans, and the workload tables built from
// the records. Notices are synthesised (uniform over the year, sorted), so the
// figures measure the event loop, not a rule engine.
//
// usage: bench_staff [pages_per_bed_per_day_of_the_busiest_plan = 2]
#include <boost/random/uniform_01.hpp>
#include <boost/random/uniform_int_distribution.hpp>
#include <algorithm>
#include <chrono>
#include <cstdio>
#include <cstdlib>

#include "analysis/workload.hpp"
#include "report/run_tables.hpp"
#include "sim/staff.hpp"

using namespace tocsin;

namespace {

double seconds_since(std::chrono::steady_clock::time_point t0) {
    return std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
}

Role make_role(std::string name, bool per_unit, std::vector<int> by_shift, ServiceTime minutes) {
    Role r;
    r.name = std::move(name);
    r.per_unit = per_unit;
    r.roster.by_shift = std::move(by_shift);
    r.minutes_per_task = std::move(minutes);
    return r;
}

}  // namespace

int main(int argc, char** argv) {
    const double busiest = argc > 1 ? std::atof(argv[1]) : 2.0;
    const int units = 40, beds_per_unit = 25;
    const Instant from = days_from_civil(2026, 1, 1) * 86400, to = days_from_civil(2027, 1, 1) * 86400;
    const ShiftPattern pattern{{7 * 60, 19 * 60}, {"day", "night"}, {false, true}};
    const ShiftCalendar calendar(pattern, TimeZone::utc(), from, to);

    StaffModel model;
    model.roles = {make_role("ward nurse", true, {5, 3}, GammaMinutes{15, 8}),
                   make_role("charge nurse", true, {1, 1}, LognormalMinutes{10, 1.5}),
                   make_role("rapid-response nurse", false, {2, 2}, ExponentialMinutes{30})};
    model.unit_count = units;
    const std::vector<std::string> names = {"ward nurse", "charge nurse", "rapid-response nurse"};
    const std::vector<EscalationEdge> edges = {{"ward nurse", "charge nurse", 10},
                                               {"charge nurse", "rapid-response nurse", 15}};
    model.escalation = build_escalation_graph(names, edges, roles_ever_staffed(model.roles));

    // Four plans paging busiest/8, /4, /2 and busiest per bed per day.
    const double rates[] = {busiest / 8, busiest / 4, busiest / 2, busiest};
    std::vector<std::vector<Notice>> notices(4);
    std::size_t total = 0;
    for (std::uint32_t p = 0; p < 4; ++p) {
        RandomEngine gen = make_stream(1, 0, StreamPurpose::arrivals, p);
        boost::random::uniform_int_distribution<Instant> when(from, to - 1);
        boost::random::uniform_int_distribution<std::uint32_t> unit(0, units - 1);
        boost::random::uniform_int_distribution<std::uint32_t> encounter(0, 60000);
        boost::random::uniform_01<double> score;
        const auto n = static_cast<std::size_t>(rates[p] * units * beds_per_unit * 365);
        notices[p].resize(n);
        for (Notice& x : notices[p]) {
            x.at = when(gen);
            x.unit = unit(gen);
            x.encounter = encounter(gen);
            x.score = score(gen);
            x.plan = p;
        }
        std::sort(notices[p].begin(), notices[p].end(), [](const Notice& a, const Notice& b) { return a.at < b.at; });
        total += n;
    }

    std::printf("bench_staff: 1,000 beds (40 units x 25), one year, 4 plans, %zu notices in all\n", total);
    std::printf("roles: ward nurse per unit 5/3, charge nurse per unit 1/1, rapid response 2/2; escalation 10 + 15 min\n");
    double best_sim = 1e300, best_tables = 1e300;
    std::vector<StaffRun> runs(4);
    for (int repeat = 0; repeat < 3; ++repeat) {
        auto t0 = std::chrono::steady_clock::now();
        for (std::uint32_t p = 0; p < 4; ++p) {
            const ReplicationSeed draws{1, 0};
            StaffPlan plan;
            plan.discipline = p % 2 ? QueueDiscipline::priority_by_score : QueueDiscipline::fifo;
            runs[p] = simulate_staff(notices[p], model, plan, calendar, to, draws);
        }
        best_sim = std::min(best_sim, seconds_since(t0));
        t0 = std::chrono::steady_clock::now();
        std::vector<PlanStaffRun> prs;
        for (std::uint32_t p = 0; p < 4; ++p) prs.push_back({"plan " + std::to_string(p), &model, StaffPlan{}, &runs[p]});
        const Table w = staff_workload_table(staff_workload(prs, calendar));
        const Table e = escalation_table(escalations(prs));
        const Table f = task_fate_table(task_fates(prs));
        best_tables = std::min(best_tables, seconds_since(t0));
        if (repeat == 0) std::printf("%s\n%s\n", to_text(w).c_str(), to_text(e).c_str());
    }
    std::printf("staff simulation, 4 plans: %.3f s (best of 3), %.0f ns per notice\n", best_sim,
                best_sim * 1e9 / static_cast<double>(total));
    std::printf("workload tables, 4 plans:  %.3f s (best of 3)\n", best_tables);
    return 0;
}
