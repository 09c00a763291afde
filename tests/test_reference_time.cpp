// Zone offsets after the zone table ends (2038-2045, where the TZif footer
// rule of RFC 8536 section 3.3 applies), checked both ways against Python's
// zoneinfo (PEP 615) on the same system zone files: UTC -> offset at every
// half hour, and naive local time -> UTC at every half hour of wall clock,
// which crosses every daylight-saving gap and overlap in those years.
#include <doctest/doctest.h>

#include <sstream>

#include "models/time.hpp"
#include "test_support.hpp"

using namespace tocsin;
using namespace tocsin::testing;

TEST_CASE("reference.zone_rule_matches_python_zoneinfo") {
    if (run_command("/usr/bin/python3 -c 'import zoneinfo'").exit_code != 0) {
        MESSAGE("SKIPPED: /usr/bin/python3 has no zoneinfo module (Python 3.9 or later)");
        return;
    }
    const Instant start = days_from_civil(2038, 1, 1) * 86400;
    const Seconds step = 1800;
    const long count = static_cast<long>((days_from_civil(2046, 1, 1) * 86400 - start) / step);
    // Northern and southern hemisphere, no daylight saving now (Tokyo, Sao
    // Paulo), negative change times (Nuuk), hours past 24 (Jerusalem) and a
    // half-hour shift (Lord Howe).
    for (const char* name : {"America/Chicago", "Europe/London", "Australia/Sydney", "Asia/Tokyo", "America/Sao_Paulo",
                             "America/Nuuk", "Asia/Jerusalem", "Australia/Lord_Howe"}) {
        CAPTURE(name);
        const TimeZone zone = TimeZone::load(name);
        const auto r = run_command("/usr/bin/python3 " + std::string(TOCSIN_SOURCE_DIR) +
                                   "/tests/reference/zone_offsets.py " + name + " " + std::to_string(start) + " " +
                                   std::to_string(step) + " " + std::to_string(count));
        REQUIRE(r.exit_code == 0);
        std::istringstream out(r.output);
        long offset_mismatches = 0, local_mismatches = 0, changes = 0;
        std::int32_t previous = 0;
        for (long k = 0; k < count; ++k) {
            long long offset = 0, utc = 0;
            if (!(out >> offset >> utc)) FAIL("zone_offsets.py printed " << k << " lines, expected " << count);
            const Instant t = start + k * step;
            const std::int32_t ours = zone.offset_at(t);
            if (ours != offset && offset_mismatches++ < 3) CHECK_MESSAGE(ours == offset, "offset at " << format_utc(t));
            const Instant local = zone.from_local(civil_from_instant(t));
            if (local != utc && local_mismatches++ < 3)
                CHECK_MESSAGE(local == utc, "naive local " << format_utc(t) << " read as " << format_utc(local));
            if (k > 0 && offset != previous) ++changes;
            previous = static_cast<std::int32_t>(offset);
        }
        CHECK(offset_mismatches == 0);
        CHECK(local_mismatches == 0);
        // The zones with daylight saving change twice a year in each of the
        // eight years; otherwise the comparison would not reach a rule at all.
        const std::string zone_name = name;
        if (zone_name != "Asia/Tokyo" && zone_name != "America/Sao_Paulo") CHECK(changes == 16);
    }
}
