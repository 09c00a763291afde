#pragma once
// What each delivery channel needs besides the rule (declared per plan), and
// what a round of a shared-time channel (handoff list, ranked review) records.
// Meanings are in README ("The paging rule", "The other channels").
#include <array>
#include <cstdint>
#include <optional>
#include <vector>

#include "models/time.hpp"

namespace tocsin {

// Channels at chart openings: chart_interruption and score_lookup.
struct ChartSettings {
    std::optional<std::uint8_t> role;     // only openings by this role (index into chart-opening roles); none: all
    double interruption_minutes = 0.0;   // the opener's time per interruption, or per look-up
    double acceptance_probability = 1.0; // share of interruptions that lead to an evaluation
    // score_lookup: the chance that an opening at each local hour leads to a look-up.
    std::array<double, 24> lookup_probability{};
};

struct HandoffSettings {
    std::vector<int> times_minutes;      // local minutes after midnight; empty: the shift starts
    double minutes_per_flag = 0.0;       // handoff time per flagged patient
    double follow_up_probability = 1.0;  // share of flags that lead to an evaluation
};

enum class ReviewScope : std::uint8_t { unit, hospital };

struct ReviewSettings {
    std::vector<int> times_minutes;      // local minutes after midnight, ascending
    int top_n = 10;                      // list length, per unit or hospital-wide
    ReviewScope scope = ReviewScope::unit;
    double minutes_per_review = 0.0;
    std::optional<int> max_reviews_per_round;  // the team's capacity; none: every listed patient is reviewed
    std::optional<Seconds> skip_reviewed;      // a reviewed patient stays off the lists this long; none: no skip
};

inline constexpr std::uint32_t whole_hospital = UINT32_MAX;

// One handoff (per unit) or one review round (per unit or for the whole hospital).
struct Round {
    Instant at = 0;
    std::uint32_t unit = whole_hospital;  // index into Population::units, or whole_hospital
    std::int32_t listed = 0;  // handoff: patients flagged; review: patients on the top-N list
    std::int32_t acted = 0;   // handoff: flagged; review: reviewed (within the team's capacity)
    double minutes = 0.0;     // staff minutes the round's flags or reviews took
};

}  // namespace tocsin
