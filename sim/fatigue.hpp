#pragma once
// Response that falls with load (alert fatigue): the probability that a notice
// leads to a bedside evaluation falls with the notices that came before it.
// Logistic form: the odds of an evaluation are the plan's base odds multiplied
// by `repeat_odds_ratio` for each earlier notice about the same patient in this
// plan, and by `recent_odds_ratio` for each notice the same team received in the
// `window` before it (README, "Response that falls with load").
//
// Decisions:
// - Declared per plan: plans are alternatives, each answered by its own staff
//   (sim/simulate.cpp), so a plan that notices more wears its own recipients
//   down; a committee compares that.
// - The team a notice reaches: for a page, the paged role's team (on the
//   notice's unit when the role works per unit, one team for the hospital
//   otherwise; the unit when the scenario declares no roles); for a chart
//   interruption, the opening role on the notice's unit.
// - Counted loads are every notice delivered (whether or not it led to an
//   evaluation) strictly before in the plan's time order: the same patient's
//   earlier notices in this plan, and the team's notices at instants in
//   [at - window, at).
// - The draw: a chart interruption keeps its opening's acceptance draw (so with
//   both odds ratios at 1 every output is today's, byte for byte); a page draws
//   from stream notice_response keyed by (encounter, instant, occurrence).
// - A page not accepted is acknowledged without an evaluation: it stays a
//   notice (it is counted and it cost an interruption) but asks for no task.
#include <cstdint>
#include <span>
#include <vector>

#include "models/random_streams.hpp"
#include "models/time.hpp"
#include "sim/notice.hpp"

namespace tocsin {

struct FatigueEffect {
    double base_response = 1.0;      // page: probability without load (a chart interruption uses its acceptance_probability)
    double repeat_odds_ratio = 1.0;  // per earlier notice about the same patient in this plan
    double recent_odds_ratio = 1.0;  // per notice the team received within the window
    Seconds window = hours(8);
};

// The load a notice met and the probability of an evaluation it was given.
struct NoticeLoad {
    std::uint32_t earlier_for_patient = 0;
    std::uint32_t recent_for_team = 0;
    double probability = 1.0;
};

// Probability of an evaluation at base probability `base` after the loads:
// base itself when the odds are not moved (so a zero effect changes nothing).
double fatigued_probability(double base, const FatigueEffect& effect, std::uint32_t earlier_for_patient,
                            std::uint32_t recent_for_team);

// Who receives a notice, for the window count: see the decisions above.
struct RecipientTeams {
    bool page_role_per_unit = true;  // the paged role works per unit (or no roles are declared)
};

// Decides, for every notice of one plan (sorted by time), whether it asks for
// an evaluation, and returns the load each met (one per notice). `base` is the
// page's base_response or the chart interruption's acceptance_probability.
std::vector<NoticeLoad> apply_fatigue(std::vector<Notice>& notices, const FatigueEffect& effect, double base,
                                      RecipientTeams teams, ReplicationSeed draws);

}  // namespace tocsin
