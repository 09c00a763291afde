#include "sim/channels.hpp"

#include <algorithm>
#include <climits>
#include <map>
#include <optional>

#include <boost/random/uniform_01.hpp>

#include "models/random_streams.hpp"

namespace tocsin {

double delivery_minutes(const Plan& plan) {
    switch (plan.channel) {
        case Channel::page: return 0.0;
        case Channel::chart_interruption: return plan.chart.interruption_minutes;
        case Channel::handoff_list: return plan.handoff.minutes_per_flag;
        case Channel::ranked_review: return plan.review.minutes_per_review;
    }
    return 0.0;
}

void openings_for_encounter(const SimulationSetup& setup, const Population& pop, const ChartOpeningLog* replayed,
                            std::size_t e, std::uint64_t replication, EncounterOpenings& out) {
    out.openings.clear();
    out.acceptance_draws.clear();
    if (!setup.chart_openings) return;
    const auto& roles = setup.chart_openings->roles;
    if (!setup.chart_openings->replay_path.empty()) {
        if (!replayed) throw std::logic_error("the scenario replays chart openings but none were loaded");
        const auto span = replayed->of(e);
        out.openings.assign(span.begin(), span.end());
    } else {
        generate_chart_openings(roles, pop.encounters[e], e, setup.zone, ReplicationSeed{setup.seed, replication},
                                out.openings);
    }
    if (out.role_keys.size() != roles.size()) {
        out.role_keys.clear();
        for (const ChartOpeningRole& r : roles) out.role_keys.push_back(text_entity(r.name));
    }
    boost::random::uniform_01<double> draw;
    out.acceptance_draws.reserve(out.openings.size());
    for (std::size_t i = 0; i < out.openings.size(); ++i) {
        const ChartOpening& o = out.openings[i];
        // Openings are in time order, so equal (instant, role) pairs sit within one run of equal instants.
        std::uint64_t occurrence = 0;
        for (std::size_t j = i; j > 0 && out.openings[j - 1].at == o.at;) occurrence += out.openings[--j].role == o.role;
        SplitMixEngine accept = make_short_stream(
            ReplicationSeed{setup.seed, replication}, StreamPurpose::chart_acceptance,
            entity_key({e, out.role_keys[o.role], static_cast<std::uint64_t>(o.at), occurrence}));
        out.acceptance_draws.push_back(draw(accept));
    }
}

std::int64_t fire_chart_rule(const Plan& plan, const RuleClock& clock, std::span<const Score> scores,
                             const EncounterOpenings& openings, std::uint32_t encounter, std::uint32_t unit,
                             std::uint32_t plan_index, std::vector<Notice>& out) {
    RuleState state(plan.rule, clock);
    std::size_t next = 0;
    std::int64_t asked = 0;
    for (std::size_t i = 0; i < openings.openings.size(); ++i) {
        const ChartOpening& o = openings.openings[i];
        if (plan.chart.role && o.role != *plan.chart.role) continue;
        ++asked;
        while (next < scores.size() && scores[next].available_at <= o.at) state.see(scores[next++]);
        const auto reason = state.fire_if_due(o.at);
        if (!reason) continue;
        Notice n;
        n.at = o.at;
        n.score = state.latest();
        n.encounter = encounter;
        n.unit = unit;
        n.plan = plan_index;
        n.reason = *reason;
        n.channel = Channel::chart_interruption;
        n.asks_evaluation = openings.acceptance_draws[i] < plan.chart.acceptance_probability;
        n.opener_role = o.role;
        out.push_back(n);
    }
    return asked;
}

std::vector<Instant> daily_instants(const std::vector<int>& times_minutes, const TimeZone& zone, Instant from,
                                    Instant to) {
    std::vector<Instant> out;
    const std::int64_t first_day = (zone.to_local_seconds(from) - days(1)) / 86400;
    const std::int64_t last_day = (zone.to_local_seconds(to) + days(1)) / 86400;
    for (std::int64_t d = first_day; d <= last_day; ++d) {
        const CivilTime date = civil_from_instant(d * 86400);
        for (int m : times_minutes) {
            CivilTime c = date;
            c.hour = m / 60;
            c.minute = m % 60;
            c.second = 0;
            const Instant t = zone.from_local(c);
            if (t >= from && t <= to) out.push_back(t);
        }
    }
    std::sort(out.begin(), out.end());
    out.erase(std::unique(out.begin(), out.end()), out.end());
    return out;
}

namespace {

struct Inpatient {
    Inpatient(const Rule& rule, const RuleClock& clock) : rule(rule, clock) {}
    std::size_t next_score = 0;  // scores before it have been seen
    RuleState rule;
};

struct Candidate {
    double score;
    Instant score_available_at;
    const std::string* id;
    std::uint32_t encounter;
    NoticeReason reason;
};

bool ranks_before(const Candidate& a, const Candidate& b) {
    if (a.score != b.score) return a.score > b.score;
    if (a.score_available_at != b.score_available_at) return a.score_available_at < b.score_available_at;
    return *a.id < *b.id;
}

}  // namespace

PlanRecord run_round_channel(const SimulationSetup& setup, const Population& pop, const ShiftCalendar& cal, const Plan& plan,
                             std::uint32_t plan_index, std::uint64_t replication) {
    PlanRecord record;
    const bool handoff = plan.channel == Channel::handoff_list;
    if (pop.encounters.empty()) return record;
    const std::vector<int>& times = handoff ? (plan.handoff.times_minutes.empty() ? setup.shifts.start_minutes
                                                                                   : plan.handoff.times_minutes)
                                            : plan.review.times_minutes;
    Instant from = INT64_MAX, to = INT64_MIN;
    std::vector<std::uint32_t> by_admission(pop.encounters.size());
    for (std::uint32_t e = 0; e < by_admission.size(); ++e) {
        by_admission[e] = e;
        from = std::min(from, pop.encounters[e].admitted);
        to = std::max(to, Population::usable_until(pop.encounters[e]));
    }
    std::stable_sort(by_admission.begin(), by_admission.end(), [&](std::uint32_t a, std::uint32_t b) {
        return pop.encounters[a].admitted < pop.encounters[b].admitted;
    });
    const RuleClock clock{&setup.zone, &cal};
    const Rule rule = channel_rule(plan);
    const std::size_t n_units = pop.units.size();
    std::map<std::uint32_t, Inpatient> census;  // ordered by encounter index
    std::size_t next_admission = 0;
    boost::random::uniform_01<double> draw;
    const int capacity = plan.review.max_reviews_per_round.value_or(INT_MAX);

    for (const Instant t : daily_instants(times, setup.zone, from, to)) {
        for (; next_admission < by_admission.size() && pop.encounters[by_admission[next_admission]].admitted <= t;
             ++next_admission) {
            const std::uint32_t e = by_admission[next_admission];
            if (Population::usable_until(pop.encounters[e]) <= t) continue;
            census.try_emplace(e, rule, clock);
        }
        std::erase_if(census, [&](const auto& item) { return Population::usable_until(pop.encounters[item.first]) <= t; });
        for (auto& [e, patient] : census) {
            const auto scores = pop.scores_of(e);
            while (patient.next_score < scores.size() && scores[patient.next_score].available_at <= t)
                patient.rule.see(scores[patient.next_score++]);
        }
        auto notice = [&](std::uint32_t e, NoticeReason reason, double score) {
            Notice n;
            n.at = t;
            n.score = score;
            n.encounter = e;
            n.unit = pop.encounters[e].unit;
            n.plan = plan_index;
            n.reason = reason;
            n.channel = plan.channel;
            return n;
        };
        if (handoff) {
            std::vector<Round> rounds(n_units);
            for (std::uint32_t u = 0; u < n_units; ++u) rounds[u] = Round{t, u, 0, 0, 0.0};
            for (auto& [e, patient] : census) {
                const auto reason = patient.rule.fire_if_due(t);
                if (!reason) continue;
                Notice n = notice(e, *reason, patient.rule.latest());
                // Keyed by patient and handoff instant: the same draw in every plan
                // flagging this patient at this handoff, whatever its other handoff times.
                SplitMixEngine follow_up = make_short_stream(ReplicationSeed{setup.seed, replication},
                                                             StreamPurpose::handoff_follow_up,
                                                             entity_key({e, static_cast<std::uint64_t>(t)}));
                n.asks_evaluation = draw(follow_up) < plan.handoff.follow_up_probability;
                record.notices.push_back(n);
                Round& r = rounds[n.unit];
                ++r.listed;
                ++r.acted;
                r.minutes += plan.handoff.minutes_per_flag;
            }
            record.rounds.insert(record.rounds.end(), rounds.begin(), rounds.end());
            continue;
        }
        // Ranked review: candidates per scope group, ranked, listed, reviewed within capacity.
        const bool per_unit = plan.review.scope == ReviewScope::unit;
        std::vector<std::vector<Candidate>> groups(per_unit ? n_units : 1);
        for (auto& [e, patient] : census) {
            const auto reason = patient.rule.would_fire(t);
            if (!reason) continue;
            const Score& latest = pop.scores_of(e)[patient.next_score - 1];
            groups[per_unit ? pop.encounters[e].unit : 0].push_back(
                {latest.value, latest.available_at, &pop.encounters[e].id, e, *reason});
        }
        std::vector<Round> rounds(groups.size());
        for (std::size_t g = 0; g < groups.size(); ++g) {
            auto& list = groups[g];
            std::sort(list.begin(), list.end(), ranks_before);
            if (list.size() > static_cast<std::size_t>(plan.review.top_n)) list.resize(static_cast<std::size_t>(plan.review.top_n));
            rounds[g] = Round{t, per_unit ? static_cast<std::uint32_t>(g) : whole_hospital,
                              static_cast<std::int32_t>(list.size()), 0, 0.0};
            for (const Candidate& c : list) record.listed.emplace_back(c.encounter, t);
        }
        int reviewed = 0;
        for (std::size_t rank = 0; rank < static_cast<std::size_t>(plan.review.top_n); ++rank)
            for (std::size_t g = 0; g < groups.size(); ++g) {
                if (rank >= groups[g].size() || reviewed >= capacity) continue;
                const Candidate& c = groups[g][rank];
                census.at(c.encounter).rule.fired(t, c.reason);
                Notice n = notice(c.encounter, c.reason, c.score);
                record.notices.push_back(n);
                ++reviewed;
                ++rounds[g].acted;
                rounds[g].minutes += plan.review.minutes_per_review;
            }
        record.rounds.insert(record.rounds.end(), rounds.begin(), rounds.end());
    }
    record.occasions = static_cast<std::int64_t>(record.rounds.size());
    return record;
}

}  // namespace tocsin
