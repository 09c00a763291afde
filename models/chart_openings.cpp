#include "models/chart_openings.hpp"

#include <algorithm>
#include <filesystem>
#include <unordered_map>

#include <boost/random/exponential_distribution.hpp>
#include <boost/random/uniform_01.hpp>

#include "models/csv.hpp"
#include "models/errors.hpp"
#include "models/text.hpp"

namespace tocsin {

int local_hour(const TimeZone& zone, Instant at) {
    const Instant local = zone.to_local_seconds(at);
    return static_cast<int>(((local % 86400) + 86400) % 86400 / 3600);
}

namespace {

// The index of the role named `name`, or roles.size().
std::size_t role_index(const std::vector<ChartOpeningRole>& roles, std::string_view name) {
    std::size_t r = 0;
    while (r < roles.size() && roles[r].name != name) ++r;
    return r;
}

std::string declared_roles(const std::vector<ChartOpeningRole>& roles) {
    std::string declared;
    for (const auto& d : roles) declared += (declared.empty() ? "" : ", ") + d.name;
    return declared;
}

// Fills log.start and log.openings: the openings grouped by their owner
// encounter (a stable counting sort), then in time order within each group.
void group_by_encounter(const std::vector<ChartOpening>& openings, const std::vector<std::uint32_t>& owner,
                        std::size_t n, ChartOpeningLog& log) {
    log.start.assign(n + 1, 0);
    for (std::uint32_t e : owner) ++log.start[e + 1];
    for (std::size_t e = 0; e < n; ++e) log.start[e + 1] += log.start[e];
    log.openings.resize(openings.size());
    std::vector<std::size_t> next(log.start.begin(), log.start.end() - 1);
    for (std::size_t i = 0; i < openings.size(); ++i) log.openings[next[owner[i]]++] = openings[i];
    for (std::size_t e = 0; e < n; ++e)
        std::stable_sort(log.openings.begin() + static_cast<std::ptrdiff_t>(log.start[e]),
                         log.openings.begin() + static_cast<std::ptrdiff_t>(log.start[e + 1]),
                         [](const ChartOpening& a, const ChartOpening& b) { return a.at < b.at; });
}

}  // namespace

ChartOpeningLog load_chart_openings(const std::string& path, const std::vector<ChartOpeningRole>& roles,
                                    const Population& pop, const TimeZone& zone, BadRows bad_rows) {
    ChartOpeningLog log;
    std::unordered_map<std::string, std::uint32_t> index;
    for (std::uint32_t e = 0; e < pop.encounters.size(); ++e) index.emplace(pop.encounters[e].id, e);
    std::vector<std::string_view> fields;
    CsvReader reader(path);
    if (!reader.next(fields)) throw InputError(path, 1, 0, "", "file is empty (expected a header)");
    const std::vector<std::string_view> required = {"encounter", "opened_at", "role"};
    const std::vector<std::size_t> col = header_columns(reader, fields, required);
    const std::size_t width = fields.size();
    std::vector<ChartOpening> openings;
    std::vector<std::uint32_t> owner;
    std::int64_t before_admission = 0, after_outcome = 0, after_discharge = 0;
    // A row that cannot be used stops the run or, with bad_rows: skip, is
    // counted under `reason` with its line.
    struct BadRow {
        std::string reason;
        InputError error;
    };
    while (reader.next(fields)) {
        if (fields.size() == 1 && fields[0].empty()) continue;  // blank line
        auto fail = [&](std::size_t c, std::string_view name, std::string reason, const std::string& message) {
            throw BadRow{std::move(reason),
                         InputError(path, reader.line(), static_cast<long>(c + 1), std::string(name), message)};
        };
        auto text = [&](std::size_t c, std::string_view name) {
            if (std::string problem = text_problem(fields[c]); !problem.empty())
                fail(c, name, "text that is not UTF-8 or holds a control character",
                     "expected UTF-8 text without control characters: " + problem);
        };
        try {
            if (fields.size() != width)
                throw BadRow{"wrong number of fields",
                             InputError(path, reader.line(), 0, "",
                                        "expected " + std::to_string(width) + " fields as in the header, found " +
                                            std::to_string(fields.size()))};
            auto it = index.find(std::string(fields[col[0]]));
            if (it == index.end()) {
                text(col[0], "encounter");
                fail(col[0], "encounter", "chart opening for an unknown encounter",
                     "chart opening for an unknown encounter '" + std::string(fields[col[0]]) + "'");
            }
            TimestampNote note;
            auto at = parse_timestamp(fields[col[1]], zone, &note);
            if (!at)
                fail(col[1], "opened_at", "bad timestamp in opened_at",
                     "expected a timestamp such as 2026-03-03T19:05:00Z, 2026-03-03T20:05:00+01:00 or "
                     "2026-03-03 20:05:00 (local time), found '" + std::string(fields[col[1]]) + "'");
            const std::string_view role = fields[col[2]];
            const std::size_t r = role_index(roles, role);
            if (r == roles.size()) {
                text(col[2], "role");
                fail(col[2], "role", "role not declared in chart_openings.roles",
                     "role '" + std::string(role) + "' is not declared in chart_openings.roles (declared: " +
                         declared_roles(roles) + ")");
            }
            if (note.mapping == LocalMapping::ambiguous_took_earlier)
                ++log.notes["local time in a repeated hour (daylight saving ended): earlier instant taken"];
            else if (note.mapping == LocalMapping::nonexistent_moved_forward)
                ++log.notes["local time in a skipped hour (daylight saving began): moved forward"];
            const Encounter& enc = pop.encounters[it->second];
            if (*at < enc.admitted) { ++before_admission; continue; }
            if (enc.outcome_at && *at >= *enc.outcome_at) { ++after_outcome; continue; }
            if (*at >= enc.discharged) { ++after_discharge; continue; }
            openings.push_back({*at, static_cast<std::uint8_t>(r)});
            owner.push_back(it->second);
        } catch (const BadRow& bad) {
            if (bad_rows == BadRows::stop) throw bad.error;
            log.rows_skipped[std::filesystem::path(path).filename().string() + ": " + bad.reason].add(bad.error.line);
        }
    }
    group_by_encounter(openings, owner, pop.encounters.size(), log);
    if (before_admission) log.excluded_by_reason["opened before admission"] = before_admission;
    if (after_outcome) log.excluded_by_reason["opened at or after the outcome (time zero)"] = after_outcome;
    if (after_discharge) log.excluded_by_reason["opened at or after discharge"] = after_discharge;
    return log;
}

void generate_chart_openings(const std::vector<ChartOpeningRole>& roles, const Encounter& enc,
                             std::uint64_t encounter_index, const TimeZone& zone, ReplicationSeed draws,
                             std::vector<ChartOpening>& out) {
    const std::size_t first = out.size();
    const Instant end = Population::usable_until(enc);
    for (std::size_t r = 0; r < roles.size(); ++r) {
        SplitMixEngine stream = make_short_stream(draws, StreamPurpose::chart_openings,
                                                  entity_key({encounter_index, text_entity(roles[r].name)}));
        hourly_poisson_arrivals(roles[r].openings_per_hour, zone, enc.admitted, end, stream,
                                [&](Instant at) { out.push_back({at, static_cast<std::uint8_t>(r)}); });
    }
    std::stable_sort(out.begin() + static_cast<std::ptrdiff_t>(first), out.end(),
                     [](const ChartOpening& a, const ChartOpening& b) { return a.at < b.at; });
}

double hourly_rate_integral(const std::array<double, 24>& per_hour, const TimeZone& zone, Instant from, Instant to) {
    double total = 0;
    for (Instant t = from; t < to;) {
        const Instant local = zone.to_local_seconds(t);
        const Instant into_hour = ((local % 3600) + 3600) % 3600;
        const Instant until = std::min(to, t + (3600 - into_hour));
        total += per_hour[static_cast<std::size_t>(local_hour(zone, t))] * static_cast<double>(until - t) / 3600.0;
        t = until;
    }
    return total;
}

double expected_chart_openings(const ChartOpeningRole& role, const TimeZone& zone, Instant from, Instant to) {
    return hourly_rate_integral(role.openings_per_hour, zone, from, to);
}

}  // namespace tocsin
