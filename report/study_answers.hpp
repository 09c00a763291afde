#pragma once
// The answers of the study questions as tables and text: how long a review
// list should be (study/review_size.hpp) and what a stress-test shift changed
// (study/shift_effect.hpp).
#include <string>

#include "report/table.hpp"
#include "models/time.hpp"
#include "study/review_size.hpp"
#include "study/shift_effect.hpp"

namespace tocsin {

// "review_size": per list length, each figure's mean and 95% interval over replications.
Table review_size_table(const ReviewSizing& sizing);
// The terminal table: "mean (low to high)" per figure.
std::string review_size_text(const ReviewSizing& sizing);
// The answer in one sentence.
std::string review_size_answer(const ReviewSizing& sizing);

// "shift_effect": plan, metric, before/after/change with 95% intervals.
Table shift_effect_table(const ShiftEffect& effect);
// The terminal summary: notices per unit per night and sensitivity, before -> after (change).
std::string shift_effect_text(const ShiftEffect& effect, const TimeZone& zone);

}  // namespace tocsin
