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
    CHECK(parse_timestamp("2026-03-03T19:05:30+00:00:30", utc) == t);
    CHECK_FALSE(parse_timestamp("2026-03-03T19:05:30+00:00:", utc));
    CHECK_FALSE(parse_timestamp("2026-03-03T19:05:30+00:00:60", utc));
}

TEST_CASE("time.local_mean_time_offsets_keep_their_seconds") {
    // London kept local mean time, 0:01:15 behind Greenwich, until 1847
    // (tz database, europe file: "Europe/London -0:01:15 - LMT 1847 Dec 1").
    // 18:05:00Z on 3 January 1013 showed 18:03:45 there; found by fuzzing.
    const TimeZone london = TimeZone::load("Europe/London");
    const Instant t = days_from_civil(1013, 1, 3) * 86400 + 18 * 3600 + 5 * 60;
    CHECK(format_local(t, london) == "1013-01-03T18:03:45-00:01:15");
    CHECK(parse_timestamp(format_local(t, london), TimeZone::utc()) == t);
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

// After the zone table ends (Debian's files stop in 2037) the footer rule of a
// TZif version 2+ file applies (RFC 8536 section 3.3). Dates below are worked
// from the 2040 calendar: 1 March 2040 is a Thursday, 1 October a Monday,
// 1 November a Thursday, 1 April 2041 a Monday.
TEST_CASE("time.footer_rule_after_the_table") {
    const TimeZone chicago = TimeZone::load("America/Chicago");
    TimestampNote note;
    // US rule CST6CDT,M3.2.0,M11.1.0: CDT from 11 March 2040 02:00 CST to
    // 4 November 2040 02:00 CDT. Noon on 1 July is CDT (-5): 17:00Z.
    CHECK(parse_timestamp("2040-07-01 12:00:00", chicago, &note) == days_from_civil(2040, 7, 1) * 86400 + 17 * 3600);
    CHECK(note.mapping == LocalMapping::unique);
    CHECK(format_local(days_from_civil(2040, 7, 1) * 86400 + 17 * 3600, chicago) == "2040-07-01T12:00:00-05:00");
    CHECK(chicago.offset_at(days_from_civil(2040, 3, 11) * 86400 + 8 * 3600 - 1) == -6 * 3600);
    CHECK(chicago.offset_at(days_from_civil(2040, 3, 11) * 86400 + 8 * 3600) == -5 * 3600);
    CHECK(chicago.offset_at(days_from_civil(2040, 11, 4) * 86400 + 7 * 3600 - 1) == -5 * 3600);
    CHECK(chicago.offset_at(days_from_civil(2040, 11, 4) * 86400 + 7 * 3600) == -6 * 3600);
    // The existing gap and overlap handling carries over to the rule.
    CHECK(parse_timestamp("2040-03-11 02:30:00", chicago, &note) == days_from_civil(2040, 3, 11) * 86400 + 8 * 3600 + 1800);
    CHECK(note.mapping == LocalMapping::nonexistent_moved_forward);
    CHECK(parse_timestamp("2040-11-04 01:30:00", chicago, &note) == days_from_civil(2040, 11, 4) * 86400 + 6 * 3600 + 1800);
    CHECK(note.mapping == LocalMapping::ambiguous_took_earlier);
    CHECK(chicago.covered_until() == INT64_MAX);

    // Southern hemisphere, AEST-10AEDT,M10.1.0,M4.1.0/3: AEDT from 7 October
    // 2040 02:00 AEST (6 Oct 16:00Z) to 7 April 2041 03:00 AEDT (6 Apr 16:00Z).
    const TimeZone sydney = TimeZone::load("Australia/Sydney");
    CHECK(sydney.offset_at(days_from_civil(2040, 7, 1) * 86400) == 10 * 3600);
    CHECK(sydney.offset_at(days_from_civil(2040, 10, 6) * 86400 + 16 * 3600 - 1) == 10 * 3600);
    CHECK(sydney.offset_at(days_from_civil(2040, 10, 6) * 86400 + 16 * 3600) == 11 * 3600);
    CHECK(sydney.offset_at(days_from_civil(2041, 1, 15) * 86400) == 11 * 3600);
    CHECK(sydney.offset_at(days_from_civil(2041, 4, 6) * 86400 + 16 * 3600 - 1) == 11 * 3600);
    CHECK(sydney.offset_at(days_from_civil(2041, 4, 6) * 86400 + 16 * 3600) == 10 * 3600);
}

TEST_CASE("time.posix_rule_forms") {
    const auto zone = [](const char* tz) {
        auto z = TimeZone::from_posix_rule(tz);
        REQUIRE(z);
        return *z;
    };
    const auto at = [](int y, int m, int d, int h) { return days_from_civil(y, m, d) * 86400 + Instant{h} * 3600; };
    SUBCASE("RFC 8536 3.3.1: daylight time all year, 0/0,J365/25") {
        const TimeZone z = zone("EST5EDT,0/0,J365/25");
        for (Instant t : {at(2040, 1, 1, 0), at(2040, 1, 1, 5), at(2040, 7, 1, 12), at(2040, 12, 31, 23), at(2041, 1, 1, 4)})
            CHECK(z.offset_at(t) == -4 * 3600);
    }
    SUBCASE("RFC 8536 3.3.1: hours past 24, IST-2IDT,M3.4.4/26,M10.5.0") {
        // Fourth Thursday of March 2040 is the 22nd; 26:00 is Friday 23rd
        // 02:00 IST (+2) = 00:00Z. Last Sunday of October is the 28th, 02:00
        // IDT (+3) = 27th 23:00Z.
        const TimeZone z = zone("IST-2IDT,M3.4.4/26,M10.5.0");
        CHECK(z.offset_at(at(2040, 3, 23, 0) - 1) == 2 * 3600);
        CHECK(z.offset_at(at(2040, 3, 23, 0)) == 3 * 3600);
        CHECK(z.offset_at(at(2040, 10, 27, 23) - 1) == 3 * 3600);
        CHECK(z.offset_at(at(2040, 10, 27, 23)) == 2 * 3600);
    }
    SUBCASE("RFC 8536 3.3.1: negative hours, <-03>3<-02>,M3.5.0/-2,M10.5.0/-1") {
        // Last Sunday of March 2040 is the 25th; -2:00 is Saturday 22:00 at
        // -03 = 25th 01:00Z. Last Sunday of October, the 28th, at -1:00 is
        // Saturday 23:00 at -02 = 28th 01:00Z.
        const TimeZone z = zone("<-03>3<-02>,M3.5.0/-2,M10.5.0/-1");
        CHECK(z.offset_at(at(2040, 3, 25, 1) - 1) == -3 * 3600);
        CHECK(z.offset_at(at(2040, 3, 25, 1)) == -2 * 3600);
        CHECK(z.offset_at(at(2040, 10, 28, 1) - 1) == -2 * 3600);
        CHECK(z.offset_at(at(2040, 10, 28, 1)) == -3 * 3600);
    }
    SUBCASE("Jn never counts 29 February; n does") {
        // POSIX: J60 is 1 March in every year; 59 is 29 February in a leap
        // year and 1 March otherwise. Changes at 02:00 standard (+0).
        const TimeZone j = zone("AAA0BBB,J60,J300");
        CHECK(j.offset_at(at(2040, 3, 1, 2) - 1) == 0);
        CHECK(j.offset_at(at(2040, 3, 1, 2)) == 3600);
        const TimeZone n = zone("AAA0BBB,59,300");
        CHECK(n.offset_at(at(2040, 2, 29, 2) - 1) == 0);
        CHECK(n.offset_at(at(2040, 2, 29, 2)) == 3600);
        CHECK(n.offset_at(at(2041, 3, 1, 2) - 1) == 0);
        CHECK(n.offset_at(at(2041, 3, 1, 2)) == 3600);
    }
    SUBCASE("a standard-time break shorter than two days") {
        // AAA0BBB,J61/2,J60/1: daylight time (+1) ends on 1 March at 01:00
        // daylight (00:00Z) and starts again on 2 March at 02:00 standard
        // (02:00Z). Noon on 1 March is standard time, 12:00Z, although the
        // offsets a day either side are both daylight time.
        const TimeZone z = zone("AAA0BBB,J61/2,J60/1");
        LocalMapping mapping{};
        CHECK(z.from_local({2041, 3, 1, 12, 0, 0}, &mapping) == at(2041, 3, 1, 12));
        CHECK(mapping == LocalMapping::unique);
        // 00:30 on 1 March is shown twice: 23:30Z the day before, then 00:30Z.
        CHECK(z.from_local({2041, 3, 1, 0, 30, 0}, &mapping) == at(2041, 2, 28, 23) + 1800);
        CHECK(mapping == LocalMapping::ambiguous_took_earlier);
        // 02:30 on 2 March is skipped; read at the standard offset it is 02:30Z.
        CHECK(z.from_local({2041, 3, 2, 2, 30, 0}, &mapping) == at(2041, 3, 2, 2) + 1800);
        CHECK(mapping == LocalMapping::nonexistent_moved_forward);
    }
    SUBCASE("one hour of daylight time a year") {
        // EST5EDT,0/0,J1: daylight time starts 1 January at 00:00 EST (05:00Z)
        // and ends the same day at 02:00 EDT (06:00Z). 00:30 is skipped; 01:30
        // is shown at 05:30Z (EDT) and again at 06:30Z (EST). Found by fuzzing.
        const TimeZone z = zone("EST5EDT,0/0,J1");
        LocalMapping mapping{};
        CHECK(z.from_local({2050, 1, 1, 1, 30, 0}, &mapping) == at(2050, 1, 1, 5) + 1800);
        CHECK(mapping == LocalMapping::ambiguous_took_earlier);
        CHECK(z.from_local({2050, 1, 1, 0, 30, 0}, &mapping) == at(2050, 1, 1, 5) + 1800);
        CHECK(mapping == LocalMapping::nonexistent_moved_forward);
        CHECK(z.from_local({2050, 1, 1, 2, 30, 0}, &mapping) == at(2050, 1, 1, 7) + 1800);
        CHECK(mapping == LocalMapping::unique);
    }
    SUBCASE("offsets with minutes, and standard time only") {
        CHECK(zone("<+0545>-5:45").offset_at(at(2044, 6, 1, 0)) == 5 * 3600 + 45 * 60);
        CHECK(zone("JST-9").offset_at(at(2044, 6, 1, 0)) == 9 * 3600);
        CHECK(zone("AAA-23:59:59").offset_at(at(2044, 6, 1, 0)) == 86399);
        // Daylight offset given explicitly: Lord Howe's half-hour shift.
        const TimeZone lh = zone("<+1030>-10:30<+11>-11,M10.1.0,M4.1.0");
        CHECK(lh.offset_at(at(2041, 1, 15, 0)) == 11 * 3600);
        CHECK(lh.offset_at(at(2041, 7, 15, 0)) == 10 * 3600 + 1800);
    }
    SUBCASE("not TZ strings") {
        for (const char* bad : {"", "EST", "ES5", "EST25", "EST5EDT", "EST5EDT,M3.2.0", "EST5EDT,M13.1.0,M11.1.0",
                                "EST5EDT,M3.6.0,M11.1.0", "EST5EDT,M3.2.7,M11.1.0", "EST5EDT,J0,J365",
                                "EST5EDT,M3.2.0/168,M11.1.0", "EST5EDT,366,0", "<AB>5", "EST5EDT,M3.2.0,M11.1.0x",
                                // A day or more from UTC has no ISO 8601 offset; the
                                // daylight offset defaults to an hour past +23 here.
                                "AAA-24", "IST-23IDT,M3.5.5/16,M10.5.0"}) {
            CAPTURE(bad);
            CHECK_FALSE(PosixTzRule::parse(bad));
        }
    }
}

TEST_CASE("time.date_cache_reads_as_without_it") {
    // Every 10 minutes over the days around both of a year's changes, in
    // zones with and without daylight saving, and with offsets written out:
    // the reader's date cache (one per reader, reused row after row) must
    // give the same instant and the same note as reading each text afresh.
    for (const char* name : {"UTC", "Europe/London", "America/Chicago", "Australia/Lord_Howe"}) {
        const TimeZone zone = std::string(name) == "UTC" ? TimeZone::utc() : TimeZone::load(name);
        TimestampCache cache;
        int compared = 0;
        for (int month : {3, 4, 10, 11}) {
            const Instant from = days_from_civil(2026, month, 1) * 86400;
            for (Instant t = from; t < from + 8 * 86400; t += 600) {
                const CivilTime c = civil_from_instant(t);
                char text[40];
                for (const char* suffix : {"", "Z", "+01:00"}) {
                    std::snprintf(text, sizeof text, "%04d-%02d-%02d %02d:%02d:%02d%s", c.year, c.month, c.day, c.hour,
                                  c.minute, c.second, suffix);
                    TimestampNote plain, cached;
                    const auto a = parse_timestamp(text, zone, &plain);
                    const auto b = parse_timestamp(text, zone, &cached, &cache);
                    REQUIRE(a.has_value());
                    CHECK(a == b);
                    CHECK(plain.mapping == cached.mapping);
                    ++compared;
                }
            }
        }
        CHECK(compared == 4 * 8 * 144 * 3);
    }
    // A bad date is never remembered as good, nor a good one spoilt by a bad time.
    TimestampCache cache;
    CHECK(parse_timestamp("2026-02-30 10:00:00", TimeZone::utc(), nullptr, &cache) == std::nullopt);
    CHECK(parse_timestamp("2026-02-28 25:00:00", TimeZone::utc(), nullptr, &cache) == std::nullopt);
    CHECK(parse_timestamp("2026-02-28 10:00:00", TimeZone::utc(), nullptr, &cache) == days_from_civil(2026, 2, 28) * 86400 + 36000);
    CHECK(parse_timestamp("2026-02-29 10:00:00", TimeZone::utc(), nullptr, &cache) == std::nullopt);
}
