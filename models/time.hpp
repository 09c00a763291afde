#pragma once
// Time in tocsin: instants are integer seconds since the Unix epoch (UTC);
// wall-clock rules use the scenario's IANA time zone, read from the system's
// compiled zone files (TZif) so that no process-global TZ setting is touched.
#include <cstdint>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace tocsin {

using Instant = std::int64_t;  // seconds since 1970-01-01T00:00:00Z
using Seconds = std::int64_t;  // a duration in seconds

constexpr Seconds minutes(std::int64_t m) { return m * 60; }
constexpr Seconds hours(std::int64_t h) { return h * 3600; }
constexpr Seconds days(std::int64_t d) { return d * 86400; }

struct CivilTime {
    int year = 1970, month = 1, day = 1, hour = 0, minute = 0, second = 0;
};

// Proleptic Gregorian calendar day count (H. Hinnant's public-domain algorithms).
std::int64_t days_from_civil(int year, int month, int day);
CivilTime civil_from_instant(Instant utc_seconds);  // in UTC
int weekday_from_days(std::int64_t days);           // 0 = Monday ... 6 = Sunday

// How a local wall-clock time maps to UTC across daylight-saving changes.
enum class LocalMapping { unique, ambiguous_took_earlier, nonexistent_moved_forward };

class TimeZone {
public:
    // Loads /usr/share/zoneinfo/<name> (or $TZDIR/<name>). Throws std::runtime_error
    // with the zone name when it is unknown or unreadable.
    static TimeZone load(const std::string& name);
    static TimeZone utc();

    const std::string& name() const { return name_; }
    // Offset of local time from UTC, in seconds, at a UTC instant.
    std::int32_t offset_at(Instant utc) const;
    Instant to_local_seconds(Instant utc) const { return utc + offset_at(utc); }
    CivilTime to_local(Instant utc) const { return civil_from_instant(to_local_seconds(utc)); }
    // Local wall-clock time -> UTC. In the repeated hour when clocks go back the
    // earlier instant is taken; in the skipped hour when clocks go forward the
    // time is moved forward by the size of the gap. `mapping` says which happened.
    Instant from_local(const CivilTime& local, LocalMapping* mapping = nullptr) const;
    // Last instant the zone's table covers; rules past it are not known.
    Instant covered_until() const { return covered_until_; }

private:
    std::string name_;
    std::vector<Instant> transitions_;      // UTC instants, ascending
    std::vector<std::int32_t> offsets_;     // offset in force from transitions_[i]
    std::int32_t initial_offset_ = 0;       // offset before the first transition
    Instant covered_until_ = INT64_MAX;
};

struct TimestampNote {
    LocalMapping mapping = LocalMapping::unique;
};

// Parses "YYYY-MM-DDTHH:MM:SS" or "YYYY-MM-DD HH:MM:SS", optionally with
// fractional seconds (truncated), followed by "Z", "+HH:MM", "-HH:MM", "+HHMM"
// or nothing (then read in `zone`). Returns nothing when the text is not such
// a timestamp or names an impossible date.
std::optional<Instant> parse_timestamp(std::string_view text, const TimeZone& zone,
                                       TimestampNote* note = nullptr);

// "HH:MM" -> minutes after local midnight, or nothing.
std::optional<int> parse_clock_minutes(std::string_view text);

std::string format_utc(Instant at);                          // 2026-03-03T19:00:00Z
std::string format_local(Instant at, const TimeZone& zone);  // 2026-03-03T19:00:00+01:00
std::string format_clock_minutes(int minutes_after_midnight);  // 07:30

}  // namespace tocsin
