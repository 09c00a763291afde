// Replay ingest: every error class names the file, line and column, and what
// was expected; exclusions are counted by reason, never dropped silently.
#include <doctest/doctest.h>

#include "models/errors.hpp"
#include "models/chart_openings.hpp"
#include "models/csv.hpp"
#include "models/replay.hpp"
#include "test_support.hpp"

using namespace tocsin;
using tocsin::testing::ScratchDir;

namespace {

const char* good_encounters =
    "encounter,unit,admitted,discharged,outcome_at\n"
    "A,ward 1,2026-03-03T08:00:00Z,2026-03-05T08:00:00Z,2026-03-04T08:00:00Z\n"
    "B,ward 2,2026-03-03T09:00:00Z,2026-03-04T09:00:00Z,\n";

// Loads and returns the error message, or "" when it loaded.
std::string load_error(const std::string& encounters, const std::string& scores, std::string* file_out = nullptr,
                       long* line_out = nullptr) {
    ScratchDir dir;
    ReplaySource src{dir.file("enc.csv", encounters), dir.file("scores.csv", scores), 0};
    try {
        load_replay(src, TimeZone::utc());
    } catch (const InputError& e) {
        if (file_out) *file_out = e.file;
        if (line_out) *line_out = e.line;
        return e.what();
    }
    return "";
}

}  // namespace

TEST_CASE("replay.reads_rows_in_any_order_with_extra_columns") {
    ScratchDir dir;
    // Header order is free and an extra column is ignored; rows are out of
    // order; one quoted unit name holds a comma.
    ReplaySource src{dir.file("enc.csv",
                              "unit,note,encounter,outcome_at,discharged,admitted\n"
                              "\"ward 3, east\",x,C,,2026-03-04T09:00:00Z,2026-03-03T09:00:00Z\n"
                              "ward 1,y,A,2026-03-04T08:00:00Z,2026-03-05T08:00:00Z,2026-03-03T08:00:00Z\n"),
                     dir.file("scores.csv",
                              "score,encounter,available_at,scored_at\n"
                              "70,A,2026-03-03T12:10:00Z,2026-03-03T12:00:00Z\n"
                              "50,A,2026-03-03T11:10:00Z,2026-03-03T11:00:00Z\n"
                              "55,C,,2026-03-03T10:00:00Z\n"),
                     minutes(7)};
    Population pop = load_replay(src, TimeZone::utc());
    REQUIRE(pop.encounters.size() == 2);
    CHECK(pop.units == std::vector<std::string>{"ward 1", "ward 3, east"});  // numbered in name order
    CHECK(pop.encounters[0].id == "C");
    CHECK(pop.encounters[0].unit == 1);
    auto a = pop.scores_of(1);
    REQUIRE(a.size() == 2);
    CHECK(a[0].value == 50);  // sorted by available_at
    CHECK(a[1].value == 70);
    auto c = pop.scores_of(0);
    REQUIRE(c.size() == 1);
    CHECK(c[0].available_at - c[0].scored_at == minutes(7));  // declared latency fills the empty cell
}

TEST_CASE("replay.exclusions_are_counted_by_reason") {
    ScratchDir dir;
    // A: admitted 08:00 3 Mar, outcome 08:00 4 Mar, discharged 08:00 5 Mar.
    // Scores available 07:00 3 Mar (before admission), 12:00 3 Mar (kept),
    // 08:00 4 Mar (at time zero), 10:00 4 Mar (after it). B: discharged 09:00
    // 4 Mar; a score at 09:00 4 Mar is at discharge.
    ReplaySource src{dir.file("enc.csv", good_encounters),
                     dir.file("scores.csv",
                              "encounter,scored_at,available_at,score\n"
                              "A,2026-03-03T07:00:00Z,,10\n"
                              "A,2026-03-03T12:00:00Z,,20\n"
                              "A,2026-03-04T08:00:00Z,,30\n"
                              "A,2026-03-04T10:00:00Z,,40\n"
                              "B,2026-03-04T09:00:00Z,,50\n"),
                     0};
    Population pop = load_replay(src, TimeZone::utc());
    CHECK(pop.scores.size() == 1);
    CHECK(pop.scores[0].value == 20);
    CHECK(pop.excluded.scores_by_reason.at("available before admission") == 1);
    CHECK(pop.excluded.scores_by_reason.at("available at or after the outcome (time zero)") == 2);
    CHECK(pop.excluded.scores_by_reason.at("available at or after discharge") == 1);
    CHECK(pop.excluded.total_scores() == 4);
}

