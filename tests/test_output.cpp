// What reaches CSV and JSON files: numbers that read back to the same double,
// non-finite numbers spelled validly, and text that is valid UTF-8 whatever
// bytes a name carried.
#include <doctest/doctest.h>

#include "report/comparison_tables.hpp"

#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <limits>
#include <sstream>
#include <string>
#include <vector>

#include <csignal>
#include <sys/wait.h>
#include <unistd.h>

#include "report/output.hpp"
#include "report/table.hpp"
#include "test_support.hpp"

using namespace tocsin;
using namespace tocsin::testing;

namespace {

// Reads the text back with strtod, which the C library rounds correctly.
double read_back(const std::string& text) {
    char* end = nullptr;
    const double v = std::strtod(text.c_str(), &end);
    CHECK(*end == '\0');
    return v;
}

Table one_real(double v) {
    Table t;
    t.name = "t";
    t.columns = {"x"};
    t.add_row({v});
    return t;
}

// Every byte sequence decodes as UTF-8 (strict: no overlongs, surrogates or
// values above U+10FFFF). Written out here rather than through the library's
// decoder, so the check does not share the writer's mistakes.
bool strict_utf8(const std::string& s) {
    for (std::size_t i = 0; i < s.size();) {
        const auto b = [&](std::size_t k) { return static_cast<unsigned char>(s[k]); };
        const unsigned char c = b(i);
        std::size_t n = 0;
        std::uint32_t cp = 0;
        if (c < 0x80) { ++i; continue; }
        if ((c & 0xE0) == 0xC0) { n = 2; cp = c & 0x1F; }
        else if ((c & 0xF0) == 0xE0) { n = 3; cp = c & 0x0F; }
        else if ((c & 0xF8) == 0xF0) { n = 4; cp = c & 0x07; }
        else return false;
        if (i + n > s.size()) return false;
        for (std::size_t k = 1; k < n; ++k) {
            if ((b(i + k) & 0xC0) != 0x80) return false;
            cp = (cp << 6) | (b(i + k) & 0x3F);
        }
        const std::uint32_t least[] = {0, 0, 0x80, 0x800, 0x10000};
        if (cp < least[n] || cp > 0x10FFFF || (cp >= 0xD800 && cp <= 0xDFFF)) return false;
        i += n;
    }
    return true;
}

}  // namespace

TEST_CASE("output.numbers_read_back_exactly") {
    // A small net benefit keeps its digits; sums that are not what they look
    // like keep theirs; very small and very large magnitudes survive.
    for (double v : {0.000012, 1.0 / 3.0, 0.1 + 0.2, 2.5e-9, 6.02214076e23, 1e-300, -0.000999, 123456.789, 5e-324,
                     std::numeric_limits<double>::max(), 0.5, 12.0, -7.25}) {
        CAPTURE(v);
        const std::string csv = to_csv(one_real(v));
        const std::string cell = csv.substr(2, csv.size() - 3);  // after "x\n", before the final newline
        CHECK(read_back(cell) == v);
        const std::string json = to_json(one_real(v));
        const std::size_t colon = json.find(": ");
        const std::string value = json.substr(colon + 2, json.find('}') - colon - 2);
        CHECK(read_back(value) == v);
    }
    CHECK(to_csv(one_real(0.000012)) == "x\n1.2e-05\n");
    CHECK(to_csv(one_real(0.5)) == "x\n0.5\n");
    CHECK(to_csv(one_real(12.0)) == "x\n12\n");
    CHECK(to_csv(one_real(-0.0)) == "x\n0\n");  // no "-0" for a zero difference
}

TEST_CASE("output.non_finite_numbers") {
    for (double v : {std::nan(""), std::numeric_limits<double>::infinity(), -std::numeric_limits<double>::infinity()}) {
        CAPTURE(v);
        CHECK(to_csv(one_real(v)) == "x\n\n");
        CHECK(to_json(one_real(v)) == "[\n {\"x\": null}\n]\n");
    }
}

TEST_CASE("output.terminal_text_stays_rounded") {
    CHECK(to_text(one_real(0.000012), 2).find("0\n") != std::string::npos);
    CHECK(to_text(one_real(1.0 / 3.0), 3).find("0.333\n") != std::string::npos);
}

