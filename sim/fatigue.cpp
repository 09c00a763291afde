#include "sim/fatigue.hpp"

#include <cmath>
#include <limits>
#include <deque>
#include <map>
#include <unordered_map>

#include <boost/random/uniform_01.hpp>

namespace tocsin {

double fatigued_probability(double base, const FatigueEffect& effect, std::uint32_t earlier_for_patient,
                            std::uint32_t recent_for_team) {
    const double factor = std::pow(effect.repeat_odds_ratio, static_cast<double>(earlier_for_patient)) *
                          std::pow(effect.recent_odds_ratio, static_cast<double>(recent_for_team));
    if (factor == 1.0 || base <= 0.0 || base >= 1.0) return base;
    const double odds = base / (1.0 - base) * factor;
    if (std::isinf(odds)) return 1.0;
    return odds / (1.0 + odds);
}

namespace {

// The team key of a notice (see fatigue.hpp): unit and, for a chart
// interruption, the opening role; a hospital-wide paged role is one team.
std::uint64_t team_of(const Notice& n, RecipientTeams teams) {
    if (n.channel == Channel::chart_interruption) return (static_cast<std::uint64_t>(n.opener_role) << 32) | n.unit;
    return teams.page_role_per_unit ? n.unit : UINT32_MAX;
}

}  // namespace

std::vector<NoticeLoad> apply_fatigue(std::vector<Notice>& notices, const FatigueEffect& effect, double base,
                                      RecipientTeams teams, ReplicationSeed draws) {
    std::vector<NoticeLoad> loads(notices.size());
    std::unordered_map<std::uint32_t, std::uint32_t> earlier;          // per encounter
    std::map<std::uint64_t, std::deque<Instant>> recent;               // per team: instants in the window
    std::unordered_map<std::uint32_t, std::uint32_t> at_instant;      // per encounter, at the current instant
    Instant instant = std::numeric_limits<Instant>::min();
    boost::random::uniform_01<double> uniform;
    for (std::size_t i = 0; i < notices.size(); ++i) {
        Notice& n = notices[i];
        if (n.at != instant) {
            instant = n.at;
            at_instant.clear();
        }
        std::deque<Instant>& team = recent[team_of(n, teams)];
        while (!team.empty() && team.front() < n.at - effect.window) team.pop_front();
        // Notices of the same instant are not "before" one another.
        std::uint32_t before = 0;
        for (auto it = team.rbegin(); it != team.rend() && *it == n.at; ++it) ++before;
        NoticeLoad& load = loads[i];
        load.earlier_for_patient = earlier[n.encounter]++;
        load.recent_for_team = static_cast<std::uint32_t>(team.size()) - before;
        load.probability = fatigued_probability(base, effect, load.earlier_for_patient, load.recent_for_team);
        team.push_back(n.at);
        const std::uint32_t occurrence = at_instant[n.encounter]++;
        if (n.channel == Channel::page) {
            SplitMixEngine engine = make_short_stream(
                draws, StreamPurpose::notice_response,
                entity_key({n.encounter, static_cast<std::uint64_t>(n.at), occurrence}));
            n.response_draw = uniform(engine);
        }
        n.asks_evaluation = n.response_draw < load.probability;
    }
    return loads;
}

}  // namespace tocsin
