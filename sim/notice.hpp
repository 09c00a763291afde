#pragma once
// A notice: one firing of a plan's rule for one encounter, delivered through
// the plan's channel. Every notice is recorded.
#include <cstdint>
#include <string_view>

#include "models/time.hpp"

namespace tocsin {

enum class Channel : std::uint8_t { page, chart_interruption, handoff_list, ranked_review };
enum class NoticeReason : std::uint8_t { first, repeat, rise };

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
    // up; a ranked review is itself the evaluation.
    bool asks_evaluation = true;
    // For a chart interruption: the opener's role, an index into the
    // scenario's chart-opening roles; 0 for other channels.
    std::uint8_t opener_role = 0;
};

}  // namespace tocsin