TEST_CASE("replay.errors_name_file_line_and_field") {
    const std::string scores_header = "encounter,scored_at,available_at,score\n";
    struct Case {
        const char* what;
        std::string encounters, scores;
        const char* file;  // "enc" or "scores"
        long line;
        const char* must_mention;
    };
    const std::vector<Case> cases = {
        {"missing column", "encounter,unit,admitted,discharged\nA,w,2026-03-03T08:00:00Z,2026-03-04T08:00:00Z\n",
         scores_header, "enc", 1, "outcome_at"},
        {"repeated column", "encounter,unit,unit,admitted,discharged,outcome_at\n", scores_header, "enc", 1, "twice"},
        {"bad timestamp", "encounter,unit,admitted,discharged,outcome_at\nA,w,2026-03-03 8:00,2026-03-04T08:00:00Z,\n",
         scores_header, "enc", 2, "admitted"},
        {"discharged before admitted",
         "encounter,unit,admitted,discharged,outcome_at\nA,w,2026-03-04T08:00:00Z,2026-03-03T08:00:00Z,\n",
         scores_header, "enc", 2, "discharged must be after admitted"},
        {"outcome outside the stay",
         "encounter,unit,admitted,discharged,outcome_at\nA,w,2026-03-03T08:00:00Z,2026-03-04T08:00:00Z,2026-03-05T08:00:00Z\n",
         scores_header, "enc", 2, "outcome_at"},
        {"duplicate encounter", std::string(good_encounters) + "A,ward 1,2026-03-03T08:00:00Z,2026-03-05T08:00:00Z,\n",
         scores_header, "enc", 4, "duplicate encounter id"},
        {"empty unit", "encounter,unit,admitted,discharged,outcome_at\nA,,2026-03-03T08:00:00Z,2026-03-04T08:00:00Z,\n",
         scores_header, "enc", 2, "unit"},
        {"wrong field count", "encounter,unit,admitted,discharged,outcome_at\nA,w,2026-03-03T08:00:00Z\n",
         scores_header, "enc", 2, "expected 5 fields"},
        {"unknown encounter", good_encounters, scores_header + "Z,2026-03-03T12:00:00Z,,50\n", "scores", 2,
         "unknown encounter"},
        {"non-numeric score", good_encounters, scores_header + "A,2026-03-03T12:00:00Z,,high\n", "scores", 2,
         "expected a finite number"},
        {"non-finite score", good_encounters, scores_header + "A,2026-03-03T12:00:00Z,,nan\n", "scores", 2,
         "finite number"},
        {"available before scored", good_encounters, scores_header + "A,2026-03-03T12:00:00Z,2026-03-03T11:00:00Z,50\n",
         "scores", 2, "available_at is before scored_at"},
        {"unterminated quote", good_encounters, scores_header + "A,2026-03-03T12:00:00Z,,\"50\n", "scores", 2,
         "never closed"},
        {"empty file", "", scores_header, "enc", 1, "empty"},
    };
    for (const Case& c : cases) {
        CAPTURE(c.what);
        std::string file;
        long line = 0;
        const std::string message = load_error(c.encounters, c.scores, &file, &line);
        REQUIRE_FALSE(message.empty());
        CHECK(file.find(std::string("/") + c.file + ".csv") != std::string::npos);
        CHECK(line == c.line);
        CHECK(message.find(file + ":" + std::to_string(c.line)) != std::string::npos);
        CHECK(message.find(c.must_mention) != std::string::npos);
    }
}

TEST_CASE("replay.quoted_fields_may_span_lines") {
    ScratchDir dir;
    // RFC 4180: a quoted field can hold a line break and doubled quotes; the
    // line numbers of later rows still count physical lines. (The break sits in
    // an extra column: a unit name or id with one is refused.)
    ReplaySource src{dir.file("enc.csv",
                              "encounter,unit,admitted,discharged,outcome_at,note\r\n"
                              "\"A \"\"one\"\"\",ward 1,2026-03-03T08:00:00Z,2026-03-05T08:00:00Z,,\"two\nlines\"\r\n"
                              "B,ward 2,2026-03-03T09:00:00Z,bad,,\r\n"),
                     dir.file("scores.csv", "encounter,scored_at,available_at,score\n"), 0};
    try {
        load_replay(src, TimeZone::utc());
        FAIL("expected an error");
    } catch (const InputError& e) {
        CHECK(e.line == 4);
        CHECK(e.field == "discharged");
    }
}

