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

// A POSIX TZ string as RFC 8536 (section 3.3) puts in the footer of a TZif
// version 2+ file: the rule for every instant after the zone's table ends.
// Offsets are seconds east of UTC (the string itself counts west).
struct PosixTzRule {
    struct Date {
        enum class Kind { julian_no_leap, zero_based, month_week_day } kind = Kind::month_week_day;
        int day = 0;          // Jn: 1..365; n: 0..365; Mm.w.d: d, 0 = Sunday
        int month = 0, week = 0;
        Seconds time = 7200;  // local time of day of the change, -167h..167h (RFC 8536 3.3.1)
    };
    std::int32_t std_offset = 0;
    bool has_dst = false;
    std::int32_t dst_offset = 0;
    Date dst_start, dst_end;  // start read in standard time, end in daylight time

    // Nothing when `text` is not a TZ string; a daylight name without rules is
    // refused, since POSIX leaves its dates to the implementation.
    static std::optional<PosixTzRule> parse(std::string_view text);
    std::int32_t offset_at(Instant utc) const;
};

// How a local wall-clock time maps to UTC across daylight-saving changes.
enum class LocalMapping { unique, ambiguous_took_earlier, nonexistent_moved_forward };

class TimeZone {
public:
    // Loads /usr/share/zoneinfo/<name> (or $TZDIR/<name>). Throws std::runtime_error
    // with the zone name when it is unknown or unreadable.
    static TimeZone load(const std::string& name);
    static TimeZone utc();
    // A zone given only by a POSIX TZ string (no table), or nothing when the
    // string does not parse.
    static std::optional<TimeZone> from_posix_rule(std::string_view tz);

    const std::string& name() const { return name_; }
    // Offset of local time from UTC, in seconds, at a UTC instant.
    std::int32_t offset_at(Instant utc) const;
    Instant to_local_seconds(Instant utc) const { return utc + offset_at(utc); }
    CivilTime to_local(Instant utc) const { return civil_from_instant(to_local_seconds(utc)); }
    // Local wall-clock time -> UTC. In the repeated hour when clocks go back the
    // earlier instant is taken; in the skipped hour when clocks go forward the
    // time is moved forward by the size of the gap. `mapping` says which happened.
    Instant from_local(const CivilTime& local, LocalMapping* mapping = nullptr) const;
    // The offset in force over all of [from, to] when it does not change
    // there (so every local time whose instant lies there maps to one instant,
    // local - offset); nothing when it changes or may (a daylight-saving
    // footer rule governs part of it).
    std::optional<std::int32_t> steady_offset(Instant from, Instant to) const;
    // Last instant whose offset is known: the end of the table for a zone
    // whose file has no footer rule (TZif version 1), otherwise unbounded.
    Instant covered_until() const { return covered_until_; }

private:
    std::string name_;
    std::vector<Instant> transitions_;      // UTC instants, ascending
    std::vector<std::int32_t> offsets_;     // offset in force from transitions_[i]
    std::int32_t initial_offset_ = 0;       // offset before the first transition
    Instant covered_until_ = INT64_MAX;
    std::optional<PosixTzRule> rule_;       // in force from the last transition on
};

struct TimestampNote {
    LocalMapping mapping = LocalMapping::unique;
};

// What parse_timestamp remembers of the last date it read, for a reader that
// calls it for millions of rows of which one day's share a date: the date's
// days since the epoch, checked once, and whether the zone's offset is steady
// over that local day (then a local time is date + time - offset, without a
// search of the zone's changes). One per reader (per thread); never shared.
struct TimestampCache {
    char date[10] = {};
    bool valid = false;
    std::int64_t days = 0;
    std::optional<std::int32_t> steady_offset;
    const TimeZone* zone = nullptr;
};

// Parses "YYYY-MM-DDTHH:MM:SS" or "YYYY-MM-DD HH:MM:SS", optionally with
// fractional seconds (truncated), followed by "Z", "+HH:MM", "-HH:MM", "+HHMM",
// "+HH:MM:SS" or nothing (then read in `zone`). Returns nothing when the text is not such
// a timestamp or names an impossible date.
std::optional<Instant> parse_timestamp(std::string_view text, const TimeZone& zone,
                                       TimestampNote* note = nullptr, TimestampCache* cache = nullptr);

// "HH:MM" -> minutes after local midnight, or nothing.
std::optional<int> parse_clock_minutes(std::string_view text);

std::string format_utc(Instant at);                          // 2026-03-03T19:00:00Z
std::string format_local(Instant at, const TimeZone& zone);  // 2026-03-03T19:00:00+01:00 (+HH:MM:SS if needed)
std::string format_clock_minutes(int minutes_after_midnight);  // 07:30

}  // namespace tocsin
