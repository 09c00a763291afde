// The chart interruption, handoff list and ranked review channels, one small
// story each. Times are UTC on March 2026 unless said otherwise; shifts are
// day 07:00-19:00 and night 19:00-07:00 (UTC). Catch window: 24 h to 1 h
// before time zero. Each expected list is worked out by hand in its comment.
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <string>
#include <vector>

#include "analysis/channel_burden.hpp"
#include "report/study_answers.hpp"
#include "analysis/results.hpp"
#include "study/review_size.hpp"
#include "sim/channels.hpp"

using namespace tocsin;

namespace {

Instant at(int day, int hour, int minute = 0) {
    return days_from_civil(2026, 3, day) * 86400 + hour * 3600 + minute * 60;
}

std::string hhmm(Instant t) {
    const CivilTime c = civil_from_instant(t);
    char buf[16];
    std::snprintf(buf, sizeof buf, "%02d %02d:%02d", c.day, c.hour, c.minute);
    return buf;
}

// A hand-built hospital: units, patients, scores, and a scenario around them.
struct Ward {
    Population pop;
    std::vector<Score> scores;
    std::vector<std::uint32_t> owner;
    Scenario sc;

    Ward() {
        sc.simulation.zone = TimeZone::utc();
        sc.simulation.shifts = ShiftPattern{{7 * 60, 19 * 60}, {"day", "night"}, {false, true}};
        sc.analysis.window = hours(24);
        sc.analysis.min_lead = minutes(60);
        sc.simulation.seed = 7;
    }
    std::uint32_t patient(const std::string& id, std::uint32_t unit, Instant admitted, Instant discharged,
                          std::optional<Instant> outcome = std::nullopt) {
        while (pop.units.size() <= unit) pop.units.push_back(std::string(1, static_cast<char>('A' + pop.units.size())));
        pop.encounters.push_back({id, unit, admitted, discharged, outcome});
        return static_cast<std::uint32_t>(pop.encounters.size() - 1);
    }
    Ward& score(std::uint32_t e, Instant available, double value) {
        scores.push_back({available, available, value});
        owner.push_back(e);
        return *this;
    }
    Plan& plan(Channel channel, double threshold) {
        Plan p;
        p.name = "plan" + std::to_string(sc.simulation.plans.size());
        p.channel = channel;
        p.rule.threshold = threshold;
        sc.simulation.plans.push_back(p);
        return sc.simulation.plans.back();
    }
    // Finishes the population (grouping, exclusions, period) once patients and scores are in.
    void done() {
        group_scores_by_encounter(pop, scores, owner);
        apply_score_exclusions(pop);
        default_period(pop);
    }
    ShiftCalendar calendar() const { return calendar_for(sc, pop); }
};

// "day hh:mm encounter reason" per notice, with "!" when it asks for no evaluation.
std::vector<std::string> story(const Population& pop, const std::vector<Notice>& notices) {
    std::vector<std::string> out;
    for (const Notice& n : notices)
        out.push_back(hhmm(n.at) + " " + pop.encounters[n.encounter].id + " " + std::string(to_string(n.reason)) +
                      (n.asks_evaluation ? "" : " !"));
    return out;
}

using Expected = std::vector<std::string>;

// The chart stories' patient: P1 on unit 0, 3 Mar 18:00 to 4 Mar 12:00, scores
// 50 at 19:00, 70 available 20:10, 75 at 22:00; nurses (4 per unit) and a physician open charts.
void chart_story_patient(Ward& w) {
    const auto p = w.patient("P1", 0, at(3, 18), at(4, 12));
    w.score(p, at(3, 19), 50).score(p, at(3, 20, 10), 70).score(p, at(3, 22), 75);
    w.done();
    w.sc.simulation.chart_openings = ChartOpeningSource{{{"nurse", 4, {}}, {"physician", 1, {}}}, ""};
}

// Its openings: nurses at 19:30, 20:05, 20:30, 21:00 and 22:00, the physician at 21:30.
std::vector<ChartOpening> chart_story_openings() {
    return {{at(3, 19, 30), 0}, {at(3, 20, 5), 0}, {at(3, 20, 30), 0}, {at(3, 21), 0}, {at(3, 21, 30), 1}, {at(3, 22), 0}};
}

}  // namespace

TEST_CASE("channels.chart_interruption") {
    // One patient, threshold 60, snooze 60 min. Scores: 50 at 19:00, 70
    // available 20:10, 75 at 22:00. Openings (nurse unless said):
    //   19:30 latest 50: no.   20:05 the 70 is not yet available: no.
    //   20:30 latest 70: first.   21:00 snoozed until 21:30: no.
    //   21:30 (physician) at t + S exactly: repeat.
    //   22:00 the 75 is available at that instant, but snoozed until 22:30 and no rise clause: no.
    Ward w;
    chart_story_patient(w);
    Plan& plan = w.plan(Channel::chart_interruption, 60);
    plan.rule.snooze = minutes(60);
    plan.chart.interruption_minutes = 2;
    plan.chart.acceptance_probability = 0.5;
    EncounterOpenings o;
    o.openings = chart_story_openings();
    o.acceptance_draws = {0.9, 0.9, 0.2, 0.9, 0.7, 0.1};
    const ShiftCalendar cal = w.calendar();
    const RuleClock clock{&w.sc.simulation.zone, &cal};
    std::vector<Notice> out;
    CHECK(fire_chart_rule(plan, clock, w.pop.scores_of(0), o, 0, 0, 0, out) == 6);
    // The 21:30 draw 0.7 is above the acceptance probability 0.5: no evaluation asked.
    CHECK(story(w.pop, out) == Expected{"03 20:30 P1 first", "03 21:30 P1 repeat !"});
    REQUIRE(out.size() == 2);
    CHECK(out[0].score == 70);
    CHECK(out[1].opener_role == 1);
    CHECK(out[0].channel == Channel::chart_interruption);

    SUBCASE("a rise interrupts through the snooze") {
        // Rise 5: at 22:00 the 75 >= 70 + 5 fires as a rise (reference was 70 from 21:30).
        plan.rule.rise = 5;
        out.clear();
        fire_chart_rule(plan, clock, w.pop.scores_of(0), o, 0, 0, 0, out);
        CHECK(story(w.pop, out) == Expected{"03 20:30 P1 first", "03 21:30 P1 repeat !", "03 22:00 P1 rise"});
    }
    SUBCASE("only the plan's role is interrupted") {
        // Physician openings only: the single one at 21:30 sees 70 and fires first.
        plan.chart.role = 1;
        out.clear();
        CHECK(fire_chart_rule(plan, clock, w.pop.scores_of(0), o, 0, 0, 0, out) == 1);
        CHECK(story(w.pop, out) == Expected{"03 21:30 P1 first !"});
    }
}

