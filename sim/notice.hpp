#pragma once
// A notice: one firing of a plan's rule for one encounter, delivered through
// the plan's channel. Every notice is recorded.
#include <cstdint>
#include <string_view>

#include "models/time.hpp"

namespace tocsin {

enum class Channel : std::uint8_t { page, chart_interruption, handoff_list, ranked_review, score_lookup };
// looked_up: a look-up (channel score_lookup) at which the rule did not call
// for action; every other reason is a firing.
enum class NoticeReason : std::uint8_t { first, repeat, rise, looked_up };

std::string_view to_string(Channel channel);
std::string_view to_string(NoticeReason reason);

struct Notice {
    Instant at = 0;               // when it was delivered
    double score = 0.0;           // the score that made it fire
    std::uint32_t encounter = 0;  // index into Population::encounters
    std::uint32_t unit = 0;
    std::uint32_t plan = 0;       // index into the scenario's plans
    NoticeReason reason = NoticeReason::first;
    Channel channel = Channel::page;
    // Whether the notice asks for a bedside evaluation task (the staff model's
    // input, and the only notices that can catch a case). A page always asks;
    // a chart interruption asks when accepted, a handoff flag when followed
    // up; a ranked review is itself the evaluation; a look-up asks when the
    // rule fires at it (the score at or above the threshold).
    bool asks_evaluation = true;
    // For a chart interruption or a look-up: the opener's role, an index into the
    // scenario's chart-opening roles; 0 for other channels.
    std::uint8_t opener_role = 0;
    // The uniform draw that decided asks_evaluation: a chart interruption's
    // acceptance draw, a page's response draw when its plan declares fatigue
    // (sim/fatigue.hpp); 0 otherwise.
    double response_draw = 0.0;
};

// Where a notice comes from and whom it is about: one plan's channel, one
// encounter on its unit.
struct NoticeOrigin {
    std::uint32_t encounter = 0;
    std::uint32_t unit = 0;
    std::uint32_t plan = 0;
    Channel channel = Channel::page;
};

// The one way the simulation builds a notice: the rule of `origin` fired at
// `at` on `score` for `reason`. asks_evaluation and opener_role as in Notice.
inline Notice make_notice(const NoticeOrigin& origin, Instant at, double score, NoticeReason reason,
                          bool asks_evaluation = true, std::uint8_t opener_role = 0) {
    Notice n;
    n.at = at;
    n.score = score;
    n.encounter = origin.encounter;
    n.unit = origin.unit;
    n.plan = origin.plan;
    n.reason = reason;
    n.channel = origin.channel;
    n.asks_evaluation = asks_evaluation;
    n.opener_role = opener_role;
    return n;
}

}  // namespace tocsin
