#include "sim/other_work.hpp"

#include <algorithm>

#include "models/chart_openings.hpp"
#include "sim/staff.hpp"

namespace tocsin {

std::string_view to_string(OtherWorkPriority priority) {
    switch (priority) {
        case OtherWorkPriority::above_alerts: return "above";
        case OtherWorkPriority::with_alerts: return "equal";
        case OtherWorkPriority::below_alerts: return "below";
    }
    return "?";
}

std::uint64_t other_work_entity(std::string_view role, std::uint32_t unit, std::string_view work_class,
                                std::uint64_t task) {
    return entity_key({text_entity(role), unit, text_entity(work_class), task});
}

std::vector<OtherTask> generate_other_work(std::span<const Role> roles, std::uint32_t unit_count,
                                           const TimeZone& zone, Instant from, Instant until, ReplicationSeed draws) {
    std::vector<OtherTask> out;
    for (std::uint32_t r = 0; r < roles.size(); ++r)
        for (std::uint32_t u = 0; u < (roles[r].per_unit ? unit_count : 1u); ++u)
            for (std::uint32_t c = 0; c < roles[r].other_work.size(); ++c) {
                const OtherWorkClass& work = roles[r].other_work[c];
                RandomEngine stream = make_stream(draws.seed, draws.replication, StreamPurpose::other_work,
                                                  other_work_entity(roles[r].name, u, work.name, arrival_stream));
                std::uint64_t n = 0;
                hourly_poisson_arrivals(work.per_hour, zone, from, until, stream, [&](Instant at) {
                    SplitMixEngine minutes = make_short_stream(draws, StreamPurpose::other_work,
                                                               other_work_entity(roles[r].name, u, work.name, n++));
                    out.push_back({at, draw_seconds(work.minutes, minutes), r, u, c});
                });
            }
    // Stable: ties keep role, unit, class and arrival order.
    std::stable_sort(out.begin(), out.end(), [](const OtherTask& a, const OtherTask& b) { return a.at < b.at; });
    return out;
}

double expected_other_work(const OtherWorkClass& work, const TimeZone& zone, Instant from, Instant to) {
    return hourly_rate_integral(work.per_hour, zone, from, to);
}

}  // namespace tocsin