TEST_CASE("replay.parallel_chunks_match_the_plain_path") {
    // The same log read in one piece and in chunks of about 60 bytes (cut at
    // line breaks, parsed on several threads) gives identical populations, and
    // an error in a late chunk still names its true line.
    ScratchDir dir;
    std::string scores = "encounter,scored_at,available_at,score\n";
    for (int i = 0; i < 40; ++i) {
        char row[64];
        std::snprintf(row, sizeof row, "%s,2026-03-03T%02d:%02d:00Z,,%d\n", i % 2 ? "A" : "B", 8 + i / 4, i % 4 * 15, 40 + i);
        scores += row;
    }
    ReplaySource plain{dir.file("enc.csv", good_encounters), dir.file("scores.csv", scores), 0};
    ReplaySource chunked = plain;
    chunked.parallel_chunk_bytes = 60;
    const Population a = load_replay(plain, TimeZone::utc());
    const Population b = load_replay(chunked, TimeZone::utc());
    REQUIRE(a.scores.size() == b.scores.size());
    CHECK(a.scores.size() + static_cast<std::size_t>(a.excluded.total_scores()) == 40);
    for (std::size_t i = 0; i < a.scores.size(); ++i) {
        CHECK(a.scores[i].value == b.scores[i].value);
        CHECK(a.scores[i].available_at == b.scores[i].available_at);
    }
    CHECK(a.score_start == b.score_start);
    CHECK(a.excluded.scores_by_reason == b.excluded.scores_by_reason);

    // Line 38 of the file (the 37th data row) gets a bad score.
    std::string broken = scores;
    std::size_t pos = 0;
    for (int line = 1; line < 38; ++line) pos = broken.find('\n', pos) + 1;
    broken.replace(broken.find('\n', pos) - 2, 2, "x1");
    ReplaySource bad{plain.encounters_path, dir.file("broken.csv", broken), 0, 60};
    try {
        load_replay(bad, TimeZone::utc());
        FAIL("expected an error");
    } catch (const InputError& e) {
        CHECK(e.line == 38);
        CHECK(e.field == "score");
    }
    // A quoted field with a line break defeats cutting at line breaks: the
    // reader notices the quotes and reads the file in one piece instead.
    std::string quoted = scores;
    quoted.insert(quoted.find("\nA,") + 1, "\"A\",2026-03-03T09:30:00Z,\"\",\"55\"\n");
    ReplaySource q{plain.encounters_path, dir.file("quoted.csv", quoted), 0, 60};
    CHECK(load_replay(q, TimeZone::utc()).scores.size() == a.scores.size() + 1);
}

namespace {

// The same text with every "\n" replaced by `ending`.
std::string with_ending(const std::string& text, const std::string& ending) {
    std::string out;
    for (char c : text) {
        if (c == '\n') out += ending;
        else out += c;
    }
    return out;
}

std::string many_scores() {
    std::string scores = "encounter,scored_at,available_at,score\n";
    for (int i = 0; i < 40; ++i) {
        char row[64];
        std::snprintf(row, sizeof row, "%s,2026-03-03T%02d:%02d:00Z,,%d\n", i % 2 ? "A" : "B", 8 + i / 4, i % 4 * 15, 40 + i);
        scores += row;
    }
    return scores;
}

void check_same_population(const Population& a, const Population& b) {
    REQUIRE(a.encounters.size() == b.encounters.size());
    for (std::size_t i = 0; i < a.encounters.size(); ++i) {
        CHECK(a.encounters[i].id == b.encounters[i].id);
        CHECK(a.encounters[i].admitted == b.encounters[i].admitted);
        CHECK(a.encounters[i].discharged == b.encounters[i].discharged);
        CHECK(a.encounters[i].outcome_at == b.encounters[i].outcome_at);
    }
    CHECK(a.units == b.units);
    REQUIRE(a.scores.size() == b.scores.size());
    for (std::size_t i = 0; i < a.scores.size(); ++i) {
        CHECK(a.scores[i].value == b.scores[i].value);
        CHECK(a.scores[i].available_at == b.scores[i].available_at);
    }
    CHECK(a.score_start == b.score_start);
    CHECK(a.excluded.scores_by_reason == b.excluded.scores_by_reason);
}

}  // namespace