TEST_CASE("channels.score_lookup") {
    // The chart story's patient and openings, as a look-up plan (nothing
    // pushed): threshold 60, snooze 60 min, 1 min per look-up. Look-up
    // probability 0.5 by day (07:00-18:59), 0.25 by night; the openings'
    // look-up draws are 0.4, 0.1, 0.2, 0.3, 0.6, 0.1 (all are night hours):
    //   19:30 draw 0.4 >= 0.25: not looked up.
    //   20:05 draw 0.1: looked up; only the 50 is available: below threshold, no action.
    //   20:30 draw 0.2: looked up; latest 70: act (first).
    //   21:00 draw 0.3: not looked up.
    //   21:30 (physician) draw 0.6: not looked up (so the 60-minute snooze never matters there).
    //   22:00 draw 0.1: looked up; the 75 is available, snoozed until 21:30 only: act (repeat).
    Ward w;
    chart_story_patient(w);
    Plan& plan = w.plan(Channel::score_lookup, 60);
    plan.rule.snooze = minutes(60);
    plan.chart.interruption_minutes = 1;
    plan.chart.lookup_probability.fill(0.25);
    for (int h = 7; h < 19; ++h) plan.chart.lookup_probability[static_cast<std::size_t>(h)] = 0.5;
    EncounterOpenings o;
    o.openings = chart_story_openings();
    o.acceptance_draws = {0.9, 0.9, 0.9, 0.9, 0.9, 0.9};  // the chart channel's draws play no part
    o.lookup_draws = {0.4, 0.1, 0.2, 0.3, 0.6, 0.1};
    const ShiftCalendar cal = w.calendar();
    const RuleClock clock{&w.sc.simulation.zone, &cal};
    std::vector<Notice> out;
    CHECK(fire_lookup_rule(plan, clock, w.pop.scores_of(0), o, 0, 0, 0, out) == 6);
    // "!" marks a look-up that asks for no evaluation.
    CHECK(story(w.pop, out) == Expected{"03 20:05 P1 looked_up !", "03 20:30 P1 first", "03 22:00 P1 repeat"});
    REQUIRE(out.size() == 3);
    CHECK(out[0].score == 50);
    CHECK(out[2].score == 75);
    CHECK(out[1].channel == Channel::score_lookup);
    CHECK(delivery_minutes(plan) == 1);

    SUBCASE("the probability by hour") {
        // 0.5 at every hour but 21:00-21:59, where nobody looks: the draws
        // below 0.5 are at 19:30, 20:05, 20:30, 21:00 and 22:00, and 21:00 is
        // in the hour of probability 0. 19:30 and 20:05 see the 50: no action.
        plan.chart.lookup_probability.fill(0.5);
        plan.chart.lookup_probability[21] = 0.0;
        out.clear();
        fire_lookup_rule(plan, clock, w.pop.scores_of(0), o, 0, 0, 0, out);
        CHECK(story(w.pop, out) == Expected{"03 19:30 P1 looked_up !", "03 20:05 P1 looked_up !", "03 20:30 P1 first",
                                            "03 22:00 P1 repeat"});
    }
    SUBCASE("before any score there is nothing to look up") {
        for (auto& opening : o.openings) opening.at -= hours(12);  // 07:30 ... 10:00, before admission's first score
        plan.chart.lookup_probability.fill(1.0);
        out.clear();
        CHECK(fire_lookup_rule(plan, clock, w.pop.scores_of(0), o, 0, 0, 0, out) == 6);
        CHECK(out.empty());
    }
    SUBCASE("burden: look-ups per clinician per shift") {
        const ReportingShifts rep = reporting_shifts(w.sc.analysis, w.pop, cal);
        PlanRecord r;
        r.notices = out;
        const ChannelBurden b = channel_burden(w.sc.simulation, w.pop, cal, rep, plan, r);
        CHECK(b.measure == "look-ups per clinician per shift");
        // Three nurse look-ups on unit 0 in the 3 Mar night shift, 4 nurses: 0.75, at 1 min each.
        CHECK(std::find(b.values.begin(), b.values.end(), 0.75) != b.values.end());
        double total_minutes = 0;
        for (double m : b.minutes) total_minutes += m * 4;  // nurse rows only are non-zero
        CHECK(total_minutes == doctest::Approx(3.0));
    }
}

