#pragma once
// Other work: the tasks a role does that no score raised (a rapid response
// nurse's calls from the wards, a ward nurse's regular care). They compete
// with alert tasks for the same people, so they lengthen the waits of alert
// tasks and, through them, change which cases are caught.
//
// Decisions (documented here and in the README, "Other work"):
// - Each class of other work arrives at every team of its role (each unit for
//   a per-unit role, once for a hospital-wide one) as a Poisson process whose
//   rate depends on the local hour of day; arrivals are drawn by thinning a
//   process at the class's peak rate (Lewis & Shedler 1979), as chart openings are.
// - Draws are keyed by what they are about: the role's name, the unit and the
//   class's name (StreamPurpose::other_work); the instants from one stream,
//   each task's minutes from a short stream of its own keyed by the same and
//   the task's number in that class. So declaring other work moves no
//   notice's, opening's or alert task's draws, and adding, removing or
//   reordering one class moves no other class's tasks. The same tasks reach
//   every plan of a replication (they do not depend on any plan).
// - Other work never escalates and is not an evaluation: it can catch nobody.
//   Its priority against alert tasks is declared (see OtherWorkPriority); it
//   never interrupts work already begun (non-preemptive), and otherwise
//   follows the plan's rules for tasks (shift end, loss system).
#include <array>
#include <cstdint>
#include <span>
#include <string>
#include <vector>

#include "models/random_streams.hpp"
#include "models/time.hpp"
#include "sim/service_time.hpp"

namespace tocsin {

// Where a waiting task of other work stands against waiting alert tasks.
enum class OtherWorkPriority : std::uint8_t {
    above_alerts,  // taken up before any waiting alert task
    with_alerts,   // one queue with alert tasks, by the plan's queue order (see staff.hpp)
    below_alerts,  // taken up only when no alert task waits
};
std::string_view to_string(OtherWorkPriority priority);

struct OtherWorkClass {
    std::string name;                     // e.g. "ward calls"
    std::array<double, 24> per_hour{};    // tasks per team per hour, by local hour 0..23
    ServiceTime minutes = FixedMinutes{10.0};
    OtherWorkPriority priority = OtherWorkPriority::with_alerts;
};

// One task of other work, with its minutes already drawn.
struct OtherTask {
    Instant at = 0;
    Seconds service_seconds = 0;
    std::uint32_t role = 0;
    std::uint32_t unit = 0;        // 0 for hospital-wide roles
    std::uint32_t work_class = 0;  // index into the role's other_work
};

// The entity of one class's stream of instants (task = arrival_stream) or of
// the minutes of its n-th task (task = n).
inline constexpr std::uint64_t arrival_stream = ~std::uint64_t{0};
std::uint64_t other_work_entity(std::string_view role, std::uint32_t unit, std::string_view work_class,
                                std::uint64_t task);

struct Role;  // sim/staff.hpp

// Every team's other work over [from, until), sorted by instant (ties: role,
// unit, class, then arrival order); empty when no role declares any.
std::vector<OtherTask> generate_other_work(std::span<const Role> roles, std::uint32_t unit_count,
                                           const TimeZone& zone, Instant from, Instant until, ReplicationSeed draws);

// Expected tasks of one class at one team over [from, to): its rate integrated
// over the local hours the interval covers.
double expected_other_work(const OtherWorkClass& work, const TimeZone& zone, Instant from, Instant to);

}  // namespace tocsin