TEST_CASE("replay.line_endings_read_alike") {
    // LF, CRLF and a lone CR (old Mac exports) end lines alike, in the header
    // and in rows, whether the scores file is read whole or in chunks.
    ScratchDir dir;
    const std::string scores = many_scores();
    ReplaySource lf{dir.file("enc.csv", good_encounters), dir.file("scores.csv", scores), 0};
    const Population reference = load_replay(lf, TimeZone::utc());
    REQUIRE(reference.encounters.size() == 2);
    REQUIRE(reference.scores.size() > 10);
    for (const std::string ending : {"\r\n", "\r"}) {
        CAPTURE(ending.size());
        ReplaySource other{dir.file("enc_e.csv", with_ending(good_encounters, ending)),
                           dir.file("scores_e.csv", with_ending(scores, ending)), 0};
        check_same_population(reference, load_replay(other, TimeZone::utc()));
        other.parallel_chunk_bytes = 60;
        check_same_population(reference, load_replay(other, TimeZone::utc()));
    }
    // Mixed: a header ending in a lone CR, rows in LF; the first row is kept.
    std::string mixed = scores;
    mixed[mixed.find('\n')] = '\r';
    for (long long chunk : {32LL << 20, 60LL}) {
        ReplaySource m{lf.encounters_path, dir.file("mixed.csv", mixed), 0, chunk};
        check_same_population(reference, load_replay(m, TimeZone::utc()));
    }
}

TEST_CASE("replay.line_numbers_count_every_ending") {
    // A bad row is reported at its true line whichever line break the file uses,
    // including inside chunks.
    ScratchDir dir;
    std::string scores = many_scores();
    std::size_t pos = 0;
    for (int line = 1; line < 38; ++line) pos = scores.find('\n', pos) + 1;
    scores.replace(scores.find('\n', pos) - 2, 2, "x1");
    for (const std::string ending : {"\n", "\r\n", "\r"}) {
        for (long long chunk : {32LL << 20, 60LL}) {
            CAPTURE(ending.size());
            CAPTURE(chunk);
            ReplaySource src{dir.file("enc.csv", good_encounters), dir.file("s.csv", with_ending(scores, ending)), 0, chunk};
            try {
                load_replay(src, TimeZone::utc());
                FAIL("expected an error");
            } catch (const InputError& e) {
                CHECK(e.line == 38);
                CHECK(e.field == "score");
            }
        }
    }
}

TEST_CASE("chart_openings.line_endings_read_alike") {
    ScratchDir dir;
    ReplaySource src{dir.file("enc.csv", good_encounters), dir.file("scores.csv", many_scores()), 0};
    const Population pop = load_replay(src, TimeZone::utc());
    const std::vector<ChartOpeningRole> roles = {{"nurse", 1, {}}};
    const std::string openings =
        "encounter,opened_at,role\n"
        "A,2026-03-03T09:00:00Z,nurse\n"
        "B,2026-03-03T10:00:00Z,nurse\n"
        "A,2026-03-03T11:00:00Z,nurse\n";
    const ChartOpeningLog reference = load_chart_openings(dir.file("o.csv", openings), roles, pop, TimeZone::utc());
    REQUIRE(reference.openings.size() == 3);
    for (const std::string ending : {"\r\n", "\r"}) {
        std::string header_cr = with_ending(openings, ending);
        const ChartOpeningLog other = load_chart_openings(dir.file("o2.csv", header_cr), roles, pop, TimeZone::utc());
        REQUIRE(other.openings.size() == reference.openings.size());
        for (std::size_t i = 0; i < other.openings.size(); ++i) CHECK(other.openings[i].at == reference.openings[i].at);
        CHECK(other.start == reference.start);
    }
}