TEST_CASE("channels.handoff_list") {
    // Handoffs at the shift starts 07:00 and 19:00. Threshold 60.
    //   P1 unit A, 3 Mar 06:00 - 4 Mar 12:00: 65 at 06:30, 40 at 10:00, 70 at 18:00.
    //   P2 unit A, 3 Mar 08:00 - 5 Mar 00:00, outcome 4 Mar 10:00: 58 at 09:00, 62 at 15:00.
    //   P3 unit B, 2 Mar 20:00 - 3 Mar 18:30: 80 at 21:00 on 2 Mar.
    // Handoffs from the first admission to the last usable instant (4 Mar 12:00):
    // 3 Mar 07:00, 3 Mar 19:00, 4 Mar 07:00.
    //   3 Mar 07:00: P1 (65) first; P3 (80) first.               A 1, B 1
    //   3 Mar 19:00: P3 discharged; P1 (70) repeat; P2 (62) first. A 2, B 0
    //   4 Mar 07:00: P1 (70) repeat; P2 (62) repeat.               A 2, B 0
    // P2's catch window is [3 Mar 10:00, 4 Mar 09:00]: the 3 Mar 19:00 flag
    // catches it, 15 h ahead.
    Ward w;
    const auto p1 = w.patient("P1", 0, at(3, 6), at(4, 12));
    const auto p2 = w.patient("P2", 0, at(3, 8), at(5, 0), at(4, 10));
    const auto p3 = w.patient("P3", 1, at(2, 20), at(3, 18, 30));
    w.score(p1, at(3, 6, 30), 65).score(p1, at(3, 10), 40).score(p1, at(3, 18), 70);
    w.score(p2, at(3, 9), 58).score(p2, at(3, 15), 62);
    w.score(p3, at(2, 21), 80);
    w.done();
    Plan& plan = w.plan(Channel::handoff_list, 60);
    plan.handoff.minutes_per_flag = 3;
    const ShiftCalendar cal = w.calendar();
    PlanRecord r = run_round_channel(w.sc.simulation, w.pop, cal, plan, 0, 0);
    CHECK(story(w.pop, r.notices) == Expected{"03 07:00 P1 first", "03 07:00 P3 first", "03 19:00 P1 repeat",
                                              "03 19:00 P2 first", "04 07:00 P1 repeat", "04 07:00 P2 repeat"});
    std::vector<std::string> rounds;
    for (const Round& x : r.rounds)
        rounds.push_back(hhmm(x.at) + " " + w.pop.units[x.unit] + " " + std::to_string(x.acted) + " " +
                         std::to_string(static_cast<int>(x.minutes)));
    CHECK(rounds == Expected{"03 07:00 A 1 3", "03 07:00 B 1 3", "03 19:00 A 2 6", "03 19:00 B 0 0",
                             "04 07:00 A 2 6", "04 07:00 B 0 0"});
    const PlanFigures f = plan_figures(w.sc.analysis, w.pop, cal, reporting_shifts(w.sc.analysis, w.pop, cal), r);
    CHECK(f.cases == 1);
    CHECK(f.caught == 1);
    CHECK(f.lead_median_hours == doctest::Approx(15.0));

    SUBCASE("snooze keeps a patient off the next lists") {
        // Snooze 24 h: 3 Mar 07:00 P1, P3 first; 19:00 P1 snoozed, P2 first;
        // 4 Mar 07:00 P1 exactly 24 h later: repeat; P2 snoozed.
        plan.rule.snooze = hours(24);
        r = run_round_channel(w.sc.simulation, w.pop, cal, plan, 0, 0);
        CHECK(story(w.pop, r.notices) == Expected{"03 07:00 P1 first", "03 07:00 P3 first", "03 19:00 P2 first",
                                                  "04 07:00 P1 repeat"});
    }
    SUBCASE("declared handoff times") {
        // Only 12:00: 3 Mar 12:00 P1's latest is 40 (no), P2's 58 (no), P3's 80 (first);
        // 4 Mar 12:00 is past P2's outcome and P1's discharge (an instant at or after
        // the end of a stay is not in it): nothing. One flag.
        plan.handoff.times_minutes = {12 * 60};
        r = run_round_channel(w.sc.simulation, w.pop, cal, plan, 0, 0);
        CHECK(story(w.pop, r.notices) == Expected{"03 12:00 P3 first"});
    }
    SUBCASE("without follow-up a flag catches nothing") {
        plan.handoff.follow_up_probability = 0;
        r = run_round_channel(w.sc.simulation, w.pop, cal, plan, 0, 0);
        CHECK(r.notices.size() == 6);
        CHECK(plan_figures(w.sc.analysis, w.pop, cal, reporting_shifts(w.sc.analysis, w.pop, cal), r).caught == 0);
    }
}

TEST_CASE("channels.handoff_follow_up_common_random_numbers") {
    // Two handoff plans (thresholds 50 and 70) on 200 patients with a
    // follow-up probability of 0.5: a patient flagged at the same handoff by
    // both plans gets the same follow-up draw, so the same answer. The share of
    // flags followed up is near 0.5 (binomial; checked loosely, within 5 SD).
    Ward w;
    for (int i = 0; i < 200; ++i) {
        const auto e = w.patient("E" + std::to_string(1000 + i), static_cast<std::uint32_t>(i % 3), at(3, i % 24), at(6, i % 24));
        for (int h = 0; h < 72; h += 4) w.score(e, at(3, i % 24) + hours(h), 40 + (i * 7 + h) % 50);
    }
    w.done();
    Plan& low = w.plan(Channel::handoff_list, 50);
    low.handoff.follow_up_probability = 0.5;
    Plan& high = w.plan(Channel::handoff_list, 70);
    high.handoff.follow_up_probability = 0.5;
    const ShiftCalendar cal = w.calendar();
    const PlanRecord a = run_round_channel(w.sc.simulation, w.pop, cal, w.sc.simulation.plans[0], 0, 0);
    const PlanRecord b = run_round_channel(w.sc.simulation, w.pop, cal, w.sc.simulation.plans[1], 1, 0);
    std::map<std::pair<std::uint32_t, Instant>, bool> asked;
    for (const Notice& n : a.notices) asked[{n.encounter, n.at}] = n.asks_evaluation;
    int shared = 0, followed = 0;
    for (const Notice& n : b.notices) {
        followed += n.asks_evaluation;
        auto it = asked.find({n.encounter, n.at});
        if (it == asked.end()) continue;
        ++shared;
        CHECK(it->second == n.asks_evaluation);
    }
    CHECK(shared > 100);
    const double nb = static_cast<double>(b.notices.size());
    CHECK(std::abs(followed - 0.5 * nb) < 5 * std::sqrt(0.25 * nb));
    // A plan read at 13:00 as well flags patients at more handoffs, but where it
    // flags one at a handoff the others also hold, it gets the same draw: the
    // draw is keyed by patient and handoff instant, not by how many handoffs
    // the patient has been through in this plan.
    Plan thrice = w.sc.simulation.plans[0];
    thrice.handoff.times_minutes = {7 * 60, 13 * 60, 19 * 60};
    const PlanRecord d = run_round_channel(w.sc.simulation, w.pop, cal, thrice, 2, 0);
    int shared_with_thrice = 0;
    for (const Notice& n : d.notices) {
        auto it = asked.find({n.encounter, n.at});
        if (it == asked.end()) continue;
        ++shared_with_thrice;
        CHECK(it->second == n.asks_evaluation);
    }
    CHECK(shared_with_thrice > 100);
    // Another replication draws differently.
    const PlanRecord c = run_round_channel(w.sc.simulation, w.pop, cal, w.sc.simulation.plans[1], 1, 1);
    int differ = 0;
    for (std::size_t i = 0; i < c.notices.size(); ++i) differ += c.notices[i].asks_evaluation != b.notices[i].asks_evaluation;
    CHECK(differ > 0);
}

