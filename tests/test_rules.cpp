// The paging rule, one clause per story. Times are UTC on 3 March 2026 unless
// said otherwise; shifts are day 07:00-19:00 and night 19:00-07:00 (UTC).
// Each expected notice list is worked out by hand in the comment above it.
#include <doctest/doctest.h>

#include <string>
#include <vector>

#include "sim/rules.hpp"

using namespace tocsin;

namespace {

Instant at(int day, int hour, int minute) { return days_from_civil(2026, 3, day) * 86400 + hour * 3600 + minute * 60; }

struct Story {
    TimeZone zone = TimeZone::utc();
    ShiftPattern pattern{{7 * 60, 19 * 60}, {"day", "night"}, {false, true}};
    ShiftCalendar calendar{pattern, zone, at(1, 0, 0), at(6, 0, 0)};
    std::vector<Score> scores;

    Story& score(Instant t, double value) {
        scores.push_back({t, t, value});
        return *this;
    }
    // "HH:MM reason" for each notice, for readable comparisons.
    std::vector<std::string> fire(const Rule& rule) const {
        std::vector<Notice> out;
        fire_page_rule(rule, RuleClock{&zone, &calendar}, scores, 0, 0, 0, Channel::page, out);
        std::vector<std::string> text;
        for (const Notice& n : out) {
            const CivilTime c = zone.to_local(n.at);
            char buf[32];
            std::snprintf(buf, sizeof buf, "%02d:%02d %s", c.hour, c.minute, std::string(to_string(n.reason)).c_str());
            text.push_back(buf);
        }
        return text;
    }
};

using Expected = std::vector<std::string>;

}  // namespace

TEST_CASE("rules.threshold") {
    // Threshold 60, no snooze: 50 does not qualify, 60 (equal) and 65 do.
    Story s;
    s.score(at(3, 19, 0), 50).score(at(3, 19, 15), 60).score(at(3, 19, 30), 65).score(at(3, 19, 45), 59.999);
    Rule r;
    r.threshold = 60;
    CHECK(s.fire(r) == Expected{"19:15 first", "19:30 repeat"});
}

TEST_CASE("rules.persistence") {
    // k = 2 over 60, 40, 60, 60, 60 every 15 min from 19:00: the qualifying run
    // is 1, 0, 1, 2, 3, so the rule fires at the 4th and 5th scores.
    Story s;
    const double v[] = {60, 40, 60, 60, 60};
    for (int i = 0; i < 5; ++i) s.score(at(3, 19, 15 * i), v[i]);
    Rule r;
    r.threshold = 60;
    r.persistence = 2;
    CHECK(s.fire(r) == Expected{"19:45 first", "20:00 repeat"});
}

TEST_CASE("rules.snooze") {
    // Snooze 60 min, a 70 every 15 min from 19:00 to 20:30: fires at 19:00; the
    // next firing is allowed from 20:00 exactly (t + S), then none until 21:00.
    Story s;
    for (int i = 0; i <= 6; ++i) s.score(at(3, 19, 0) + i * 900, 70);
    Rule r;
    r.threshold = 60;
    r.snooze = minutes(60);
    CHECK(s.fire(r) == Expected{"19:00 first", "20:00 repeat"});
}

TEST_CASE("rules.rise") {
    // Snooze 4 h, rise 10: 60 fires (reference 60); 65 is snoozed; 70 >= 60+10
    // fires as a rise (reference 70); 75 < 80 is snoozed; 80 fires as a rise.
    Story s;
    const double v[] = {60, 65, 70, 75, 80};
    for (int i = 0; i < 5; ++i) s.score(at(3, 19, 15 * i), v[i]);
    Rule r;
    r.threshold = 60;
    r.snooze = hours(4);
    r.rise = 10;
    CHECK(s.fire(r) == Expected{"19:00 first", "19:30 rise", "20:00 rise"});

    SUBCASE("a rise must still meet persistence") {
        // k = 2: 60, 60 fires at 19:15; 75 at 19:30 meets the run (3 in a row)
        // and the rise; after a 40 the run restarts, so 90 alone at 20:00 cannot fire.
        Story t;
        const double w[] = {60, 60, 75, 40, 90};
        for (int i = 0; i < 5; ++i) t.score(at(3, 19, 15 * i), w[i]);
        r.persistence = 2;
        CHECK(t.fire(r) == Expected{"19:15 first", "19:30 rise"});
    }
}