namespace {

// n encounters on one ward, admitted a day apart from 1 March 2026, two days each.
std::string march_encounters(int n) {
    std::string out = "encounter,unit,admitted,discharged,outcome_at\n";
    for (int i = 0; i < n; ++i) {
        char row[128];
        std::snprintf(row, sizeof row, "E%d,ward 1,2026-03-%02dT08:00:00Z,2026-03-%02dT08:00:00Z,\n", i, 1 + i, 3 + i);
        out += row;
    }
    return out;
}

InputError replay_error(const ReplaySource& src) {
    try {
        load_replay(src, TimeZone::utc());
    } catch (const InputError& e) {
        return e;
    }
    FAIL("expected an InputError");
    return InputError("", 0, 0, "", "");
}

bool mentions(const InputError& e, const std::string& text) { return std::string(e.what()).find(text) != std::string::npos; }

}  // namespace

TEST_CASE("replay.a_mistyped_year_is_a_located_error") {
    ScratchDir dir;
    const std::string scores = dir.file("s.csv", "encounter,scored_at,available_at,score\n");
    // Admitted in 1900 (for 2026): a 126-year stay.
    std::string century = march_encounters(6);
    century.replace(century.find("2026", century.find("E2,")), 4, "1900");
    const InputError e = replay_error({dir.file("e.csv", century), scores, 0});
    CHECK(e.line == 4);
    CHECK(e.field == "discharged");
    CHECK(mentions(e, "max_stay_days (365"));
    // Discharged in 9999.
    std::string far_discharge = march_encounters(6);
    far_discharge.replace(far_discharge.find(",2026", far_discharge.find("E4,") + 12), 5, ",9999");
    CHECK(replay_error({dir.file("e2.csv", far_discharge), scores, 0}).line == 6);
    // A shorter limit is the user's to set.
    ReplaySource strict{dir.file("e3.csv", march_encounters(6)), scores, 0};
    strict.max_stay_days = 1;
    CHECK(replay_error(strict).line == 2);
    // 2062 for 2026 keeps a two-day stay but lies decades from the rest.
    std::string far_year = march_encounters(8);
    const std::size_t at = far_year.find("E5,");
    far_year.replace(far_year.find("2026", at), 4, "2062");
    far_year.replace(far_year.find("2026", at), 4, "2062");
    const InputError f = replay_error({dir.file("e4.csv", far_year), scores, 0});
    CHECK(f.line == 7);
    CHECK(f.field == "admitted");
    CHECK(mentions(f, "far outside the rest of the log"));
    // The fence is the user's to widen or turn off.
    ReplaySource off{dir.file("e4.csv", far_year), scores, 0};
    off.far_out_fence_iqr = 0;
    CHECK(load_replay(off, TimeZone::utc()).encounters.size() == 8);
    // One stay two months after the rest of a ten-day log is not far out.
    std::string later = march_encounters(8);
    const std::size_t e7 = later.find("E7,");
    later.replace(later.find("2026-03", e7), 7, "2026-05");
    later.replace(later.find("2026-03", e7), 7, "2026-05");
    CHECK(load_replay({dir.file("e5.csv", later), scores, 0}, TimeZone::utc()).encounters.size() == 8);
}

TEST_CASE("replay.text_must_be_utf8_without_control_characters") {
    ScratchDir dir;
    const std::string scores = dir.file("s.csv", "encounter,scored_at,available_at,score\n");
    const std::string header = "encounter,unit,admitted,discharged,outcome_at\n";
    const std::string stay = ",2026-03-03T08:00:00Z,2026-03-04T08:00:00Z,\n";
    const InputError bad_byte = replay_error({dir.file("e1.csv", header + "A,ward \xff" + stay), scores, 0});
    CHECK(bad_byte.line == 2);
    CHECK(bad_byte.field == "unit");
    CHECK(mentions(bad_byte, "byte 0xff"));
    CHECK(mentions(bad_byte, "not UTF-8"));
    const InputError nul = replay_error({dir.file("e2.csv", header + std::string("A\0B,ward", 8) + stay), scores, 0});
    CHECK(nul.field == "encounter");
    CHECK(mentions(nul, "control character U+0000"));
    const InputError overlong = replay_error({dir.file("e3.csv", header + "A,ward \xc0\xaf" + stay), scores, 0});
    CHECK(mentions(overlong, "byte 0xc0"));
    const InputError c1 = replay_error({dir.file("e4.csv", header + "A,ward \xc2\x85" + stay), scores, 0});
    CHECK(mentions(c1, "control character U+0085"));
    // Valid multi-byte names load as they are.
    const Population ok = load_replay({dir.file("e5.csv", header + "A,Station Süd \xe2\x80\x93 3" + stay), scores, 0},
                                      TimeZone::utc());
    CHECK(ok.units.front() == "Station Süd \xe2\x80\x93 3");
    // An unknown encounter id with a bad byte in the scores file says what is wrong with it.
    const InputError score_id = replay_error({dir.file("e6.csv", header + "A,w" + stay),
                                              dir.file("s2.csv", "encounter,scored_at,available_at,score\nA\x01,2026-03-03T09:00:00Z,,5\n"), 0});
    CHECK(score_id.line == 2);
    CHECK(mentions(score_id, "control character U+0001"));
}