namespace {

// Four patients on one unit, admitted 3 Mar 00:00, discharged 5 Mar 00:00;
// reviews at 08:00 (3 and 4 Mar), top 2, floor 50, skip 36 h, 15 min each.
//   PA 90 available 3 Mar 07:00;  PB 70 available 06:00;
//   PC 70 available 07:30, outcome 4 Mar 12:00 (window [3 Mar 12:00, 4 Mar 11:00]);
//   PD 45, below the floor.
struct ReviewStory {
    Ward w;
    ReviewStory() {
        const auto a = w.patient("PA", 0, at(3, 0), at(5, 0));
        const auto b = w.patient("PB", 0, at(3, 0), at(5, 0));
        const auto c = w.patient("PC", 0, at(3, 0), at(5, 0), at(4, 12));
        const auto d = w.patient("PD", 0, at(3, 0), at(5, 0));
        w.score(a, at(3, 7), 90).score(b, at(3, 6), 70).score(c, at(3, 7, 30), 70).score(d, at(3, 7), 45);
        Plan& p = w.plan(Channel::ranked_review, 50);
        p.review.skip_reviewed = hours(36);
        p.review.times_minutes = {8 * 60};
        p.review.top_n = 2;
        p.review.minutes_per_review = 15;
    }
};

}  // namespace

TEST_CASE("channels.ranked_review") {
    // 3 Mar 08:00: eligible PA 90, PB 70 (06:00), PC 70 (07:30); the tie PB-PC
    //   goes to PB, whose 70 came first. Top 2: PA, PB, both reviewed.
    // 4 Mar 08:00: PA and PB were reviewed 24 h ago (< 36 h): skipped. PC alone
    //   is listed and reviewed: caught, 4 h before time zero.
    ReviewStory s;
    s.w.done();
    const ShiftCalendar cal = s.w.calendar();
    PlanRecord r = run_round_channel(s.w.sc.simulation, s.w.pop, cal, s.w.sc.simulation.plans[0], 0, 0);
    CHECK(story(s.w.pop, r.notices) == Expected{"03 08:00 PA first", "03 08:00 PB first", "04 08:00 PC first"});
    REQUIRE(r.rounds.size() == 2);
    CHECK(r.rounds[0].unit == 0);
    CHECK(r.rounds[0].listed == 2);
    CHECK(r.rounds[0].minutes == 30);
    const ReportingShifts rep = reporting_shifts(s.w.sc.analysis, s.w.pop, cal);
    PlanFigures f = plan_figures(s.w.sc.analysis, s.w.pop, cal, rep, r);
    CHECK(f.caught == 1);
    CHECK(f.lead_median_hours == doctest::Approx(4.0));

    SUBCASE("the team's capacity leaves listed patients unreviewed") {
        // At most 1 review per round. 3 Mar: listed PA, PB; PA reviewed.
        // 4 Mar: PA skipped; PB (70 since 06:00 on 3 Mar) ahead of PC (70 since
        // 07:30): listed PB, PC; PB reviewed. PC is on the list in its window
        // but never reviewed: not caught.
        s.w.sc.simulation.plans[0].review.max_reviews_per_round = 1;
        r = run_round_channel(s.w.sc.simulation, s.w.pop, cal, s.w.sc.simulation.plans[0], 0, 0);
        CHECK(story(s.w.pop, r.notices) == Expected{"03 08:00 PA first", "04 08:00 PB first"});
        CHECK(r.listed.size() == 4);
        CHECK(r.rounds[1].listed == 2);
        CHECK(r.rounds[1].acted == 1);
        CHECK(plan_figures(s.w.sc.analysis, s.w.pop, cal, rep, r).caught == 0);
    }
    SUBCASE("a rise brings a reviewed patient back") {
        // Rise 10; PA scores 100 at 3 Mar 20:00. 4 Mar 08:00: PA (100 >= 90 + 10)
        // is eligible despite the skip, ahead of PC: reviews PA (rise), PC.
        ReviewStory t;
        t.w.sc.simulation.plans[0].rule.rise = 10;
        t.w.score(0, at(3, 20), 100);
        t.w.done();
        const ShiftCalendar tc = t.w.calendar();
        r = run_round_channel(t.w.sc.simulation, t.w.pop, tc, t.w.sc.simulation.plans[0], 0, 0);
        CHECK(story(t.w.pop, r.notices) ==
              Expected{"03 08:00 PA first", "03 08:00 PB first", "04 08:00 PA rise", "04 08:00 PC first"});
    }
}

