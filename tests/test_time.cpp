// Instants, zones and shifts. Expected values are worked out by hand from the
// calendar and the published US daylight-saving dates for 2026 (second Sunday
// of March, first Sunday of November, at 02:00 local).
#include <doctest/doctest.h>

#include "models/time.hpp"
#include "sim/shifts.hpp"

using namespace tocsin;

TEST_CASE("time.civil_days") {
    CHECK(days_from_civil(1970, 1, 1) == 0);
    CHECK(days_from_civil(2000, 3, 1) == 11017);  // 30 years * 365 + 7 leap days + Jan + Feb 2000 (31 + 29)
    CHECK(weekday_from_days(days_from_civil(2026, 12, 1)) == 1);  // 1 December 2026 is a Tuesday
    const CivilTime c = civil_from_instant(days_from_civil(2024, 2, 29) * 86400 + 3661);
    CHECK(c.year == 2024);
    CHECK(c.month == 2);
    CHECK(c.day == 29);
    CHECK(c.hour == 1);
    CHECK(c.minute == 1);
    CHECK(c.second == 1);
}

TEST_CASE("time.parse_forms") {
    const TimeZone utc = TimeZone::utc();
    const Instant t = days_from_civil(2026, 3, 3) * 86400 + 19 * 3600 + 5 * 60;
    CHECK(parse_timestamp("2026-03-03T19:05:00Z", utc) == t);
    CHECK(parse_timestamp("2026-03-03T20:05:00+01:00", utc) == t);
    CHECK(parse_timestamp("2026-03-03T14:05:00-0500", utc) == t);
    CHECK(parse_timestamp("2026-03-03 19:05:00", utc) == t);
    CHECK(parse_timestamp("2026-03-03T19:05:00.750Z", utc) == t);  // fractions truncated
    CHECK_FALSE(parse_timestamp("2026-02-30T19:05:00Z", utc));    // no such date
    CHECK_FALSE(parse_timestamp("2026-03-03T24:00:00Z", utc));
    CHECK_FALSE(parse_timestamp("03/03/2026 19:05", utc));
    CHECK_FALSE(parse_timestamp("2026-03-03T19:05:00Q", utc));
    CHECK_FALSE(parse_timestamp("", utc));
}

TEST_CASE("time.daylight_saving") {
    const TimeZone chicago = TimeZone::load("America/Chicago");
    TimestampNote note;
    SUBCASE("repeated hour: the earlier instant is taken and noted") {
        // 1 Nov 2026 01:30 happens at 06:30Z (CDT, -5) and again at 07:30Z (CST, -6).
        auto t = parse_timestamp("2026-11-01 01:30:00", chicago, &note);
        CHECK(t == days_from_civil(2026, 11, 1) * 86400 + 6 * 3600 + 1800);
        CHECK(note.mapping == LocalMapping::ambiguous_took_earlier);
    }
    SUBCASE("skipped hour: moved forward by the gap and noted") {
        // 8 Mar 2026 02:30 does not exist; read with the CST offset (-6) it is
        // 08:30Z, which the wall clock shows as 03:30 CDT.
        auto t = parse_timestamp("2026-03-08 02:30:00", chicago, &note);
        CHECK(t == days_from_civil(2026, 3, 8) * 86400 + 8 * 3600 + 1800);
        CHECK(note.mapping == LocalMapping::nonexistent_moved_forward);
    }
    SUBCASE("ordinary local time") {
        auto t = parse_timestamp("2026-07-01 12:00:00", chicago, &note);
        CHECK(t == days_from_civil(2026, 7, 1) * 86400 + 17 * 3600);
        CHECK(note.mapping == LocalMapping::unique);
    }
    CHECK(format_local(days_from_civil(2026, 7, 1) * 86400 + 17 * 3600, chicago) == "2026-07-01T12:00:00-05:00");
    CHECK_THROWS(TimeZone::load("Mars/Olympus_Mons"));
}

TEST_CASE("time.shifts_across_daylight_saving") {
    // Night shifts start 19:00 local. The night of 31 Oct 2026 runs 19:00 CDT
    // (00:00Z 1 Nov) to 07:00 CST (13:00Z 1 Nov): 13 hours. The night of
    // 7 Mar 2026 runs 19:00 CST (01:00Z) to 07:00 CDT (12:00Z): 11 hours.
    const TimeZone chicago = TimeZone::load("America/Chicago");
    const ShiftPattern pattern{{7 * 60, 19 * 60}, {"day", "night"}, {false, true}};
    const Instant nov1 = days_from_civil(2026, 11, 1) * 86400;
    ShiftCalendar cal(pattern, chicago, nov1 - days(2), nov1 + days(2));
    const std::size_t k = cal.index_of(nov1 + hours(3));
    CHECK(cal.is_night(k));
    CHECK(cal.shifts()[k].start == nov1);
    CHECK(cal.shifts()[k].end - cal.shifts()[k].start == hours(13));
    const Instant mar8 = days_from_civil(2026, 3, 8) * 86400;
    ShiftCalendar spring(pattern, chicago, mar8 - days(2), mar8 + days(2));
    const std::size_t j = spring.index_of(mar8 + hours(3));
    CHECK(spring.shifts()[j].start == mar8 + hours(1));
    CHECK(spring.shifts()[j].end - spring.shifts()[j].start == hours(11));
    // Shifts tile time with no gap or overlap.
    for (std::size_t i = 1; i < cal.size(); ++i) CHECK(cal.shifts()[i].start == cal.shifts()[i - 1].end);
}
