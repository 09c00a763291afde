#pragma once
// Chart openings: the instants at which clinicians open a patient's chart,
// which are the evaluation instants of the chart-interruption channel. They
// belong to the population, not to a plan: every plan of a replication sees
// the same openings (common random numbers). Either replayed from a log (CSV
// `encounter,opened_at,role`) or generated per encounter as a non-homogeneous
// Poisson process whose rate depends on the opener's role and the local hour
// of day, by thinning (Lewis & Shedler 1979).
//
// Replay, what is fatal and what is counted (as for the score log):
//   fatal (InputError naming file and line 1 or the header line): unreadable
//     file or a directory; missing or repeated required column; unterminated
//     or stray quote.
//   bad rows (InputError naming file, line, column; with bad_rows: skip,
//     skipped and counted by reason): wrong number of fields; an opening for
//     an unknown encounter (including one whose row the replay skipped); an empty or
//     undeclared role; an id or role that is not UTF-8 or holds a control
//     character; a bad timestamp.
//   counted exclusions: openings before admission, at or after time zero, at
//     or after discharge (no rule sees them).
#include <algorithm>
#include <array>
#include <cstdint>
#include <map>
#include <span>
#include <string>
#include <vector>

#include <boost/random/exponential_distribution.hpp>
#include <boost/random/uniform_01.hpp>

#include "models/population.hpp"
#include "models/random_streams.hpp"
#include "models/time.hpp"

namespace tocsin {

struct ChartOpeningRole {
    std::string name;                            // e.g. "ward nurse"
    double clinicians_per_unit = 1.0;            // headcount of the role on one unit in one shift
    std::array<double, 24> openings_per_hour{};  // per patient, by local hour 0..23 (generated openings)
};

struct ChartOpeningSource {
    std::vector<ChartOpeningRole> roles;
    std::string replay_path;  // empty: generate from the roles' rates
};

struct ChartOpening {
    Instant at = 0;
    std::uint8_t role = 0;  // index into ChartOpeningSource::roles (at most 255 roles)
};

struct ChartOpeningLog {
    std::vector<ChartOpening> openings;  // grouped by encounter; each group in time order (ties: file order)
    std::vector<std::size_t> start;      // encounters.size() + 1 offsets into openings
    std::map<std::string, std::int64_t> excluded_by_reason;
    std::map<std::string, std::int64_t> notes;  // resolved oddities, e.g. ambiguous local times
    std::map<std::string, SkippedRows> rows_skipped;  // bad_rows: skip, by "<file name>: <reason>"

    std::span<const ChartOpening> of(std::size_t encounter) const {
        return {openings.data() + start[encounter], start[encounter + 1] - start[encounter]};
    }
};

// Reads a replayed log against the population's encounters and the declared roles.
// `bad_rows` is the replay's setting (population.replay.bad_rows).
ChartOpeningLog load_chart_openings(const std::string& path, const std::vector<ChartOpeningRole>& roles,
                                    const Population& population, const TimeZone& zone,
                                    BadRows bad_rows = BadRows::stop);

// Appends one encounter's generated openings over [admitted, usable_until) in
// time order (ties: role order). Each role is thinned from a homogeneous
// process at its peak hourly rate, with a stream of its own keyed by the
// encounter's index and the role's name (StreamPurpose::chart_openings), so
// adding, removing or reordering another role leaves a role's openings alone.
void generate_chart_openings(const std::vector<ChartOpeningRole>& roles, const Encounter& encounter,
                             std::uint64_t encounter_index, const TimeZone& zone, ReplicationSeed draws,
                             std::vector<ChartOpening>& out);

// Expected openings by one role for one patient over [from, to): the integral of
// its rate over the local hours the interval covers.
double expected_chart_openings(const ChartOpeningRole& role, const TimeZone& zone, Instant from, Instant to);

// Local hour of day (0..23) of an instant.
int local_hour(const TimeZone& zone, Instant at);

// The integral of a rate by local hour (per hour) over [from, to).
double hourly_rate_integral(const std::array<double, 24>& per_hour, const TimeZone& zone, Instant from, Instant to);

// Calls `arrive(instant)` for each arrival of a Poisson process over (from,
// until) whose rate (per hour) depends on the local hour: candidates from a
// homogeneous process at the peak rate, each kept with probability
// rate(t) / peak (Lewis & Shedler 1979, thinning). Two draws per candidate.
template <class Engine, class Arrive>
void hourly_poisson_arrivals(const std::array<double, 24>& per_hour, const TimeZone& zone, Instant from,
                             Instant until, Engine& stream, Arrive&& arrive) {
    const double peak = *std::max_element(per_hour.begin(), per_hour.end());
    if (!(peak > 0)) return;
    boost::random::exponential_distribution<double> gap_hours(peak);
    boost::random::uniform_01<double> keep;
    double t = static_cast<double>(from);
    for (;;) {
        t += gap_hours(stream) * 3600.0;
        if (t >= static_cast<double>(until)) break;
        const auto at = static_cast<Instant>(t);
        if (keep(stream) * peak < per_hour[static_cast<std::size_t>(local_hour(zone, at))]) arrive(at);
    }
}

}  // namespace tocsin