TEST_CASE("channels.ranked_review_scope_and_ties") {
    // Two units, three patients each, admitted 3 Mar 00:00 for a day; one
    // review at 08:00, top 2 per unit, capacity 3, no floor.
    //   unit A: A1 80, A2 60, A3 60 (A2 and A3 both available 06:00: id order, A2 first)
    //   unit B: B1 90, B2 50, B3 40
    // Lists: A [A1, A2], B [B1, B2]. Capacity 3, taken rank by rank, units in
    // name order: A1, B1, then A2; B2 is listed but not reviewed.
    Ward w;
    const char* ids[] = {"A3", "A1", "A2", "B1", "B2", "B3"};  // row order must not matter
    const double values[] = {60, 80, 60, 90, 50, 40};
    for (int i = 0; i < 6; ++i) {
        const auto e = w.patient(ids[i], i < 3 ? 0 : 1, at(3, 0), at(4, 0));
        w.score(e, at(3, 6), values[i]);
    }
    w.done();
    Plan& p = w.plan(Channel::ranked_review, -INFINITY);
    p.review.times_minutes = {8 * 60};
    p.review.top_n = 2;
    p.review.max_reviews_per_round = 3;
    const ShiftCalendar cal = w.calendar();
    PlanRecord r = run_round_channel(w.sc.simulation, w.pop, cal, p, 0, 0);
    CHECK(story(w.pop, r.notices) == Expected{"03 08:00 A1 first", "03 08:00 B1 first", "03 08:00 A2 first"});
    CHECK(r.listed.size() == 4);

    SUBCASE("hospital-wide") {
        // One list: B1 90, A1 80, then A2/A3 60 (id order). Top 2: B1, A1.
        p.review.scope = ReviewScope::hospital;
        r = run_round_channel(w.sc.simulation, w.pop, cal, p, 0, 0);
        CHECK(story(w.pop, r.notices) == Expected{"03 08:00 B1 first", "03 08:00 A1 first"});
        REQUIRE(r.rounds.size() == 1);
        CHECK(r.rounds[0].unit == whole_hospital);
    }
}

TEST_CASE("channels.review_size") {
    // Six patients on one unit for one day (3 Mar 00:00-23:00), one review at
    // 08:00, hospital-wide, no floor, 15 min per review. Latest scores at 07:00:
    // 90, 80, 70, 60, 50, 40; the 80 and the 50 have the outcome at 20:00 (window
    // [2 Mar 20:00, 3 Mar 19:00] holds 08:00).
    //   N = 1: reviews the 90: 0 of 2 caught.   N = 2..4: the 80 too: 1 of 2.
    //   N = 5, 6: the 50 too: 2 of 2.
    // Smallest N for 0.8: 5; for 0.5: 2. Minutes per round: 15 N.
    Ward w;
    const double values[] = {90, 80, 70, 60, 50, 40};
    for (int i = 0; i < 6; ++i) {
        const bool outcome = values[i] == 80 || values[i] == 50;
        const auto e = w.patient("S" + std::to_string(i), 0, at(3, 0), at(3, 23),
                                 outcome ? std::optional<Instant>(at(3, 20)) : std::nullopt);
        w.score(e, at(3, 7), values[i]);
    }
    w.done();
    Plan& p = w.plan(Channel::ranked_review, -INFINITY);
    p.review.times_minutes = {8 * 60};
    p.review.scope = ReviewScope::hospital;
    p.review.minutes_per_review = 15;
    const ShiftCalendar cal = w.calendar();
    ReviewSizing s = size_review_list(w.sc, w.pop, cal, 0, 1, 6, 0.8);
    std::vector<std::int64_t> caught;
    for (const auto& row : s.rows) caught.push_back(row.caught);
    CHECK(caught == std::vector<std::int64_t>{0, 1, 1, 1, 2, 2});
    CHECK(s.smallest_n == 5);
    CHECK(s.rows[4].minutes_per_round == 75);
    CHECK(s.rows[4].on_list_share == 1.0);
    CHECK(size_review_list(w.sc, w.pop, cal, 0, 1, 6, 0.5).smallest_n == 2);
    CHECK(review_size_answer(s).find("N = 5") != std::string::npos);

    SUBCASE("a capacity of three reviews caps the catch rate") {
        // N = 5 lists the 50 but the team reviews only the top 3: 1 of 2 caught,
        // yet both cases were on the list. No N reaches 0.8.
        w.sc.simulation.plans[0].review.max_reviews_per_round = 3;
        s = size_review_list(w.sc, w.pop, cal, 0, 1, 6, 0.8);
        CHECK(s.rows[4].caught == 1);
        CHECK(s.rows[4].on_list == 2);
        CHECK(s.rows[4].minutes_per_round == 45);
        CHECK_FALSE(s.smallest_n.has_value());
        CHECK(review_size_answer(s).find("No list length") != std::string::npos);
    }
}

