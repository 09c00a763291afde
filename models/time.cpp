#include "models/time.hpp"

#include <algorithm>
#include <array>
#include <cctype>
#include <charconv>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <fstream>
#include <iterator>
#include <span>
#include <stdexcept>

namespace tocsin {

std::int64_t days_from_civil(int y, int m, int d) {
    y -= m <= 2;
    const std::int64_t era = (y >= 0 ? y : y - 399) / 400;
    const unsigned yoe = static_cast<unsigned>(y - era * 400);
    const unsigned doy = (153 * (m + (m > 2 ? -3 : 9)) + 2) / 5 + d - 1;
    const unsigned doe = yoe * 365 + yoe / 4 - yoe / 100 + doy;
    return era * 146097 + static_cast<std::int64_t>(doe) - 719468;
}

CivilTime civil_from_instant(Instant t) {
    std::int64_t z = t >= 0 ? t / 86400 : (t - 86399) / 86400;
    std::int64_t secs = t - z * 86400;
    CivilTime c;
    c.hour = static_cast<int>(secs / 3600);
    c.minute = static_cast<int>((secs % 3600) / 60);
    c.second = static_cast<int>(secs % 60);
    z += 719468;
    const std::int64_t era = (z >= 0 ? z : z - 146096) / 146097;
    const unsigned doe = static_cast<unsigned>(z - era * 146097);
    const unsigned yoe = (doe - doe / 1460 + doe / 36524 - doe / 146096) / 365;
    const std::int64_t y = static_cast<std::int64_t>(yoe) + era * 400;
    const unsigned doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    const unsigned mp = (5 * doy + 2) / 153;
    c.day = static_cast<int>(doy - (153 * mp + 2) / 5 + 1);
    c.month = static_cast<int>(mp < 10 ? mp + 3 : mp - 9);
    c.year = static_cast<int>(y + (c.month <= 2));
    return c;
}

int weekday_from_days(std::int64_t z) {
    // 1970-01-01 was a Thursday (3 when Monday is 0).
    return static_cast<int>(((z % 7) + 7 + 3) % 7);
}

namespace {

std::int64_t read_be(const unsigned char* p, int bytes) {
    std::uint64_t v = 0;
    for (int i = 0; i < bytes; ++i) v = (v << 8) | p[i];
    if (bytes == 4) return static_cast<std::int32_t>(static_cast<std::uint32_t>(v));
    return static_cast<std::int64_t>(v);
}

// POSIX TZ string pieces (POSIX.1-2017 section 8.3, "TZ"; RFC 8536 section 3.3).
class TzText {
public:
    explicit TzText(std::string_view s) : s_(s) {}
    bool done() const { return p_ == s_.size(); }
    bool eat(char c) {
        if (p_ < s_.size() && s_[p_] == c) return ++p_, true;
        return false;
    }
    char peek() const { return p_ < s_.size() ? s_[p_] : '\0'; }
    // std or dst name: three or more letters, or <...> of letters, digits, + and -.
    bool name() {
        std::size_t n = 0;
        if (eat('<')) {
            while (p_ < s_.size() && (std::isalnum(static_cast<unsigned char>(s_[p_])) || s_[p_] == '+' || s_[p_] == '-'))
                ++p_, ++n;
            return eat('>') && n >= 3;
        }
        while (p_ < s_.size() && std::isalpha(static_cast<unsigned char>(s_[p_]))) ++p_, ++n;
        return n >= 3;
    }
    bool number(int max_digits, int max_value, int& out) {
        int n = 0, v = 0;
        while (n < max_digits && p_ < s_.size() && s_[p_] >= '0' && s_[p_] <= '9') v = v * 10 + (s_[p_++] - '0'), ++n;
        out = v;
        return n > 0 && v <= max_value;
    }
    // [+-]hh[:mm[:ss]]; `max_hours` is 24 for offsets and 167 for transition
    // times, which RFC 8536 section 3.3.1 extends from POSIX's 0..24.
    bool clock(int max_hours, Seconds& out) {
        const int sign = eat('-') ? -1 : (eat('+'), 1);
        int h = 0, m = 0, sec = 0;
        if (!number(3, max_hours, h)) return false;
        if (eat(':')) {
            if (!number(2, 59, m)) return false;
            if (eat(':') && !number(2, 59, sec)) return false;
        }
        out = sign * (Seconds{h} * 3600 + m * 60 + sec);
        return true;
    }
    bool date(PosixTzRule::Date& d) {
        using Kind = PosixTzRule::Date::Kind;
        if (eat('M')) {
            d.kind = Kind::month_week_day;
            if (!number(2, 12, d.month) || d.month < 1 || !eat('.') || !number(1, 5, d.week) || d.week < 1 ||
                !eat('.') || !number(1, 6, d.day))
                return false;
        } else if (eat('J')) {
            d.kind = Kind::julian_no_leap;
            if (!number(3, 365, d.day) || d.day < 1) return false;
        } else {
            d.kind = Kind::zero_based;
            if (!number(3, 365, d.day)) return false;
        }
        d.time = 7200;  // POSIX: 02:00:00 when no time is given
        return !eat('/') || clock(167, d.time);
    }

private:
    std::string_view s_;
    std::size_t p_ = 0;
};

// Day (days since the epoch) on which a rule date falls in `year`.
std::int64_t rule_day(const PosixTzRule::Date& d, int year) {
    using Kind = PosixTzRule::Date::Kind;
    const std::int64_t jan1 = days_from_civil(year, 1, 1);
    const bool leap = (year % 4 == 0 && year % 100 != 0) || year % 400 == 0;
    switch (d.kind) {
        case Kind::julian_no_leap:  // February 29 is never counted
            return jan1 + d.day - 1 + (leap && d.day >= 60 ? 1 : 0);
        case Kind::zero_based:
            return jan1 + d.day;
        case Kind::month_week_day: break;
    }
    const std::int64_t first = days_from_civil(year, d.month, 1);
    const std::int64_t next = d.month == 12 ? days_from_civil(year + 1, 1, 1) : days_from_civil(year, d.month + 1, 1);
    const int first_weekday = (weekday_from_days(first) + 1) % 7;  // POSIX counts 0 = Sunday
    std::int64_t day = first + (d.day - first_weekday + 7) % 7 + 7 * (d.week - 1);
    while (day >= next) day -= 7;  // week 5 means the last such weekday of the month
    return day;
}

}  // namespace

std::optional<PosixTzRule> PosixTzRule::parse(std::string_view text) {
    TzText in(text);
    PosixTzRule r;
    Seconds west = 0;
    if (!in.name() || !in.clock(24, west)) return std::nullopt;
    r.std_offset = static_cast<std::int32_t>(-west);
    if (r.std_offset <= -86400 || r.std_offset >= 86400) return std::nullopt;  // see the daylight offset below
    if (in.done()) return r;
    if (!in.name()) return std::nullopt;
    r.has_dst = true;
    r.dst_offset = r.std_offset + 3600;  // POSIX: one hour ahead of standard time when not given
    if (in.peek() != ',') {
        if (!in.clock(24, west)) return std::nullopt;
        r.dst_offset = static_cast<std::int32_t>(-west);
    }
    if (!in.eat(',') || !in.date(r.dst_start) || !in.eat(',') || !in.date(r.dst_end) || !in.done())
        return std::nullopt;
    // POSIX lets hours reach 24, but an offset of a day or more has no ISO 8601
    // form (offset hours 00-23), so format_local could not write it, and
    // from_local assumes offsets under a day. No tz database zone comes near
    // (the widest is 14 hours).
    if (r.dst_offset <= -86400 || r.dst_offset >= 86400) return std::nullopt;
    return r;
}

std::int32_t PosixTzRule::offset_at(Instant t) const {
    if (!has_dst) return std_offset;
    // The changes of the year around t and of the years either side, in time
    // order; the last one at or before t says which offset is in force. Three
    // years cover change times up to 167 hours from midnight (RFC 8536 3.3.1).
    // Within a year the changes keep their calendar order, so a daylight time
    // that ends as the next one begins (RFC 8536's all-year "0/0,J365/25")
    // leaves daylight time in force.
    struct Change {
        Instant at;
        bool to_dst;
    };
    std::array<Change, 6> changes{};
    const int year = civil_from_instant(t + std_offset).year;
    for (int k = 0; k < 3; ++k) {
        const int y = year - 1 + k;
        const Change start{rule_day(dst_start, y) * 86400 + dst_start.time - std_offset, true};
        const Change end{rule_day(dst_end, y) * 86400 + dst_end.time - dst_offset, false};
        changes[2 * k] = start.at <= end.at ? start : end;
        changes[2 * k + 1] = start.at <= end.at ? end : start;
    }
    std::stable_sort(changes.begin(), changes.end(), [](const Change& a, const Change& b) { return a.at < b.at; });
    bool dst = !changes.front().to_dst;
    for (const Change& c : changes)
        if (c.at <= t) dst = c.to_dst;
    return dst ? dst_offset : std_offset;
}

std::optional<TimeZone> TimeZone::from_posix_rule(std::string_view tz) {
    auto rule = PosixTzRule::parse(tz);
    if (!rule) return std::nullopt;
    TimeZone z;
    z.name_ = std::string(tz);
    z.initial_offset_ = rule->std_offset;
    z.rule_ = rule;
    return z;
}

TimeZone TimeZone::utc() {
    TimeZone z;
    z.name_ = "UTC";
    return z;
}

TimeZone TimeZone::load(const std::string& name) {
    if (name == "UTC" || name == "Etc/UTC") return utc();
    if (name.empty() || name.find("..") != std::string::npos || name.front() == '/')
        throw std::runtime_error("time zone '" + name + "' is not an IANA zone name such as Europe/Berlin");
    const char* dir = std::getenv("TZDIR");
    std::string path = std::string(dir && *dir ? dir : "/usr/share/zoneinfo") + "/" + name;
    std::ifstream in(path, std::ios::binary);
    if (!in)
        throw std::runtime_error("time zone '" + name + "' is unknown (no file " + path +
                                 "; is the tzdata package installed?)");
    std::vector<unsigned char> data((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
    auto bad = [&] { return std::runtime_error("time zone file " + path + " is not a TZif file"); };
    if (data.size() < 44 || data[0] != 'T' || data[1] != 'Z' || data[2] != 'i' || data[3] != 'f') throw bad();

    // Header: magic(4) version(1) unused(15) then six 4-byte counts.
    auto counts = [&](std::size_t at) {
        std::array<std::int64_t, 6> c{};
        for (int i = 0; i < 6; ++i) c[i] = read_be(&data[at + 20 + 4 * i], 4);
        return c;  // isutcnt, isstdcnt, leapcnt, timecnt, typecnt, charcnt
    };
    auto c1 = counts(0);
    std::size_t v1_size = 44 + c1[3] * 5 + c1[4] * 6 + c1[5] + c1[2] * 8 + c1[1] + c1[0];
    std::size_t at = 0;
    int time_bytes = 4;
    std::array<std::int64_t, 6> c = c1;
    if (data[4] >= '2') {  // use the 64-bit block that follows the 32-bit one
        at = v1_size;
        if (data.size() < at + 44) throw bad();
        c = counts(at);
        time_bytes = 8;
    }
    std::size_t p = at + 44;
    const std::size_t timecnt = c[3], typecnt = c[4];
    if (data.size() < p + timecnt * (time_bytes + 1) + typecnt * 6) throw bad();
    TimeZone z;
    z.name_ = name;
    std::vector<std::int64_t> times(timecnt);
    for (std::size_t i = 0; i < timecnt; ++i) times[i] = read_be(&data[p + i * time_bytes], time_bytes);
    p += timecnt * time_bytes;
    std::vector<int> idx(timecnt);
    for (std::size_t i = 0; i < timecnt; ++i) idx[i] = data[p + i];
    p += timecnt;
    std::vector<std::int32_t> type_offset(typecnt);
    for (std::size_t i = 0; i < typecnt; ++i)
        type_offset[i] = static_cast<std::int32_t>(read_be(&data[p + i * 6], 4));
    if (typecnt == 0) throw bad();
    z.initial_offset_ = type_offset[0];
    for (std::size_t i = 0; i < timecnt; ++i) {
        if (idx[i] >= static_cast<int>(typecnt)) throw bad();
        z.transitions_.push_back(times[i]);
        z.offsets_.push_back(type_offset[idx[i]]);
    }
    // Version 2+ files end with a footer, "\n<POSIX TZ string>\n", that
    // gives the rule after the last transition (RFC 8536 section 3.3).
    if (time_bytes == 8) {
        const std::size_t footer = p + typecnt * 6 + c[5] + c[2] * 12 + c[1] + c[0];
        if (footer < data.size() && data[footer] == '\n') {
            const auto begin = data.begin() + static_cast<std::ptrdiff_t>(footer) + 1;
            const auto end = std::find(begin, data.end(), '\n');
            if (end != data.end() && begin != end) z.rule_ = PosixTzRule::parse(std::string(begin, end));
        }
    }
    // Without a rule, a zone whose table still changes offsets cannot be
    // answered past the table; say where the table ends.
    if (!z.rule_ && !z.transitions_.empty()) {
        bool has_dst_rule = false;
        for (std::size_t i = 1; i < z.offsets_.size(); ++i)
            if (z.transitions_[i] > z.transitions_.back() - days(3 * 365) && z.offsets_[i] != z.offsets_[i - 1])
                has_dst_rule = true;
        if (has_dst_rule) z.covered_until_ = z.transitions_.back();
    }
    return z;
}

std::int32_t TimeZone::offset_at(Instant t) const {
    if (rule_ && (transitions_.empty() || t > transitions_.back())) return rule_->offset_at(t);
    if (transitions_.empty() || t < transitions_.front()) return initial_offset_;
    auto it = std::upper_bound(transitions_.begin(), transitions_.end(), t);
    return offsets_[static_cast<std::size_t>(it - transitions_.begin()) - 1];
}

std::optional<std::int32_t> TimeZone::steady_offset(Instant from, Instant to) const {
    const bool rule_governs = rule_ && (transitions_.empty() || to > transitions_.back());
    if (rule_governs) {
        if (rule_->has_dst || (!transitions_.empty() && from <= transitions_.back())) return std::nullopt;
        return rule_->std_offset;
    }
    // The table alone: steady when no change falls in (from, to].
    const auto it = std::upper_bound(transitions_.begin(), transitions_.end(), from);
    if (it != transitions_.end() && *it <= to) return std::nullopt;
    return offset_at(from);
}

Instant TimeZone::from_local(const CivilTime& l, LocalMapping* mapping) const {
    const Instant local = days_from_civil(l.year, l.month, l.day) * 86400 + l.hour * 3600 + l.minute * 60 + l.second;
    // An instant t shows `local` when t + offset_at(t) == local. Offsets are
    // under a day, so t lies within a day of `local` and its offset is one in
    // force within two days of it: the one two days before, those the table
    // changes to in between and, where the footer rule governs, the rule's
    // two. Taking them all (not only the offsets a day either side) also
    // sees two changes close together, such as one hour of daylight time.
    const Instant lo = local - days(2), hi = local + days(2);
    // In time order; a fixed array, since this runs for every naive timestamp
    // of a log. Real tables change at most a few times in four days.
    std::array<std::int32_t, 16> offset_list{offset_at(lo)};
    std::size_t n = 1;
    for (auto it = std::upper_bound(transitions_.begin(), transitions_.end(), lo);
         it != transitions_.end() && *it <= hi && n + 2 < offset_list.size(); ++it)
        offset_list[n++] = offsets_[static_cast<std::size_t>(it - transitions_.begin())];
    if (rule_ && (transitions_.empty() || hi > transitions_.back())) {
        offset_list[n++] = rule_->std_offset;
        if (rule_->has_dst) offset_list[n++] = rule_->dst_offset;
    }
    const std::span<const std::int32_t> offsets(offset_list.data(), n);
    std::optional<Instant> earliest, latest;
    for (const std::int32_t o : offsets) {
        const Instant t = local - o;
        if (offset_at(t) != o) continue;
        earliest = std::min(earliest.value_or(t), t);
        latest = std::max(latest.value_or(t), t);
    }
    if (mapping) *mapping = LocalMapping::unique;
    if (earliest) {
        if (*latest != *earliest && mapping) *mapping = LocalMapping::ambiguous_took_earlier;
        return *earliest;
    }
    // Skipped by a forward change: read with the offset before the change, which
    // lands the same distance past the change as the time was past its start.
    if (mapping) *mapping = LocalMapping::nonexistent_moved_forward;
    for (auto o = offsets.rbegin(); o != offsets.rend(); ++o)
        if (offset_at(local - *o) > *o) return local - *o;
    return local - offsets.front();
}

namespace {

bool digits(std::string_view s, std::size_t at, std::size_t n, int& out) {
    if (at + n > s.size()) return false;
    int v = 0;
    for (std::size_t i = at; i < at + n; ++i) {
        char ch = s[i];
        if (ch < '0' || ch > '9') return false;
        v = v * 10 + (ch - '0');
    }
    out = v;
    return true;
}

int days_in_month(int y, int m) {
    static const int d[] = {31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31};
    if (m == 2 && ((y % 4 == 0 && y % 100 != 0) || y % 400 == 0)) return 29;
    return d[m - 1];
}

}  // namespace

namespace {

// "YYYY-MM-DD" at the start of s, read and checked into c; false when it is
// not a possible date.
bool read_date(std::string_view s, CivilTime& c) {
    return digits(s, 0, 4, c.year) && s[4] == '-' && digits(s, 5, 2, c.month) && s[7] == '-' &&
           digits(s, 8, 2, c.day) && c.month >= 1 && c.month <= 12 && c.day >= 1 &&
           c.day <= days_in_month(c.year, c.month);
}

// The first 10 bytes of a and b are equal (two fixed-size loads, no call).
bool same_date(const char* a, const char* b) {
    std::uint64_t a8, b8;
    std::uint16_t a2, b2;
    std::memcpy(&a8, a, 8);
    std::memcpy(&b8, b, 8);
    std::memcpy(&a2, a + 8, 2);
    std::memcpy(&b2, b + 8, 2);
    return a8 == b8 && a2 == b2;
}

// Two decimal digits at p into out.
bool two_digits(const char* p, int& out) {
    const unsigned a = static_cast<unsigned char>(p[0]) - '0', b = static_cast<unsigned char>(p[1]) - '0';
    out = static_cast<int>(a * 10 + b);
    return a < 10 && b < 10;
}

// The date of s through the cache: read once per run of rows with one date.
bool cached_date(std::string_view s, const TimeZone& zone, TimestampCache& cache, CivilTime& c) {
    if (cache.valid && cache.zone == &zone && same_date(s.data(), cache.date)) return true;
    if (!read_date(s, c)) return false;
    std::memcpy(cache.date, s.data(), 10);
    cache.valid = true;
    cache.zone = &zone;
    cache.days = days_from_civil(c.year, c.month, c.day);
    // As from_local looks: every offset within two days of the local day.
    const Instant local_day = cache.days * 86400;
    cache.steady_offset = zone.steady_offset(local_day - days(3), local_day + days(3));
    return true;
}

}  // namespace

std::optional<Instant> parse_timestamp(std::string_view s, const TimeZone& zone, TimestampNote* note,
                                       TimestampCache* cache) {
    CivilTime c;
    if (s.size() < 19) return std::nullopt;
    const char* t = s.data();
    if ((t[10] != 'T' && t[10] != ' ') || !two_digits(t + 11, c.hour) || t[13] != ':' || !two_digits(t + 14, c.minute) ||
        t[16] != ':' || !two_digits(t + 17, c.second) || c.hour > 23 || c.minute > 59 || c.second > 59)
        return std::nullopt;
    if (cache ? !cached_date(s, zone, *cache, c) : !read_date(s, c)) return std::nullopt;
    std::size_t p = 19;
    if (p < s.size() && s[p] == '.') {
        ++p;
        std::size_t start = p;
        while (p < s.size() && s[p] >= '0' && s[p] <= '9') ++p;
        if (p == start) return std::nullopt;
    }
    const std::int64_t day = cache ? cache->days : days_from_civil(c.year, c.month, c.day);
    const Instant as_utc = day * 86400 + c.hour * 3600 + c.minute * 60 + c.second;
    if (note) note->mapping = LocalMapping::unique;
    if (p == s.size()) {
        if (cache && cache->steady_offset) return as_utc - *cache->steady_offset;
        if (cache) c = civil_from_instant(as_utc);  // the date, which the cache skipped reading
        return zone.from_local(c, note ? &note->mapping : nullptr);
    }
    if (s[p] == 'Z' && p + 1 == s.size()) return as_utc;
    if (s[p] == '+' || s[p] == '-') {
        int sign = s[p] == '+' ? 1 : -1, oh = 0, om = 0;
        ++p;
        if (!digits(s, p, 2, oh)) return std::nullopt;
        p += 2;
        if (p < s.size() && s[p] == ':') ++p;
        if (!digits(s, p, 2, om) || oh > 23 || om > 59) return std::nullopt;
        p += 2;
        int os = 0;  // seconds, as format_local writes for local mean time offsets
        if (p < s.size() && (s[p] != ':' || !digits(s, p + 1, 2, os) || os > 59 || (p += 3) != s.size()))
            return std::nullopt;
        return as_utc - sign * (oh * 3600 + om * 60 + os);
    }
    return std::nullopt;
}

std::optional<int> parse_clock_minutes(std::string_view s) {
    int h = 0, m = 0;
    if (s.size() != 5 || !digits(s, 0, 2, h) || s[2] != ':' || !digits(s, 3, 2, m) || h > 23 || m > 59)
        return std::nullopt;
    return h * 60 + m;
}

std::string format_utc(Instant at) {
    CivilTime c = civil_from_instant(at);
    char buf[32];
    std::snprintf(buf, sizeof buf, "%04d-%02d-%02dT%02d:%02d:%02dZ", c.year, c.month, c.day, c.hour, c.minute,
                  c.second);
    return buf;
}

std::string format_local(Instant at, const TimeZone& zone) {
    const std::int32_t off = zone.offset_at(at);
    CivilTime c = civil_from_instant(at + off);
    const int a = off < 0 ? -off : off;
    char buf[48];
    std::snprintf(buf, sizeof buf, "%04d-%02d-%02dT%02d:%02d:%02d%c%02d:%02d", c.year, c.month, c.day, c.hour,
                  c.minute, c.second, off < 0 ? '-' : '+', a / 3600, (a % 3600) / 60);
    std::string out = buf;
    // Local mean time offsets (before a zone's standard time) have seconds;
    // dropping them would name another instant. Written as Python's
    // datetime.isoformat writes them.
    if (a % 60) {
        std::snprintf(buf, sizeof buf, ":%02d", a % 60);
        out += buf;
    }
    return out;
}

std::string format_clock_minutes(int m) {
    char buf[16];
    std::snprintf(buf, sizeof buf, "%02d:%02d", m / 60, m % 60);
    return buf;
}

}  // namespace tocsin