TEST_CASE("replay.whole_file_problems_name_line_one") {
    ScratchDir dir;
    const std::string scores = dir.file("s.csv", "encounter,scored_at,available_at,score\n");
    // A directory given as a file.
    const InputError d = replay_error({dir.path(), scores, 0});
    CHECK(d.line == 1);
    CHECK(mentions(d, "is a directory"));
    CHECK_FALSE(mentions(d, "empty"));
    // A missing file.
    CHECK(replay_error({dir.path("nothing.csv"), scores, 0}).line == 1);
    // A header and no rows: nothing to simulate.
    const InputError h = replay_error({dir.file("e.csv", "encounter,unit,admitted,discharged,outcome_at\n\n"), scores, 0});
    CHECK(h.line == 1);
    CHECK(mentions(h, "no encounters"));
    // The scores file as a directory, too.
    CHECK(mentions(replay_error({dir.file("e2.csv", good_encounters), dir.path(), 0}), "is a directory"));
}

TEST_CASE("replay.score_range_and_repeated_scores") {
    ScratchDir dir;
    const std::string enc = dir.file("e.csv", good_encounters);
    const std::string header = "encounter,scored_at,available_at,score\n";
    for (const char* value : {"-5", "150", "1e308"}) {
        CAPTURE(value);
        const InputError e = replay_error({enc, dir.file("s.csv", header + "A,2026-03-03T09:00:00Z,," + value + "\n"), 0});
        CHECK(e.line == 2);
        CHECK(e.field == "score");
        CHECK(mentions(e, "outside score_range [0, 100]"));
    }
    for (const char* value : {"inf", "nan", "NA", ""}) {
        CAPTURE(value);
        CHECK(mentions(replay_error({enc, dir.file("s.csv", header + "A,2026-03-03T09:00:00Z,," + value + "\n"), 0}),
                       "finite number"));
    }
    ReplaySource probability{enc, dir.file("p.csv", header + "A,2026-03-03T09:00:00Z,,0.5\nA,2026-03-03T10:00:00Z,,2\n"), 0};
    probability.score_low = 0;
    probability.score_high = 1;
    CHECK(replay_error(probability).line == 3);

    // The same row sent twice is counted once as a repeat; the one available first is kept.
    const Population twice = load_replay(
        {enc,
         dir.file("r.csv", header + "A,2026-03-03T09:00:00Z,2026-03-03T09:20:00Z,40\n"
                                    "A,2026-03-03T10:00:00Z,,45\n"
                                    "A,2026-03-03T09:00:00Z,2026-03-03T09:05:00Z,40\n"),
         0},
        TimeZone::utc());
    REQUIRE(twice.scores_of(0).size() == 2);
    CHECK(twice.scores_of(0)[0].available_at == parse_timestamp("2026-03-03T09:05:00Z", TimeZone::utc()));
    CHECK(twice.excluded.scores_by_reason.at("repeated row (same encounter, scored_at and score)") == 1);
    // Two different scores at one instant: nothing says which the system saw.
    const InputError conflict = replay_error(
        {enc, dir.file("c.csv", header + "A,2026-03-03T09:00:00Z,,40\nB,2026-03-03T10:00:00Z,,45\nA,2026-03-03T09:00:00Z,,60\n"), 0});
    CHECK(conflict.line == 4);
    CHECK(conflict.field == "score");
    CHECK(mentions(conflict, "line 2"));
}