TEST_CASE("channels.review_size_over_replications") {
    // The six patients of channels.review_size (latest scores at 07:00: 90, 80,
    // 70, 60, 50, 40; one hospital-wide review at 08:00, 15 min each), in two
    // replications that differ in who goes on to the outcome at 20:00:
    //   replication 0: the 80 and the 50 (ranks 2 and 5);
    //   replication 1: the 90 and the 60 (ranks 1 and 4).
    // Caught for N = 1..6:  rep 0: 0 1 1 1 2 2;  rep 1: 1 1 1 2 2 2.
    // Catch rate means: 0.25, 0.5, 0.5, 0.75, 1, 1. Smallest N for a mean of
    // 0.8: 5; for 0.7: 4. At N = 4 the target 0.8 is reached in rep 1 only (50%).
    // Every catch is the 08:00 review, 12 h before the outcome: median lead 12 h,
    // and N = 1 of rep 0 has no catch, so its lead is left out (1 replication, no interval).
    // Reviews per round N (one round); yield at N = 4: 1 of 4 and 2 of 4 cases
    // per review, 25 and 50 per 100 reviews, mean 37.5.
    // Interval, as documented (analysis/comparison.hpp): mean +- t(0.975, R-1) s / sqrt(R).
    // With R = 2, t(0.975, 1) = 12.7062 (Student's t table, e.g. Fisher & Yates,
    // Statistical Tables, Table III). N = 1 catch rate: values 0, 0.5, s = 0.353553,
    // half width 12.7062 x 0.353553 / sqrt(2) = 3.17655.
    auto ward = [](double case_a, double case_b) {
        Ward w;
        const double values[] = {90, 80, 70, 60, 50, 40};
        for (int i = 0; i < 6; ++i) {
            const bool outcome = values[i] == case_a || values[i] == case_b;
            const auto e = w.patient("S" + std::to_string(i), 0, at(3, 0), at(3, 23),
                                     outcome ? std::optional<Instant>(at(3, 20)) : std::nullopt);
            w.score(e, at(3, 7), values[i]);
        }
        w.done();
        Plan& p = w.plan(Channel::ranked_review, -INFINITY);
        p.review.times_minutes = {8 * 60};
        p.review.scope = ReviewScope::hospital;
        p.review.minutes_per_review = 15;
        return w;
    };
    Ward first = ward(80, 50), second = ward(90, 60);
    first.sc.replications = 2;
    const PopulationFactory two = [&](std::uint64_t r) { return std::make_shared<const Population>(r == 0 ? first.pop : second.pop); };
    const ReviewSizing s = size_review_list(first.sc, two, 0, 1, 6, 0.8, 1);
    REQUIRE(s.summary.size() == 6);
    CHECK(s.replications == 2);
    std::vector<double> rates;
    for (const auto& row : s.summary) rates.push_back(row.catch_rate.mean);
    CHECK(rates == std::vector<double>{0.25, 0.5, 0.5, 0.75, 1, 1});
    CHECK(s.smallest_n == 5);
    CHECK(s.summary[3].reaches_target_share == 0.5);
    CHECK(s.summary[4].reaches_target_share == 1.0);
    CHECK(s.summary[0].catch_rate.low == doctest::Approx(0.25 - 3.17655).epsilon(1e-5));
    CHECK(s.summary[0].catch_rate.high == doctest::Approx(0.25 + 3.17655).epsilon(1e-5));
    CHECK(s.summary[0].lead_median_hours.n == 1);
    CHECK(s.summary[0].lead_median_hours.mean == 12);
    CHECK(std::isnan(s.summary[0].lead_median_hours.low));
    CHECK(s.summary[3].lead_median_hours.mean == 12);
    CHECK(s.summary[3].lead_median_hours.low == 12);  // no spread
    CHECK(s.summary[3].caught_per_100_reviews.mean == 37.5);
    CHECK(s.summary[3].reviews_per_round.mean == 4);
    CHECK(s.summary[3].minutes_per_round.mean == 60);
    // Replication 0's own rows are kept as they were.
    CHECK(s.rows[3].caught == 1);
    CHECK(s.rows[3].caught_per_100_reviews == 25.0);
    first.sc.replications = 2;
    CHECK(size_review_list(first.sc, two, 0, 1, 6, 0.7, 1).smallest_n == 4);
    // The same figures whatever the thread count.
    const ReviewSizing threaded = size_review_list(first.sc, two, 0, 1, 6, 0.8, 2);
    CHECK(to_csv(review_size_table(threaded)) == to_csv(review_size_table(s)));
    CHECK(review_size_answer(s).find("N = 5: 2 (2 to 2) of 2 cases caught") != std::string::npos);
    CHECK(review_size_text(s).find("0.25 (-2.927 to 3.427)") != std::string::npos);
}

TEST_CASE("channels.review_costed_once_with_roles") {
    // The six patients of channels.review_size, on one unit; one role (a
    // hospital team of one on each shift, 10 minutes a task). A page at 75
    // fires at 07:00 for the 90 and the 80: two tasks of the role, 20 minutes.
    // A review of the top 2 at 08:00 reviews the same two at 15 minutes each
    // (30 minutes): the review team does them, so they are not also queued at
    // the role (which would cost them 10 minutes more each and let them wait).
    // Channel-neutral burdens per unit per reporting shift (R shifts, one unit):
    // page 20/R minutes, 2/R evaluations; review 30/R minutes, 2/R evaluations.
    Ward w;
    const double values[] = {90, 80, 70, 60, 50, 40};
    for (int i = 0; i < 6; ++i) w.score(w.patient("S" + std::to_string(i), 0, at(3, 0), at(3, 23)), at(3, 7), values[i]);
    w.done();
    Role nurse;
    nurse.name = "nurse";
    nurse.roster.by_shift = {1, 1};
    nurse.minutes_per_task = FixedMinutes{10.0};
    w.sc.simulation.roles = {nurse};
    w.sc.simulation.escalation = EscalationGraph({"nurse"});
    w.plan(Channel::page, 75);
    Plan& review = w.plan(Channel::ranked_review, -INFINITY);
    review.review.times_minutes = {8 * 60};
    review.review.top_n = 2;
    review.review.minutes_per_review = 15;
    const ShiftCalendar cal = w.calendar();
    const ReplicationRecord rec = simulate_replication(w.sc.simulation, w.pop, cal, 0, 1);
    REQUIRE(rec.plans[0].staff);
    CHECK(rec.plans[0].staff->tasks.size() == 2);
    CHECK_FALSE(rec.plans[1].staff.has_value());
    CHECK(story(w.pop, rec.plans[1].notices) == Expected{"03 08:00 S0 first", "03 08:00 S1 first"});
    const ReportingShifts rep = reporting_shifts(w.sc.analysis, w.pop, cal);
    const double shifts = static_cast<double>(rep.shifts.size());
    REQUIRE(shifts > 0);
    for (std::size_t p = 0; p < 2; ++p) {
        PlanFigures f = plan_figures(w.sc.analysis, w.pop, cal, rep, rec.plans[p]);
        add_plan_burdens(f, w.sc.simulation, w.pop, cal, rep, w.sc.simulation.plans[p], rec.plans[p]);
        CHECK(f.evaluations == 2);
        CHECK(f.evaluations_per_unit_shift == doctest::Approx(2 / shifts));
        CHECK(f.staff_minutes_per_unit_shift == doctest::Approx((p == 0 ? 20 : 30) / shifts));
    }
    // The review's own unit: 2 patients reviewed per round (one round).
    PlanFigures f = plan_figures(w.sc.analysis, w.pop, cal, rep, rec.plans[1]);
    add_plan_burdens(f, w.sc.simulation, w.pop, cal, rep, w.sc.simulation.plans[1], rec.plans[1]);
    CHECK(f.channel_burden_mean == 2.0);
    // The run's staff tables leave the review plan out rather than showing empty work.
    const ReplicationResults r = replication_results(w.sc.simulation, w.sc.analysis, w.pop, cal, rec, false);
    REQUIRE(r.staff);
    for (const RoleWorkload& row : r.staff->workload) CHECK(row.plan == "plan0");
}