TEST_CASE("rules.rearm") {
    // Re-arm below 50, no snooze: 60 fires and disarms; 65 is silent; 45 re-arms
    // (and does not qualify); 60 fires again.
    Story s;
    const double v[] = {60, 65, 45, 60};
    for (int i = 0; i < 4; ++i) s.score(at(3, 19, 15 * i), v[i]);
    Rule r;
    r.threshold = 60;
    r.rearm_below = 50;
    CHECK(s.fire(r) == Expected{"19:00 first", "19:45 repeat"});

    SUBCASE("a rise overrides re-arm") {
        // 60 fires and disarms; 70 >= 60 + 10 fires as a rise although disarmed.
        Story t;
        t.score(at(3, 19, 0), 60).score(at(3, 19, 15), 70);
        r.rise = 10;
        CHECK(t.fire(r) == Expected{"19:00 first", "19:15 rise"});
    }
    SUBCASE("snooze still applies after re-arming") {
        // Snooze 60 min: 60 at 19:00 fires; 45 at 19:15 re-arms; 60 at 19:30 is
        // still inside the snooze; 60 at 20:00 fires.
        Story t;
        t.score(at(3, 19, 0), 60).score(at(3, 19, 15), 45).score(at(3, 19, 30), 60).score(at(3, 20, 0), 60);
        r.snooze = minutes(60);
        CHECK(t.fire(r) == Expected{"19:00 first", "20:00 repeat"});
    }
}

TEST_CASE("rules.cap_per_shift") {
    // Cap 2 per shift, no snooze, a 70 every hour 15:00-22:00: the day shift
    // (07-19) allows 15:00 and 16:00; the night shift (from 19:00) allows 19:00 and 20:00.
    Story s;
    for (int h = 15; h <= 22; ++h) s.score(at(3, h, 0), 70);
    Rule r;
    r.threshold = 60;
    r.max_per_shift = 2;
    CHECK(s.fire(r) == Expected{"15:00 first", "16:00 repeat", "19:00 repeat", "20:00 repeat"});

    SUBCASE("rises count towards the cap") {
        // Snooze 4 h, rise 5: 60 first; 66 rise; 72 would be a rise but the cap of 2 is reached.
        Story t;
        t.score(at(3, 20, 0), 60).score(at(3, 20, 15), 66).score(at(3, 20, 30), 72);
        r.snooze = hours(4);
        r.rise = 5;
        CHECK(t.fire(r) == Expected{"20:00 first", "20:15 rise"});
    }
}

TEST_CASE("rules.quiet_hours") {
    // Quiet 23:00-02:00 (wraps midnight), snooze 60 min, a 70 at 22:30, 23:30,
    // 01:45 and 02:00: 22:30 fires; 23:30 and 01:45 are quiet; 02:00 is the
    // exclusive end, so it fires. Nothing is released when quiet hours end.
    Story s;
    s.score(at(3, 22, 30), 70).score(at(3, 23, 30), 70).score(at(4, 1, 45), 70).score(at(4, 2, 0), 70);
    Rule r;
    r.threshold = 60;
    r.snooze = minutes(60);
    r.quiet_start_minute = 23 * 60;
    r.quiet_end_minute = 2 * 60;
    CHECK(s.fire(r) == Expected{"22:30 first", "02:00 repeat"});

    SUBCASE("a firing suppressed by quiet hours leaves the encounter unfired") {
        // Only 23:30 and 02:00 qualify: the first notice is the one at 02:00, reason "first".
        Story t;
        t.score(at(3, 23, 30), 70).score(at(4, 2, 0), 70);
        CHECK(t.fire(r) == Expected{"02:00 first"});
    }
    SUBCASE("quiet hours follow the local wall clock across daylight saving") {
        // America/Chicago, quiet 02:00-05:00 local. On 1 November 2026 clocks go
        // back at 02:00 CDT (07:00Z) to 01:00 CST. 08:30Z is 02:30 CST: quiet.
        // 11:00Z is 05:00 CST: not quiet. The day before, 07:30Z is 02:30 CDT: quiet;
        // 10:00Z is 05:00 CDT: not quiet.
        Rule q;
        q.threshold = 60;
        q.quiet_start_minute = 2 * 60;
        q.quiet_end_minute = 5 * 60;
        const TimeZone chicago = TimeZone::load("America/Chicago");
        auto utc = [](int day, int h, int m) { return days_from_civil(2026, 11, day) * 86400 + h * 3600 + m * 60; };
        CHECK(in_quiet_hours(q, chicago, utc(1, 8, 30)));
        CHECK_FALSE(in_quiet_hours(q, chicago, utc(1, 11, 0)));
        const Instant oct31_0730 = days_from_civil(2026, 10, 31) * 86400 + 7 * 3600 + 30 * 60;
        CHECK(in_quiet_hours(q, chicago, oct31_0730));
        CHECK_FALSE(in_quiet_hours(q, chicago, oct31_0730 + minutes(150)));
    }
}

TEST_CASE("rules.scores_in_order_of_availability") {
    // The rule sees scores in the order given (Population sorts by available_at);
    // a notice is stamped with available_at, not scored_at.
    Story s;
    s.scores.push_back({at(3, 19, 40), at(3, 19, 0), 80});  // scored 19:00, available 19:40
    Rule r;
    r.threshold = 60;
    CHECK(s.fire(r) == Expected{"19:40 first"});
}