TEST_CASE("replay.bad_rows_skip_counts_every_skipped_row") {
    // A dirty log: with bad_rows: skip every unusable row is skipped and counted
    // by reason with its first line numbers; the good rows load as usual.
    ScratchDir dir;
    const std::string enc =
        "encounter,unit,admitted,discharged,outcome_at\n"
        "A,ward 1,2026-03-03T08:00:00Z,2026-03-05T08:00:00Z,2026-03-04T08:00:00Z\n"  // 2 good
        "B,ward 2,2026-03-03T09:00:00Z,2026-03-04T09:00:00Z,\n"                      // 3 good
        "C,ward 2,1900-03-03T09:00:00Z,2026-03-04T09:00:00Z,\n"                      // 4 stay too long
        "D,ward \xff,2026-03-03T09:00:00Z,2026-03-04T09:00:00Z,\n"                   // 5 bad text
        "E,ward 2,yesterday,2026-03-04T09:00:00Z,\n"                                 // 6 bad timestamp
        "B,ward 2,2026-03-03T09:00:00Z,2026-03-04T09:00:00Z,\n";                     // 7 repeated id
    const std::string scores =
        "encounter,scored_at,available_at,score\n"
        "A,2026-03-03T09:00:00Z,,40\n"   // 2 good
        "A,2026-03-03T10:00:00Z,,NA\n"   // 3 not a number
        "Z,2026-03-03T10:00:00Z,,40\n"   // 4 unknown encounter
        "C,2026-03-03T10:00:00Z,,40\n"   // 5 encounter skipped
        "B,2026-03-03T10:00:00Z,,150\n"  // 6 out of range
        "B,2026-03-03T11:00:00Z,,50\n"   // 7 good
        "A,2026-03-03T12:00:00Z,,-1\n"   // 8 out of range
        "B,13:00,,50\n"                  // 9 bad timestamp
        "A,2026-03-03T13:00:00Z\n";      // 10 wrong field count
    ReplaySource src{dir.file("enc.csv", enc), dir.file("scores.csv", scores), 0};
    CHECK(replay_error(src).line == 4);  // stop is the default
    src.bad_rows = BadRows::skip;
    const Population pop = load_replay(src, TimeZone::utc());
    REQUIRE(pop.encounters.size() == 2);
    CHECK(pop.units == std::vector<std::string>{"ward 1", "ward 2"});
    CHECK(pop.scores.size() == 2);
    const auto& skipped = pop.excluded.rows_skipped;
    auto lines = [&](const std::string& key) {
        CAPTURE(key);
        REQUIRE(skipped.count(key) == 1);
        return skipped.at(key).first_lines;
    };
    CHECK(lines("enc.csv: stay longer than max_stay_days") == std::vector<long>{4});
    CHECK(lines("enc.csv: text that is not UTF-8 or holds a control character") == std::vector<long>{5});
    CHECK(lines("enc.csv: bad timestamp in admitted") == std::vector<long>{6});
    CHECK(lines("enc.csv: repeated encounter id (the first row is kept)") == std::vector<long>{7});
    CHECK(lines("scores.csv: score that is not a finite number") == std::vector<long>{3});
    CHECK(lines("scores.csv: score for an unknown encounter") == std::vector<long>{4});
    CHECK(lines("scores.csv: score for an encounter whose row was skipped") == std::vector<long>{5});
    CHECK(lines("scores.csv: score outside score_range") == std::vector<long>{6, 8});
    CHECK(lines("scores.csv: bad timestamp in scored_at") == std::vector<long>{9});
    CHECK(lines("scores.csv: wrong number of fields") == std::vector<long>{10});
    std::int64_t total = 0;
    for (const auto& [reason, rows] : skipped) total += rows.count;
    CHECK(total == 4 + 7);  // every bad row above, each once

    // Read in chunks the counts and line numbers are the same.
    ReplaySource chunked = src;
    chunked.parallel_chunk_bytes = 30;
    const Population c = load_replay(chunked, TimeZone::utc());
    REQUIRE(c.excluded.rows_skipped.size() == skipped.size());
    for (const auto& [reason, rows] : skipped) {
        CAPTURE(reason);
        CHECK(c.excluded.rows_skipped.at(reason).count == rows.count);
        CHECK(c.excluded.rows_skipped.at(reason).first_lines == rows.first_lines);
    }
}