TEST_CASE("channels.round_times_across_daylight_saving") {
    // America/Chicago. On 8 March 2026 clocks go forward at 02:00 CST (08:00Z)
    // to 03:00 CDT: a 02:30 review moves forward to 03:30 CDT = 08:30Z. On 1
    // November 2026 clocks go back at 02:00 CDT (07:00Z): 01:30 happens twice
    // (06:30Z and 07:30Z) and is taken once, at 06:30Z.
    const TimeZone chicago = TimeZone::load("America/Chicago");
    const Instant mar8 = days_from_civil(2026, 3, 8) * 86400;
    CHECK(daily_instants({150}, chicago, mar8, mar8 + hours(23)) == std::vector<Instant>{mar8 + hours(8) + minutes(30)});
    const Instant nov1 = days_from_civil(2026, 11, 1) * 86400;
    CHECK(daily_instants({90}, chicago, nov1, nov1 + hours(23)) == std::vector<Instant>{nov1 + hours(6) + minutes(30)});
    // An ordinary day: 08:00 CST is 14:00Z.
    const Instant mar2 = days_from_civil(2026, 3, 2) * 86400;
    CHECK(daily_instants({480}, chicago, mar2, mar2 + hours(24)) == std::vector<Instant>{mar2 + hours(14)});
}

TEST_CASE("channels.same_record_whatever_the_threads") {
    // 2,100 patients (enough for the per-encounter pass to split into two
    // blocks) with generated chart openings, and one plan per channel: the
    // record is the same with 1 and 2 threads. Two chart plans that differ only
    // in acceptance see the same openings and the same draws, so they interrupt
    // at the same instants, and every interruption accepted at 0.3 is accepted at 0.7.
    Ward w;
    for (int i = 0; i < 2100; ++i) {
        const Instant admitted = at(2, 0) + minutes(i * 7 % 2880);
        const bool outcome = i % 10 == 0;
        const auto e = w.patient("E" + std::to_string(10000 + i), static_cast<std::uint32_t>(i % 3), admitted,
                                 admitted + hours(48), outcome ? std::optional<Instant>(admitted + hours(40)) : std::nullopt);
        for (int h = 0; h < 48; h += 2) w.score(e, admitted + hours(h) + minutes(5), 30 + (i * 13 + h * (outcome ? 3 : 1)) % 60);
    }
    w.done();
    ChartOpeningRole nurse;
    nurse.name = "nurse";
    nurse.openings_per_hour.fill(0.5);
    w.sc.simulation.chart_openings = ChartOpeningSource{{nurse}, ""};
    Plan& often = w.plan(Channel::chart_interruption, 70);
    often.rule.snooze = hours(4);
    often.chart.acceptance_probability = 0.7;
    w.sc.simulation.plans.push_back(often);
    w.sc.simulation.plans.back().chart.acceptance_probability = 0.3;
    Plan& handoff = w.plan(Channel::handoff_list, 65);
    handoff.handoff.follow_up_probability = 0.5;
    Plan& review = w.plan(Channel::ranked_review, 50);
    review.review.times_minutes = {8 * 60};
    review.review.top_n = 5;
    const ShiftCalendar cal = w.calendar();
    const ReplicationRecord one = simulate_replication(w.sc.simulation, w.pop, cal, 0, 1);
    const ReplicationRecord two = simulate_replication(w.sc.simulation, w.pop, cal, 0, 2);
    for (std::size_t p = 0; p < w.sc.simulation.plans.size(); ++p) {
        CAPTURE(p);
        const auto& a = one.plans[p].notices;
        const auto& b = two.plans[p].notices;
        CHECK(a.size() > 50);
        REQUIRE(a.size() == b.size());
        bool same = true;
        for (std::size_t i = 0; i < a.size(); ++i)
            same = same && a[i].at == b[i].at && a[i].encounter == b[i].encounter && a[i].reason == b[i].reason &&
                   a[i].asks_evaluation == b[i].asks_evaluation;
        CHECK(same);
        CHECK(one.plans[p].occasions == two.plans[p].occasions);
    }
    const auto& p07 = one.plans[0].notices;
    const auto& p03 = one.plans[1].notices;
    REQUIRE(p07.size() == p03.size());
    int subset_violations = 0, accepted07 = 0, accepted03 = 0;
    for (std::size_t i = 0; i < p07.size(); ++i) {
        CHECK(p07[i].at == p03[i].at);
        subset_violations += p03[i].asks_evaluation && !p07[i].asks_evaluation;
        accepted07 += p07[i].asks_evaluation;
        accepted03 += p03[i].asks_evaluation;
    }
    CHECK(subset_violations == 0);
    CHECK(accepted03 < accepted07);
}

