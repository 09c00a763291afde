#include "sim/simulate.hpp"

#include <algorithm>
#include <stdexcept>

#include "models/parallel.hpp"
#include "sim/channels.hpp"

namespace tocsin {

ShiftCalendar calendar_for(const SimulationSetup& setup, const Population& population, std::optional<Instant> cover_from,
                           std::optional<Instant> cover_until) {
    Instant from = population.period_start, to = population.period_end;
    for (const Encounter& e : population.encounters) {
        from = std::min(from, e.admitted);
        to = std::max(to, e.discharged);
    }
    if (cover_from) from = std::min(from, *cover_from);
    if (cover_until) to = std::max(to, *cover_until);
    return ShiftCalendar(setup.shifts, setup.zone, from, to + 1);
}

namespace {

// What the per-encounter plans (page, chart interruption) gave on one block of
// encounters: per plan, the notices in encounter order and the occasions.
struct EncounterBlock {
    std::vector<std::vector<Notice>> notices;
    std::vector<std::int64_t> occasions;
};

// Plans whose instants are chart openings.
bool has_chart_plan(const SimulationSetup& setup) {
    return std::any_of(setup.plans.begin(), setup.plans.end(), [](const Plan& p) {
        return p.channel == Channel::chart_interruption || p.channel == Channel::score_lookup;
    });
}

bool has_lookup_plan(const SimulationSetup& setup) {
    return std::any_of(setup.plans.begin(), setup.plans.end(),
                       [](const Plan& p) { return p.channel == Channel::score_lookup; });
}

// Every per-encounter plan over encounters [first, last): all plans for one
// encounter while its scores are in cache. Handoff lists and ranked reviews
// share their instants across patients: they run as sweeps over the current
// inpatients (run_round_channel).
void fire_encounter_plans(const SimulationSetup& setup, const Population& population, const RuleClock& clock,
                          const ChartOpeningLog* replayed_openings, std::uint64_t replication, std::size_t first,
                          std::size_t last, EncounterBlock& out) {
    const std::size_t n_plans = setup.plans.size();
    out.notices.assign(n_plans, {});
    out.occasions.assign(n_plans, 0);
    const bool any_chart = has_chart_plan(setup), any_lookup = has_lookup_plan(setup);
    EncounterOpenings openings;
    for (std::size_t e = first; e < last; ++e) {
        bool any_scores = false;
        for (std::size_t k = 0; k < population.score_count(); ++k) any_scores = any_scores || !population.scores_of(e, k).empty();
        if (!any_scores && !any_chart) continue;
        const auto enc = static_cast<std::uint32_t>(e);
        const std::uint32_t unit = population.encounters[e].unit;
        // Openings are drawn once per encounter and shared by every chart plan.
        if (any_chart)
            openings_for_encounter(setup, population, replayed_openings, e, replication, openings, any_lookup);
        for (std::size_t p = 0; p < n_plans; ++p) {
            const Plan& plan = setup.plans[p];
            const auto pi = static_cast<std::uint32_t>(p);
            const auto scores = population.scores_of(e, plan.score);
            if (plan.channel == Channel::page) {
                fire_page_rule(plan.rule, clock, scores, enc, unit, pi, plan.channel, out.notices[p]);
                out.occasions[p] += static_cast<std::int64_t>(scores.size());
            } else if (plan.channel == Channel::chart_interruption) {
                out.occasions[p] += fire_chart_rule(plan, clock, scores, openings, enc, unit, pi, out.notices[p]);
            } else if (plan.channel == Channel::score_lookup) {
                out.occasions[p] += fire_lookup_rule(plan, clock, scores, openings, enc, unit, pi, out.notices[p]);
            }
        }
    }
}

// Plan p's notices from every block, concatenated in block order (so in
// encounter order) and then put in time order; the blocks' notices are freed.
void join_blocks(std::vector<EncounterBlock>& blocks, std::size_t p, PlanRecord& out) {
    std::size_t total = 0;
    for (const EncounterBlock& b : blocks) {
        total += b.notices[p].size();
        out.occasions += b.occasions[p];
    }
    out.notices.reserve(total);
    for (EncounterBlock& b : blocks) {
        out.notices.insert(out.notices.end(), b.notices[p].begin(), b.notices[p].end());
        std::vector<Notice>().swap(b.notices[p]);
    }
    std::stable_sort(out.notices.begin(), out.notices.end(),
                     [](const Notice& a, const Notice& b) { return a.at < b.at; });
}

// Whether each notice of a plan that declares fatigue leads to an evaluation,
// now that every notice of the plan is known in time order (sim/fatigue.hpp).
void respond_with_fatigue(const SimulationSetup& setup, const Plan& plan, std::uint64_t replication,
                          PlanRecord& record) {
    const double base = plan.channel == Channel::chart_interruption ? plan.chart.acceptance_probability
                                                                    : plan.fatigue->base_response;
    const RecipientTeams teams{!setup.has_staff() || setup.roles[plan.staffing.first_role].per_unit};
    record.loads = apply_fatigue(record.notices, *plan.fatigue, base, teams, ReplicationSeed{setup.seed, replication});
}

// One plan's staff. Only notices that ask for a bedside evaluation become
// tasks (an interruption that is dismissed, a flag nobody follows up, do not);
// TaskRecord::notice is mapped back to the index among all the plan's notices.
StaffRun staff_for_plan(const std::vector<Notice>& notices, std::span<const OtherTask> other_work,
                        const StaffModel& model, const StaffPlan& staffing, const ShiftCalendar& calendar,
                        ReplicationSeed draws) {
    std::vector<Notice> asked;
    std::vector<std::uint32_t> original;
    for (std::uint32_t i = 0; i < notices.size(); ++i)
        if (notices[i].asks_evaluation) {
            asked.push_back(notices[i]);
            original.push_back(i);
        }
    StaffRun run = simulate_staff(asked, other_work, model, staffing, calendar, calendar.shifts().back().end, draws);
    for (TaskRecord& t : run.tasks) t.notice = original[t.notice];
    return run;
}

// Each plan has a staff of its own (with its own escalation and roster when it
// declares them): plans are alternatives, not rivals for the same nurses. Plans are independent here, so they run side by side with
// identical results, busiest first, each taken by the next free thread.
void run_staff(const SimulationSetup& setup, const Population& population, const ShiftCalendar& calendar,
               std::uint64_t replication, unsigned threads, ReplicationRecord& record) {
    const std::size_t n_plans = setup.plans.size();
    const auto units = static_cast<std::uint32_t>(population.units.size());
    std::vector<std::size_t> order(n_plans);
    for (std::size_t p = 0; p < n_plans; ++p) order[p] = p;
    std::stable_sort(order.begin(), order.end(), [&](std::size_t a, std::size_t b) {
        return record.plans[a].notices.size() > record.plans[b].notices.size();
    });
    // The same other work reaches every plan's staff (it depends on no plan).
    const std::vector<OtherTask> other_work =
        generate_other_work(setup.roles, std::max<std::uint32_t>(1, units), setup.zone, calendar.shifts().front().start,
                            calendar.shifts().back().end, ReplicationSeed{setup.seed, replication});
    parallel_for(n_plans, threads, [&](std::size_t k) {
        const std::size_t p = order[k];
        // One capacity model for reviews: the review team declared on the
        // review does them at minutes_per_review, within its capacity per
        // round; they are not also queued as tasks of the roles, which would
        // cost each review twice (README, "The other channels").
        if (setup.plans[p].channel == Channel::ranked_review) return;
        const StaffModel model = staff_model(setup, setup.plans[p], units);
        record.plans[p].staff = staff_for_plan(record.plans[p].notices, other_work, model, setup.plans[p].staffing, calendar,
                                               ReplicationSeed{setup.seed, replication});
    });
}

}  // namespace

ReplicationRecord simulate_replication(const SimulationSetup& setup, const Population& population,
                                       const ShiftCalendar& calendar, std::uint64_t replication, unsigned threads,
                                       const ChartOpeningLog* replayed_openings, PhaseLog* phases) {
    const std::size_t n_plans = setup.plans.size();
    const std::size_t n_enc = population.encounters.size();
    if (has_chart_plan(setup) && setup.chart_openings && !setup.chart_openings->replay_path.empty() &&
        !replayed_openings)
        throw std::logic_error("the scenario replays chart openings but none were passed to the simulation");
    // Contiguous blocks of encounters, one per thread, joined in block order:
    // the record is identical whatever the thread count.
    const unsigned n_blocks =
        std::max(1u, std::min<unsigned>(threads, static_cast<unsigned>(std::max<std::size_t>(1, n_enc / 1024))));
    std::vector<EncounterBlock> blocks(n_blocks);
    ReplicationRecord record;
    {
        const auto span = phase(phases, "simulate");
        const RuleClock clock{&setup.zone, &calendar};
        parallel_for(n_blocks, n_blocks, [&](std::size_t b) {
            fire_encounter_plans(setup, population, clock, replayed_openings, replication, n_enc * b / n_blocks,
                                 n_enc * (b + 1) / n_blocks, blocks[b]);
        });
        record.replication = replication;
        record.plans.resize(n_plans);
        for (std::size_t p = 0; p < n_plans; ++p) {
            const Plan& plan = setup.plans[p];
            if (plan.channel == Channel::handoff_list || plan.channel == Channel::ranked_review)
                record.plans[p] =
                    run_round_channel(setup, population, calendar, plan, static_cast<std::uint32_t>(p), replication);
            else
                join_blocks(blocks, p, record.plans[p]);
            if (plan.fatigue) respond_with_fatigue(setup, plan, replication, record.plans[p]);
        }
    }
    const auto span = phase(setup.has_staff() ? phases : nullptr, "staff");
    if (setup.has_staff()) run_staff(setup, population, calendar, replication, n_blocks, record);
    return record;
}

}  // namespace tocsin