TEST_CASE("output.terminal_headers_wrap_at_underscores") {
    // A name wider than its column's cells goes over several lines, broken
    // after an underscore, bottom-aligned; the rows keep the column's width.
    Table t = make_table("t", "", {"plan", "patients_per_unit_night_mean", "x"});
    t.add_row({std::string("A"), 0.25, std::int64_t{3}});
    const std::string text = to_text(t, 2);
    CHECK(text ==
          "       patients_\n"
          "       per_unit_\n"
          "plan  night_mean  x\n"
          "A           0.25  3\n");
    // A name as narrow as ten characters stays on one line.
    Table narrow = make_table("n", "", {"shift_mean"});
    narrow.add_row({1.5});
    CHECK(to_text(narrow, 2) == "shift_mean\n       1.5\n");
}

TEST_CASE("output.mean_and_margin") {
    // The t interval is symmetric: "mean ±half-width".
    MeanInterval m;
    m.mean = 2.0;
    m.low = 1.75;
    m.high = 2.25;
    m.n = 5;
    CHECK(with_margin(m, 2) == "2 \xC2\xB1" "0.25");
    m.low = m.high = std::nan("");
    CHECK(with_margin(m, 2) == "2");  // one replication: no interval
}

TEST_CASE("output.text_is_valid_utf8") {
    const std::string bad[] = {
        std::string("caf\xE9"),                // Latin-1, not UTF-8
        std::string("\xC0\xAF"),               // overlong '/'
        std::string("\xED\xA0\x80"),           // a surrogate
        std::string("\xF4\x90\x80\x80"),       // above U+10FFFF
        std::string("cut \xE2\x82"),           // truncated sequence at the end
        std::string("\xFF\xFE plan"),
    };
    for (const std::string& s : bad) {
        CAPTURE(s);
        Table t;
        t.name = "t";
        t.columns = {"name", s};
        t.add_row({s, 1.0});
        const std::string csv = to_csv(t), json = to_json(t);
        CHECK(strict_utf8(csv));
        CHECK(strict_utf8(json));
        CHECK(csv.find("\xEF\xBF\xBD") != std::string::npos);
        CHECK(json.find("\xEF\xBF\xBD") != std::string::npos);
    }
    // Valid text passes unchanged, emoji included.
    const std::string fine = "4 Nord \xC3\xA9tage \xF0\x9F\x9A\x91 \xE2\x80\x94 \"B\\C\"";
    CHECK(csv_field(fine) == "\"4 Nord \xC3\xA9tage \xF0\x9F\x9A\x91 \xE2\x80\x94 \"\"B\\C\"\"\"");
    CHECK(json_escape(fine) == "\"4 Nord \xC3\xA9tage \xF0\x9F\x9A\x91 \xE2\x80\x94 \\\"B\\\\C\\\"\"");
}

TEST_CASE("output.json_escapes_control_characters") {
    CHECK(json_escape(std::string("a\x01" "b\x1F" "c\x7F" "d", 7)) == "\"a\\u0001b\\u001fc\\u007fd\"");
    CHECK(json_escape(std::string("nul\0x", 5)) == "\"nul\\u0000x\"");
    CHECK(json_escape("tab\tline\ncr\r") == "\"tab\\tline\\ncr\\r\"");
    // U+2028 and U+2029 are valid JSON but end a line in older JavaScript.
    CHECK(json_escape("a\xE2\x80\xA8" "b\xE2\x80\xA9") == "\"a\\u2028b\\u2029\"");
}

// ---- The output directory: no mix of two runs, no partial files -----------

namespace {

const std::string replay_scenario = std::string(TOCSIN_SOURCE_DIR) + "/scenarios/fernhollow-replay.yaml";

std::vector<std::string> names_in(const std::string& directory) {
    std::vector<std::string> names;
    for (const auto& e : std::filesystem::directory_iterator(directory)) names.push_back(e.path().filename().string());
    std::sort(names.begin(), names.end());
    return names;
}

// The file names the manifest lists, sorted (comment lines skipped).
std::vector<std::string> manifest_entries(const std::string& directory) {
    std::istringstream in(read_file(directory + "/tocsin-manifest.txt"));
    std::vector<std::string> names;
    for (std::string line; std::getline(in, line);)
        if (!line.empty() && line[0] != '#') names.push_back(line);
    std::sort(names.begin(), names.end());
    return names;
}

}  // namespace

