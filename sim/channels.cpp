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
        case Channel::chart_interruption:
        case Channel::score_lookup: return plan.chart.interruption_minutes;
        case Channel::handoff_list: return plan.handoff.minutes_per_flag;
        case Channel::ranked_review: return plan.review.minutes_per_review;
    }
    return 0.0;
}

void openings_for_encounter(const SimulationSetup& setup, const Population& pop, const ChartOpeningLog* replayed,
                            std::size_t e, std::uint64_t replication, EncounterOpenings& out, bool with_lookups) {
    out.openings.clear();
    out.acceptance_draws.clear();
    out.lookup_draws.clear();
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
        if (!with_lookups) continue;
        // Keyed as the acceptance draw but by its own purpose: the same look-ups in every look-up plan.
        SplitMixEngine lookup = make_short_stream(
            ReplicationSeed{setup.seed, replication}, StreamPurpose::score_lookup,
            entity_key({e, out.role_keys[o.role], static_cast<std::uint64_t>(o.at), occurrence}));
        out.lookup_draws.push_back(draw(lookup));
    }
}

namespace {

// The openings a chart-opening plan sees (its role's, or every role's), in
// time order, with `state` fed every score available by each: calls
// `at_opening(index, opening)` and returns how many there were.
template <class AtOpening>
std::int64_t walk_openings(const Plan& plan, std::span<const Score> scores, const EncounterOpenings& openings,
                           RuleState& state, AtOpening&& at_opening) {
    std::size_t next = 0;
    std::int64_t seen = 0;
    for (std::size_t i = 0; i < openings.openings.size(); ++i) {
        const ChartOpening& o = openings.openings[i];
        if (plan.chart.role && o.role != *plan.chart.role) continue;
        ++seen;
        while (next < scores.size() && scores[next].available_at <= o.at) state.see(scores[next++]);
        at_opening(i, o);
    }
    return seen;
}

}  // namespace

std::int64_t fire_chart_rule(const Plan& plan, const RuleClock& clock, std::span<const Score> scores,
                             const EncounterOpenings& openings, std::uint32_t encounter, std::uint32_t unit,
                             std::uint32_t plan_index, std::vector<Notice>& out) {
    RuleState state(plan.rule, clock);
    const NoticeOrigin origin{encounter, unit, plan_index, Channel::chart_interruption};
    return walk_openings(plan, scores, openings, state, [&](std::size_t i, const ChartOpening& o) {
        const auto reason = state.fire_if_due(o.at);
        if (!reason) return;
        const bool accepted = openings.acceptance_draws[i] < plan.chart.acceptance_probability;
        out.push_back(make_notice(origin, o.at, state.latest(), *reason, accepted, o.role));
        out.back().response_draw = openings.acceptance_draws[i];
    });
}