TEST_CASE("channels.burden_in_each_channels_unit") {
    // The handoff story above (threshold 60, handoffs 07:00 and 19:00, 3 min
    // per flag): flags per unit per handoff are A 1, B 1, A 2, B 0, A 2, B 0:
    // mean 1, worst 2; minutes 3 per flag: mean 3.
    Ward w;
    const auto p1 = w.patient("P1", 0, at(3, 6), at(4, 12));
    const auto p2 = w.patient("P2", 0, at(3, 8), at(5, 0), at(4, 10));
    const auto p3 = w.patient("P3", 1, at(2, 20), at(3, 18, 30));
    w.score(p1, at(3, 6, 30), 65).score(p1, at(3, 10), 40).score(p1, at(3, 18), 70);
    w.score(p2, at(3, 9), 58).score(p2, at(3, 15), 62);
    w.score(p3, at(2, 21), 80);
    w.done();
    Plan& handoff = w.plan(Channel::handoff_list, 60);
    handoff.handoff.minutes_per_flag = 3;
    const ShiftCalendar cal = w.calendar();
    const ReportingShifts rep = reporting_shifts(w.sc.analysis, w.pop, cal);
    ChannelBurden b = channel_burden(w.sc.simulation, w.pop, cal, rep, handoff, run_round_channel(w.sc.simulation, w.pop, cal, handoff, 0, 0));
    CHECK(b.measure == "patients flagged per unit per handoff");
    CHECK(b.values == std::vector<double>{1, 1, 2, 0, 2, 0});
    CHECK(b.minutes == std::vector<double>{3, 3, 6, 0, 6, 0});

    SUBCASE("chart interruptions per clinician per shift") {
        // Two interruptions of nurses (4 per unit) on unit A in the 3 Mar day
        // shift, one of the doctor (1 per unit) in the same shift. The complete
        // shifts between 2 Mar 20:00 and 5 Mar 00:00 are 3 Mar day, 3 Mar night
        // and 4 Mar day (the 4 Mar night ends after 5 Mar 00:00): 2 units x 3
        // shifts x 2 roles = 12 values, all 0 but the nurses' 2 / 4 = 0.5 and
        // the doctor's 1 / 1 = 1.
        w.sc.simulation.chart_openings = ChartOpeningSource{{{"nurse", 4, {}}, {"doctor", 1, {}}}, ""};
        Plan chart;
        chart.channel = Channel::chart_interruption;
        PlanRecord r;
        for (std::uint8_t role : {0, 0, 1})
            r.notices.push_back(make_notice(NoticeOrigin{0, 0, 0, Channel::chart_interruption}, at(3, 9), 0.0,
                                            NoticeReason::first, true, role));
        b = channel_burden(w.sc.simulation, w.pop, cal, rep, chart, r);
        CHECK(b.measure == "interruptions per clinician per shift");
        REQUIRE(b.values.size() == 12);
        std::vector<double> expected(12, 0.0);
        expected[0] = 0.5;  // unit A, 3 Mar day, nurse
        expected[1] = 1.0;  // unit A, 3 Mar day, doctor
        CHECK(b.values == expected);
    }
}

TEST_CASE("channels.replayed_acceptance_keyed_per_opening") {
    // One patient, a replayed log of nurse and physician openings (two of them
    // at the same instant, and two nurse openings at one instant). A nurse
    // opening's acceptance draw is the same whether the physician's openings
    // and role are there, gone, or the roles listed the other way round; and
    // the two nurse openings at one instant draw differently.
    Ward w;
    const auto e = w.patient("P1", 0, at(2, 0), at(6, 0));
    w.score(e, at(2, 1), 50);
    w.done();
    ChartOpeningRole nurse, physician;
    nurse.name = "nurse";
    physician.name = "physician";
    const std::vector<Instant> nurse_at = {at(2, 8), at(2, 9), at(2, 9), at(3, 8), at(4, 20)};
    const std::vector<Instant> physician_at = {at(2, 7), at(2, 9), at(3, 10)};
    auto draws_of_nurse = [&](bool with_physician, bool physician_first) {
        Scenario sc = w.sc;
        sc.simulation.chart_openings = ChartOpeningSource{{nurse}, "replayed.csv"};
        if (with_physician) sc.simulation.chart_openings->roles.insert(physician_first ? sc.simulation.chart_openings->roles.begin()
                                                                            : sc.simulation.chart_openings->roles.end(), physician);
        const std::uint8_t n_role = with_physician && physician_first ? 1 : 0;
        ChartOpeningLog log;
        for (Instant t : nurse_at) log.openings.push_back({t, n_role});
        if (with_physician)
            for (Instant t : physician_at) log.openings.push_back({t, static_cast<std::uint8_t>(1 - n_role)});
        std::stable_sort(log.openings.begin(), log.openings.end(), [](auto& a, auto& b) { return a.at < b.at; });
        log.start = {0, log.openings.size()};
        EncounterOpenings out;
        openings_for_encounter(sc.simulation, w.pop, &log, e, 0, out);
        std::vector<double> mine;
        for (std::size_t i = 0; i < out.openings.size(); ++i)
            if (out.openings[i].role == n_role) mine.push_back(out.acceptance_draws[i]);
        return mine;
    };
    const std::vector<double> alone = draws_of_nurse(false, false);
    REQUIRE(alone.size() == nurse_at.size());
    CHECK(draws_of_nurse(true, false) == alone);
    CHECK(draws_of_nurse(true, true) == alone);
    CHECK(alone[1] != alone[2]);
}