TEST_CASE("output.second_run_replaces_the_first_entirely") {
    ScratchDir dir;
    const std::string out = dir.path("out");
    const auto first = run_tocsin("run " + replay_scenario + " --notice-log --task-log --out " + out);
    INFO(first.output);
    REQUIRE(first.exit_code == 0);
    REQUIRE(std::filesystem::exists(out + "/notice_log.csv"));
    // The second run asks for no patient-level logs: last run's logs must go,
    // and every file left is one this run wrote.
    const auto second = run_tocsin("run " + replay_scenario + " --out " + out);
    INFO(second.output);
    REQUIRE(second.exit_code == 0);
    CHECK_FALSE(std::filesystem::exists(out + "/notice_log.csv"));
    CHECK_FALSE(std::filesystem::exists(out + "/task_log.json"));
    std::vector<std::string> expected = manifest_entries(out);
    expected.push_back("tocsin-manifest.txt");
    std::sort(expected.begin(), expected.end());
    CHECK(names_in(out) == expected);
    CHECK(expected.size() > 20);
}

TEST_CASE("output.refuses_a_directory_tocsin_did_not_write") {
    ScratchDir dir;
    const std::string notes = dir.file("mine/notes.txt", "my own notes\n");
    const auto r = run_tocsin("run " + replay_scenario + " --out " + dir.path("mine"));
    CHECK(r.exit_code == 2);
    CHECK(r.output.find(dir.path("mine")) != std::string::npos);
    CHECK(r.output.find("tocsin-manifest.txt") != std::string::npos);
    CHECK(names_in(dir.path("mine")) == std::vector<std::string>{"notes.txt"});
    CHECK(read_file(notes) == "my own notes\n");
    // An empty directory is fine.
    std::filesystem::create_directories(dir.path("empty"));
    CHECK(run_tocsin("run " + replay_scenario + " --out " + dir.path("empty")).exit_code == 0);
}

TEST_CASE("output.manifest_entries_stay_inside_the_directory") {
    ScratchDir dir;
    const std::string out = dir.path("out");
    REQUIRE(run_tocsin("run " + replay_scenario + " --out " + out).exit_code == 0);
    const std::string precious = dir.file("precious.csv", "keep me\n");
    for (const std::string entry : {"../precious.csv", "sub/x.csv", ".."}) {
        CAPTURE(entry);
        const std::string manifest = read_file(out + "/tocsin-manifest.txt");
        dir.file("out/tocsin-manifest.txt", manifest + entry + "\n");
        const auto before = names_in(out);
        const auto r = run_tocsin("run " + replay_scenario + " --out " + out);
        CHECK(r.exit_code == 2);
        CHECK(r.output.find("tocsin-manifest.txt") != std::string::npos);
        CHECK(r.output.find(entry) != std::string::npos);
        CHECK(read_file(precious) == "keep me\n");
        CHECK(names_in(out) == before);
        dir.file("out/tocsin-manifest.txt", manifest);
    }
}

namespace {

// Starts `tocsin run` with the test pause (TOCSIN_PAUSE_BEFORE_COMMIT: every
// partial file is written, nothing renamed yet), waits until it says so on
// stderr, sends `signal` and returns the wait status.
int interrupt_before_commit(const std::string& out, int signal) {
    int err[2];
    REQUIRE(::pipe(err) == 0);
    const pid_t pid = ::fork();
    REQUIRE(pid >= 0);
    if (pid == 0) {
        ::dup2(err[1], 2);
        ::close(err[0]);
        ::close(err[1]);
        std::freopen("/dev/null", "w", stdout);
        ::setenv("TOCSIN_PAUSE_BEFORE_COMMIT", "60", 1);
        ::execl(TOCSIN_BINARY, TOCSIN_BINARY, "run", replay_scenario.c_str(), "--notice-log", "--out", out.c_str(),
                static_cast<char*>(nullptr));
        ::_exit(127);
    }
    ::close(err[1]);
    std::string said;
    char buf[512];
    ssize_t n = 0;
    while (said.find("pausing") == std::string::npos && (n = ::read(err[0], buf, sizeof buf)) > 0) said.append(buf, static_cast<std::size_t>(n));
    INFO(said);
    CHECK(said.find("pausing") != std::string::npos);
    ::kill(pid, signal);
    int status = 0;
    ::waitpid(pid, &status, 0);
    ::close(err[0]);
    return status;
}

bool has_partial(const std::string& directory) {
    for (const auto& e : std::filesystem::directory_iterator(directory))
        if (e.path().filename().string().find(".partial") != std::string::npos) return true;
    return false;
}

}  // namespace