TEST_CASE("replay.skipped_rows_keep_the_first_five_lines") {
    ScratchDir dir;
    std::string scores = "encounter,scored_at,available_at,score\n";
    for (int i = 0; i < 12; ++i) scores += "Q,2026-03-03T09:00:00Z,,1\n";  // lines 2..13, unknown encounter
    ReplaySource src{dir.file("enc.csv", good_encounters), dir.file("scores.csv", scores), 0};
    src.bad_rows = BadRows::skip;
    const SkippedRows rows = load_replay(src, TimeZone::utc()).excluded.rows_skipped.at("scores.csv: score for an unknown encounter");
    CHECK(rows.count == 12);
    CHECK(rows.first_lines == std::vector<long>{2, 3, 4, 5, 6});
    CHECK(describe_lines(rows) == "lines 2, 3, 4, 5, 6 and 7 more");
}

TEST_CASE("replay.bad_rows_skip_disagreeing_scores_and_chart_openings") {
    ScratchDir dir;
    ReplaySource src{dir.file("enc.csv", good_encounters),
                     dir.file("scores.csv",
                              "encounter,scored_at,available_at,score\n"
                              "A,2026-03-03T09:00:00Z,,40\n"    // 2: disagrees with line 4
                              "A,2026-03-03T10:00:00Z,,45\n"    // 3: kept
                              "A,2026-03-03T09:00:00Z,,60\n"),  // 4
                     0};
    src.bad_rows = BadRows::skip;
    const Population pop = load_replay(src, TimeZone::utc());
    REQUIRE(pop.scores.size() == 1);
    CHECK(pop.scores[0].value == 45);
    const SkippedRows& both =
        pop.excluded.rows_skipped.at("scores.csv: same encounter and scored_at with different scores (every such row skipped)");
    CHECK(both.count == 2);
    CHECK(both.first_lines == std::vector<long>{2, 4});

    const std::vector<ChartOpeningRole> roles = {{"nurse", 1, {}}};
    const std::string openings = dir.file("o.csv",
                                          "encounter,opened_at,role\n"
                                          "A,2026-03-03T09:00:00Z,nurse\n"       // 2 kept
                                          "Q,2026-03-03T10:00:00Z,nurse\n"       // 3 unknown encounter
                                          "A,2026-03-03T11:00:00Z,doctor\n"      // 4 undeclared role
                                          "A,2026-03-03T11:00:00Z,nur\x7fse\n"   // 5 control character
                                          "B,noon,nurse\n");                     // 6 bad timestamp
    const InputError stop = [&] {
        try {
            load_chart_openings(openings, roles, pop, TimeZone::utc());
        } catch (const InputError& e) {
            return e;
        }
        FAIL("expected an InputError");
        return InputError("", 0, 0, "", "");
    }();
    CHECK(stop.line == 3);
    const ChartOpeningLog log = load_chart_openings(openings, roles, pop, TimeZone::utc(), BadRows::skip);
    CHECK(log.openings.size() == 1);
    CHECK(log.rows_skipped.at("o.csv: chart opening for an unknown encounter").first_lines == std::vector<long>{3});
    CHECK(log.rows_skipped.at("o.csv: role not declared in chart_openings.roles").first_lines == std::vector<long>{4});
    CHECK(log.rows_skipped.at("o.csv: text that is not UTF-8 or holds a control character").first_lines ==
          std::vector<long>{5});
    CHECK(log.rows_skipped.at("o.csv: bad timestamp in opened_at").first_lines == std::vector<long>{6});
}

TEST_CASE("csv.next_record_start_at_any_line_end") {
    // Chunk cuts land just after a line end of any kind, also when a CRLF pair
    // straddles the reader's 64 KiB blocks.
    ScratchDir dir;
    auto cut = [&](const std::string& text, long long from) {
        return next_record_start(dir.file("c.csv", text), from, static_cast<long long>(text.size()));
    };
    CHECK(cut("ab\ncd\n", 0) == 3);
    CHECK(cut("ab\r\ncd\n", 0) == 4);
    CHECK(cut("ab\r\ncd\n", 3) == 4);  // between CR and LF: the pair ends there
    CHECK(cut("ab\rcd\r", 0) == 3);
    CHECK(cut("abcd", 1) == 4);        // no line end: the end of the file
    const std::string long_line(65535, 'x');
    CHECK(cut(long_line + "\r\nyz\n", 0) == 65537);
    CHECK(cut(long_line + "\ryz\n", 0) == 65536);
    CHECK(cut(long_line + "\r", 0) == 65536);
}
