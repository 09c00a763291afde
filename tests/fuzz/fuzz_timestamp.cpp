// Timestamp parsing with zones (models/time.hpp). The first byte picks a zone
// (system zones with and without daylight saving, past their tables too, or a
// POSIX TZ string taken from the rest of the input, RFC 8536 section 3.3);
// the rest is the text parsed. Properties:
//  - a parsed instant formatted in UTC, and in the zone with its offset,
//    parses back to the same instant (in any zone);
//  - a naive local time read in the zone shows the same wall clock when the
//    instant is turned back to local time, unless it fell in a skipped hour;
//    then it is moved forward by the gap, no more (the clock shows a later
//    time, and reading that time gives the same instant back);
//  - the same text with "Z" reads as the wall clock taken as UTC.
#include <array>
#include <cstdint>
#include <optional>
#include <string>

#include "fuzz_support.hpp"
#include "models/time.hpp"

using namespace tocsin;
using tocsin::fuzz::broken;

namespace {

const std::array<TimeZone, 8>& zones() {
    // Loaded once per process: reading TZif files per input would dominate.
    static const std::array<TimeZone, 8> z{TimeZone::utc(),
                                           TimeZone::load("America/Chicago"),
                                           TimeZone::load("Europe/London"),
                                           TimeZone::load("Australia/Sydney"),
                                           TimeZone::load("Asia/Tokyo"),
                                           TimeZone::load("America/Nuuk"),
                                           TimeZone::load("Asia/Jerusalem"),
                                           TimeZone::load("Australia/Lord_Howe")};
    return z;
}

Instant wall_seconds(const CivilTime& c) {
    return days_from_civil(c.year, c.month, c.day) * 86400 + c.hour * 3600 + c.minute * 60 + c.second;
}

// The reader's date cache changes nothing: the text read with a fresh cache,
// and again with the cache the first reading left, as without one.
void check_cached(const std::string& text, const TimeZone& zone, const std::optional<Instant>& t,
                  const TimestampNote& note) {
    TimestampCache cache;
    for (int pass = 0; pass < 2; ++pass) {
        TimestampNote cached_note;
        const std::optional<Instant> cached = parse_timestamp(text, zone, &cached_note, &cache);
        if (cached != t || (t && cached_note.mapping != note.mapping))
            broken("'" + text + "' in " + zone.name() + ": read differently through the date cache (pass " +
                   std::to_string(pass + 1) + ")");
    }
}

void check(const std::string& text, const TimeZone& zone) {
    TimestampNote note;
    const std::optional<Instant> t = parse_timestamp(text, zone, &note);
    check_cached(text, zone, t, note);
    if (!t) return;
    const std::string where = "'" + text + "' in " + zone.name();
    const std::string utc = format_utc(*t);
    for (const TimeZone* other : {&zone, &zones()[0], &zones()[1]}) {
        if (parse_timestamp(utc, *other) != t) broken(where + ": format_utc gives " + utc + ", which reads differently");
    }
    const std::string local = format_local(*t, zone);
    if (parse_timestamp(local, zones()[3]) != t) broken(where + ": format_local gives " + local + ", which reads differently");

    const bool naive = text.find_first_of("Z+-", 19) == std::string::npos;
    if (!naive) return;
    const CivilTime wall{std::stoi(text.substr(0, 4)), std::stoi(text.substr(5, 2)), std::stoi(text.substr(8, 2)),
                         std::stoi(text.substr(11, 2)), std::stoi(text.substr(14, 2)), std::stoi(text.substr(17, 2))};
    const Instant asked = wall_seconds(wall), shown = zone.to_local_seconds(*t);
    if (parse_timestamp(text.substr(0, 19) + "Z", zone) != asked) broken(where + ": with Z it is not the wall clock as UTC");
    if (note.mapping == LocalMapping::nonexistent_moved_forward) {
        // Moved by the gap means read with the offset in force before the
        // change that skipped it: t = asked - that offset, which the zone had
        // shortly before t (within a day; two changes may lie close together).
        const Seconds before = asked - *t;
        bool had_it = zone.offset_at(*t - 1) == before;
        for (Seconds d = 0; d <= 86400 && !had_it; d += 1800) had_it = zone.offset_at(*t - (shown - asked) - 1 - d) == before;
        if (shown <= asked || !had_it)
            broken(where + ": a skipped time moved to " + format_local(*t, zone) + ", not forward by the gap");
        TimestampNote again;
        if (zone.from_local(civil_from_instant(shown), &again.mapping) != *t || again.mapping == LocalMapping::nonexistent_moved_forward)
            broken(where + ": the time it moved to, " + format_local(*t, zone) + ", does not read back");
    } else if (shown != asked) {
        broken(where + ": read as " + utc + ", which the zone shows as " + format_local(*t, zone));
    } else if (note.mapping == LocalMapping::ambiguous_took_earlier) {
        // The later reading exists: asked - o for an offset o in force within
        // two days after t (offsets need not be whole minutes). Each offset is
        // under a day, so the two readings lie less than two days apart: a
        // rule whose daylight time is 43.5 hours behind standard time repeats
        // 43.5 hours of wall clock.
        bool later = false;
        for (Seconds d = 0; d <= 2 * 86400 && !later; d += 1800) {
            const Instant u = asked - zone.offset_at(*t + d);
            later = u > *t && zone.to_local_seconds(u) == asked;
        }
        if (!later) broken(where + ": noted as a repeated time but shown only once");
    }
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    if (size == 0) return 0;
    const std::string rest(reinterpret_cast<const char*>(data) + 1, size - 1);
    const unsigned pick = data[0] % 16;
    if (pick < zones().size()) {
        check(rest, zones()[pick]);
        return 0;
    }
    // A POSIX TZ string, then (after a newline) the text to parse in it.
    const std::size_t newline = rest.find('\n');
    const auto zone = TimeZone::from_posix_rule(rest.substr(0, newline));
    if (!zone) return 0;
    if (newline != std::string::npos) check(rest.substr(newline + 1), *zone);
    // Offsets around each change of a year the rule governs are the rule's
    // two offsets only, and local -> UTC -> local holds across the year.
    const Instant year = days_from_civil(2040 + static_cast<int>(pick), 1, 1) * 86400;
    for (Instant t = year; t < year + days(366); t += hours(29)) {
        const CivilTime c = civil_from_instant(t);
        char text[32];
        std::snprintf(text, sizeof text, "%04d-%02d-%02d %02d:%02d:%02d", c.year, c.month, c.day, c.hour, c.minute, c.second);
        check(text, *zone);
    }
    return 0;
}