TEST_CASE("output.interrupted_run_leaves_no_partial_files") {
    for (int signal : {SIGINT, SIGTERM, SIGHUP}) {
        CAPTURE(signal);
        ScratchDir dir;
        // Into a new directory: nothing at all remains.
        const int status = interrupt_before_commit(dir.path("new/out"), signal);
        CHECK(WIFSIGNALED(status));
        CHECK((WIFSIGNALED(status) && WTERMSIG(status) == signal));
        CHECK_FALSE(std::filesystem::exists(dir.path("new/out")));
        // Over an earlier run: that run stays whole and untouched.
        const std::string out = dir.path("earlier");
        REQUIRE(run_tocsin("run " + replay_scenario + " --out " + out).exit_code == 0);
        std::vector<std::string> before;
        for (const std::string& name : names_in(out)) before.push_back(name + "\n" + read_file(out + "/" + name));
        const int again = interrupt_before_commit(out, signal);
        CHECK((WIFSIGNALED(again) && WTERMSIG(again) == signal));
        CHECK_FALSE(has_partial(out));
        std::vector<std::string> after;
        for (const std::string& name : names_in(out)) after.push_back(name + "\n" + read_file(out + "/" + name));
        CHECK(after == before);
    }
}

TEST_CASE("output.only_listed_files_are_removed") {
    ScratchDir dir;
    const std::string out = dir.path("out");
    write_output_files(out, {{"a.csv", "1\n"}, {"b.csv", "2\n"}, {"keep", "3\n"}});
    CHECK(manifest_entries(out) == std::vector<std::string>{"a.csv", "b.csv", "keep"});
    dir.file("out/.b.csv.partial", "left by a run killed outright\n");
    // Beside tocsin's files: a file of the user's, and a directory under a name
    // the manifest lists (not tocsin's, so not removed).
    dir.file("out/notes.txt", "mine\n");
    std::filesystem::remove(out + "/keep");
    dir.file("out/keep/inside.txt", "mine too\n");
    // A link planted at a partial name must not be written through.
    const std::string outside = dir.file("outside.txt", "untouched\n");
    std::filesystem::create_symlink(outside, out + "/.a.csv.partial");
    write_output_files(out, {{"a.csv", "one\n"}});
    CHECK(names_in(out) == std::vector<std::string>{"a.csv", "keep", "notes.txt", "tocsin-manifest.txt"});
    CHECK(read_file(out + "/a.csv") == "one\n");
    CHECK(read_file(out + "/notes.txt") == "mine\n");
    CHECK(read_file(out + "/keep/inside.txt") == "mine too\n");
    CHECK(read_file(outside) == "untouched\n");
    CHECK(manifest_entries(out) == std::vector<std::string>{"a.csv"});
}

TEST_CASE("output.refusal_writes_nothing") {
    ScratchDir dir;
    dir.file("theirs/data.csv", "x\n");
    CHECK_THROWS_AS(check_output_directory(dir.path("theirs")), std::invalid_argument);
    CHECK_THROWS_AS(write_output_files(dir.path("theirs"), {{"a.csv", "1\n"}}), std::invalid_argument);
    CHECK(names_in(dir.path("theirs")) == std::vector<std::string>{"data.csv"});
    CHECK_THROWS_AS(check_output_directory(dir.path("theirs/data.csv")), std::invalid_argument);  // not a directory
    CHECK_NOTHROW(check_output_directory(dir.path("not/yet")));
    CHECK_FALSE(std::filesystem::exists(dir.path("not")));
}

TEST_CASE("output.single_file_touches_nothing_else") {
    ScratchDir dir;
    dir.file("here/other.txt", "mine\n");
    write_output_file(dir.path("here/report.html"), "<p>report</p>\n");
    CHECK(names_in(dir.path("here")) == std::vector<std::string>{"other.txt", "report.html"});
    write_output_file(dir.path("new/deeper/report.html"), "<p>again</p>\n");
    CHECK(read_file(dir.path("new/deeper/report.html")) == "<p>again</p>\n");
}
