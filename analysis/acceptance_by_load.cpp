#include "analysis/acceptance_by_load.hpp"

#include <array>
#include <utility>

namespace tocsin {

std::string_view to_string(LoadKind kind) {
    switch (kind) {
        case LoadKind::earlier_for_patient: return "earlier_for_patient";
        case LoadKind::recent_for_team: return "recent_for_team";
    }
    return "?";
}

std::size_t load_band(std::uint32_t load) {
    std::size_t band = 0;
    while (band + 1 < load_band_count && load >= load_band_floors[band + 1]) ++band;
    return band;
}

std::string load_band_name(std::size_t band) {
    const std::uint32_t low = load_band_floors[band];
    if (band + 1 == load_band_count) return std::to_string(low) + "+";
    const std::uint32_t high = load_band_floors[band + 1] - 1;
    return low == high ? std::to_string(low) : std::to_string(low) + "-" + std::to_string(high);
}

std::vector<LoadBandRow> acceptance_by_load(const SimulationSetup& setup, const ReplicationRecord& record,
                                            Instant from, Instant until) {
    std::vector<LoadBandRow> out;
    for (std::size_t p = 0; p < setup.plans.size(); ++p) {
        const PlanRecord& plan = record.plans[p];
        if (!setup.plans[p].fatigue || plan.loads.size() != plan.notices.size()) continue;
        struct Sums { std::int64_t notices = 0, evaluations = 0; double probability = 0; };
        std::array<std::array<Sums, load_band_count>, 2> sums{};
        for (std::size_t i = 0; i < plan.notices.size(); ++i) {
            const Notice& n = plan.notices[i];
            if (n.at < from || n.at >= until) continue;
            const NoticeLoad& load = plan.loads[i];
            for (auto [kind, count] : {std::pair{0, load.earlier_for_patient}, std::pair{1, load.recent_for_team}}) {
                Sums& s = sums[kind][load_band(count)];
                ++s.notices;
                s.evaluations += n.asks_evaluation;
                s.probability += load.probability;
            }
        }
        for (std::size_t kind = 0; kind < 2; ++kind)
            for (std::size_t band = 0; band < load_band_count; ++band) {
                const Sums& s = sums[kind][band];
                if (s.notices == 0) continue;
                const auto n = static_cast<double>(s.notices);
                out.push_back({setup.plans[p].name, static_cast<LoadKind>(kind), band, s.notices, s.evaluations,
                               static_cast<double>(s.evaluations) / n, s.probability / n});
            }
    }
    return out;
}

}  // namespace tocsin