std::int64_t fire_lookup_rule(const Plan& plan, const RuleClock& clock, std::span<const Score> scores,
                              const EncounterOpenings& openings, std::uint32_t encounter, std::uint32_t unit,
                              std::uint32_t plan_index, std::vector<Notice>& out) {
    RuleState state(plan.rule, clock);
    const NoticeOrigin origin{encounter, unit, plan_index, Channel::score_lookup};
    return walk_openings(plan, scores, openings, state, [&](std::size_t i, const ChartOpening& o) {
        const auto hour = static_cast<std::size_t>(local_hour(*clock.zone, o.at));
        if (!(openings.lookup_draws[i] < plan.chart.lookup_probability[hour])) return;
        if (!state.has_seen()) return;  // nothing to look up yet
        const auto reason = state.fire_if_due(o.at);
        out.push_back(make_notice(origin, o.at, state.latest(), reason ? *reason : NoticeReason::looked_up,
                                  reason.has_value(), o.role));
    });
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

// The current inpatients at the last instant the census was advanced to, each
// with its rule state fed every score available by then. Instants must be
// visited in increasing order.
class Census {
public:
    Census(const Population& pop, std::size_t score, const Rule& rule, const RuleClock& clock)
        : pop_(pop), score_(score), rule_(rule), clock_(clock), by_admission_(pop.encounters.size()) {
        for (std::uint32_t e = 0; e < by_admission_.size(); ++e) {
            by_admission_[e] = e;
            first_ = std::min(first_, pop.encounters[e].admitted);
            last_ = std::max(last_, Population::usable_until(pop.encounters[e]));
        }
        std::stable_sort(by_admission_.begin(), by_admission_.end(), [&](std::uint32_t a, std::uint32_t b) {
            return pop.encounters[a].admitted < pop.encounters[b].admitted;
        });
    }

    // The earliest admission and the latest end of a usable stay.
    Instant first() const { return first_; }
    Instant last() const { return last_; }

    // Admits the patients admitted by `t`, lets go those whose stay is no
    // longer usable at `t`, and feeds every patient the scores available at `t`.
    void advance_to(Instant t) {
        for (; next_admission_ < by_admission_.size() && pop_.encounters[by_admission_[next_admission_]].admitted <= t;
             ++next_admission_) {
            const std::uint32_t e = by_admission_[next_admission_];
            if (Population::usable_until(pop_.encounters[e]) <= t) continue;
            patients_.try_emplace(e, rule_, clock_);
        }
        std::erase_if(patients_,
                      [&](const auto& item) { return Population::usable_until(pop_.encounters[item.first]) <= t; });
        for (auto& [e, patient] : patients_) {
            const auto scores = pop_.scores_of(e, score_);
            while (patient.next_score < scores.size() && scores[patient.next_score].available_at <= t)
                patient.rule.see(scores[patient.next_score++]);
        }
    }

    // Ordered by encounter index.
    std::map<std::uint32_t, Inpatient>& patients() { return patients_; }

private:
    const Population& pop_;
    std::size_t score_;  // the plan's score
    const Rule& rule_;
    RuleClock clock_;
    std::vector<std::uint32_t> by_admission_;
    std::size_t next_admission_ = 0;
    Instant first_ = INT64_MAX, last_ = INT64_MIN;
    std::map<std::uint32_t, Inpatient> patients_;
};

// What one plan's round needs besides the census.
struct RoundContext {
    const Population& pop;
    const Plan& plan;
    std::uint32_t plan_index;
    ReplicationSeed draws;
};

NoticeOrigin origin_of(const RoundContext& c, std::uint32_t e) {
    return NoticeOrigin{e, c.pop.encounters[e].unit, c.plan_index, c.plan.channel};
}

// A handoff at `t`: every current inpatient whose rule fires is flagged, one
// round per unit.
void handoff_round(const RoundContext& c, Instant t, Census& census, PlanRecord& record) {
    std::vector<Round> rounds(c.pop.units.size());
    for (std::uint32_t u = 0; u < rounds.size(); ++u) rounds[u] = Round{t, u, 0, 0, 0.0};
    boost::random::uniform_01<double> draw;
    for (auto& [e, patient] : census.patients()) {
        const auto reason = patient.rule.fire_if_due(t);
        if (!reason) continue;
        // Keyed by patient and handoff instant: the same draw in every plan
        // flagging this patient at this handoff, whatever its other handoff times.
        SplitMixEngine follow_up = make_short_stream(c.draws, StreamPurpose::handoff_follow_up,
                                                     entity_key({e, static_cast<std::uint64_t>(t)}));
        const bool followed_up = draw(follow_up) < c.plan.handoff.follow_up_probability;
        const Notice& n = record.notices.emplace_back(
            make_notice(origin_of(c, e), t, patient.rule.latest(), *reason, followed_up));
        Round& r = rounds[n.unit];
        ++r.listed;
        ++r.acted;
        r.minutes += c.plan.handoff.minutes_per_flag;
    }
    record.rounds.insert(record.rounds.end(), rounds.begin(), rounds.end());
}

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

// A review at `t`: the candidates whose rule would fire, per scope group,
// ranked and cut to the top N; the team reviews them rank by rank across
// groups within its capacity.
void review_round(const RoundContext& c, Instant t, Census& census, PlanRecord& record) {
    const ReviewSettings& review = c.plan.review;
    const bool per_unit = review.scope == ReviewScope::unit;
    std::vector<std::vector<Candidate>> groups(per_unit ? c.pop.units.size() : 1);
    for (auto& [e, patient] : census.patients()) {
        const auto reason = patient.rule.would_fire(t);
        if (!reason) continue;
        const Score& latest = c.pop.scores_of(e, c.plan.score)[patient.next_score - 1];
        groups[per_unit ? c.pop.encounters[e].unit : 0].push_back(
            {latest.value, latest.available_at, &c.pop.encounters[e].id, e, *reason});
    }
    const auto top_n = static_cast<std::size_t>(review.top_n);
    std::vector<Round> rounds(groups.size());
    for (std::size_t g = 0; g < groups.size(); ++g) {
        auto& list = groups[g];
        std::sort(list.begin(), list.end(), ranks_before);
        if (list.size() > top_n) list.resize(top_n);
        rounds[g] = Round{t, per_unit ? static_cast<std::uint32_t>(g) : whole_hospital,
                          static_cast<std::int32_t>(list.size()), 0, 0.0};
        for (const Candidate& cand : list) record.listed.emplace_back(cand.encounter, t);
    }
    const int capacity = review.max_reviews_per_round.value_or(INT_MAX);
    int reviewed = 0;
    for (std::size_t rank = 0; rank < top_n; ++rank)
        for (std::size_t g = 0; g < groups.size(); ++g) {
            if (rank >= groups[g].size() || reviewed >= capacity) continue;
            const Candidate& cand = groups[g][rank];
            census.patients().at(cand.encounter).rule.fired(t, cand.reason);
            record.notices.push_back(make_notice(origin_of(c, cand.encounter), t, cand.score, cand.reason));
            ++reviewed;
            ++rounds[g].acted;
            rounds[g].minutes += review.minutes_per_review;
        }
    record.rounds.insert(record.rounds.end(), rounds.begin(), rounds.end());
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
    const Rule rule = channel_rule(plan);
    Census census(pop, plan.score, rule, RuleClock{&setup.zone, &cal});
    const RoundContext context{pop, plan, plan_index, ReplicationSeed{setup.seed, replication}};
    for (const Instant t : daily_instants(times, setup.zone, census.first(), census.last())) {
        census.advance_to(t);
        if (handoff)
            handoff_round(context, t, census, record);
        else
            review_round(context, t, census, record);
    }
    record.occasions = static_cast<std::int64_t>(record.rounds.size());
    return record;
}

}  // namespace tocsin
