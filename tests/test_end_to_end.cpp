// End to end through the command-line tool on the replayed example and the
// generated demo: golden
// outputs, byte-identical results whatever the thread count, no patient ids
// unless asked, and no partial output when the input is bad.
#include <doctest/doctest.h>

#include <algorithm>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

#include "test_support.hpp"

using namespace tocsin::testing;

namespace {

const std::string source_dir = TOCSIN_SOURCE_DIR;
const std::string demo = source_dir + "/scenarios/fernhollow-replay.yaml";
const std::string generated_demo = source_dir + "/scenarios/demo.yaml";

// Set TOCSIN_UPDATE_GOLDEN=1 to rewrite the golden files after an intended change.
void check_golden(const std::string& produced_path, const std::string& golden_name) {
    const std::string golden_path = source_dir + "/tests/golden/" + golden_name;
    // Outputs name the scenario's files by the path given, so the checkout's
    // own path stands as <source> in a golden file.
    std::string produced = read_file(produced_path);
    REQUIRE_FALSE(produced.empty());
    for (std::size_t at = produced.find(source_dir); at != std::string::npos; at = produced.find(source_dir, at))
        produced.replace(at, source_dir.size(), "<source>");
    if (std::getenv("TOCSIN_UPDATE_GOLDEN")) {
        std::ofstream(golden_path, std::ios::binary) << produced;
        MESSAGE("golden file rewritten: " << golden_path);
    }
    CHECK_MESSAGE(produced == read_file(golden_path), "differs from " << golden_path
                  << " (if the change is intended, rerun with TOCSIN_UPDATE_GOLDEN=1 and review the diff)");
}

// Every CSV table of an output directory in one text, in file-name order, so
// one golden holds them all and a diff names the file.
std::string all_tables(const std::string& directory) {
    std::vector<std::string> names;
    for (const auto& entry : std::filesystem::directory_iterator(directory))
        if (entry.path().extension() == ".csv") names.push_back(entry.path().filename().string());
    std::sort(names.begin(), names.end());
    std::string out;
    for (const std::string& name : names) out += "== " + name + " ==\n" + read_file(directory + "/" + name);
    return out;
}

// The terminal text without the line that reports where files went and how long it took.
std::string terminal_text(const std::string& output) {
    std::string out;
    std::istringstream in(output);
    for (std::string line; std::getline(in, line);)
        if (line.rfind("Wrote ", 0) != 0) out += line + "\n";
    return out;
}

void check_golden_text(const ScratchDir& dir, const std::string& text, const std::string& golden_name) {
    const std::string path = dir.path(golden_name);
    std::ofstream(path, std::ios::binary) << text;
    check_golden(path, golden_name);
}

}  // namespace

TEST_CASE("end_to_end.demo_golden") {
    ScratchDir dir;
    const auto r = run_tocsin("run " + demo + " --out " + dir.path("out") + " --threads 1");
    INFO(r.output);
    REQUIRE(r.exit_code == 0);
    CHECK(r.output.find("not a medical device") != std::string::npos);
    CHECK(r.output.find("page-70") != std::string::npos);
    check_golden(dir.path("out/plan_summary.csv"), "replay_plan_summary.csv");
    check_golden(dir.path("out/exclusions.csv"), "replay_exclusions.csv");
    check_golden(dir.path("out/staff_workload.csv"), "replay_staff_workload.csv");
    check_golden(dir.path("out/staff_escalations.csv"), "replay_staff_escalations.csv");
    check_golden(dir.path("out/task_fates.csv"), "replay_task_fates.csv");
    check_golden(dir.path("out/channel_burden.csv"), "replay_channel_burden.csv");
    CHECK(std::filesystem::exists(dir.path("out/CAUTIONS.txt")));
    // Every table, the HTML report and the terminal summary, so that a change
    // of structure that should not change a byte is proved not to.
    check_golden_text(dir, all_tables(dir.path("out")), "replay_all_tables.txt");
    check_golden(dir.path("out/report.html"), "replay_report.html");
    check_golden_text(dir, terminal_text(r.output), "replay_terminal.txt");
}

TEST_CASE("end_to_end.same_bytes_whatever_the_threads") {
    ScratchDir dir;
    REQUIRE(run_tocsin("run " + demo + " --notice-log --task-log --threads 1 --out " + dir.path("one")).exit_code == 0);
    REQUIRE(run_tocsin("run " + demo + " --notice-log --task-log --threads 2 --out " + dir.path("two")).exit_code == 0);
    int compared = 0;
    for (const auto& entry : std::filesystem::directory_iterator(dir.path("one"))) {
        const std::string name = entry.path().filename().string();
        if (name == "run_record.json") continue;  // records the thread count and time taken, by design
        CAPTURE(name);
        CHECK(read_file(entry.path().string()) == read_file(dir.path("two/" + name)));
        ++compared;
    }
    CHECK(compared >= 9);
}

TEST_CASE("end_to_end.patient_ids_only_on_request") {
    ScratchDir dir;
    REQUIRE(run_tocsin("run " + demo + " --out " + dir.path("plain")).exit_code == 0);
    for (const auto& entry : std::filesystem::directory_iterator(dir.path("plain"))) {
        CAPTURE(entry.path().string());
        CHECK(read_file(entry.path().string()).find("FH-0") == std::string::npos);
    }
    REQUIRE(run_tocsin("run " + demo + " --notice-log --out " + dir.path("log")).exit_code == 0);
    const std::string log = read_file(dir.path("log/notice_log.csv"));
    CHECK(log.rfind("plan,replication,encounter,unit,at,score,reason,channel,evaluation,opener,delivery_minutes\n", 0) == 0);
    CHECK(log.find(",chart_interruption,") != std::string::npos);
    CHECK(log.find(",handoff_list,") != std::string::npos);
    CHECK(log.find(",ranked_review,") != std::string::npos);
    CHECK(log.find("FH-0") != std::string::npos);
    REQUIRE(run_tocsin("run " + demo + " --task-log --out " + dir.path("tasks")).exit_code == 0);
    const std::string tasks = read_file(dir.path("tasks/task_log.csv"));
    CHECK(tasks.rfind("plan,replication,task,encounter,unit,score,created,first_role,role,started,ended,", 0) == 0);
    CHECK(tasks.find("FH-0") != std::string::npos);
}

TEST_CASE("end_to_end.bad_input_writes_nothing") {
    ScratchDir dir;
    // A copy of the demo whose score log has one malformed value on line 3.
    std::string scores = read_file(source_dir + "/scenarios/demo/scores.csv");
    const std::size_t line3 = scores.find('\n', scores.find('\n') + 1) + 1;
    const std::size_t comma = scores.rfind(',', scores.find('\n', line3));
    scores.replace(comma + 1, scores.find('\n', line3) - comma - 1, "n/a");
    dir.file("demo/scores.csv", scores);
    dir.file("demo/encounters.csv", read_file(source_dir + "/scenarios/demo/encounters.csv"));
    dir.file("demo.yaml", read_file(demo));
    const auto r = run_tocsin("run " + dir.path("demo.yaml") + " --out " + dir.path("out"));
    CHECK(r.exit_code == 2);
    CHECK(r.output.find("scores.csv:3:4: score: expected a finite number, found 'n/a'") != std::string::npos);
    CHECK_FALSE(std::filesystem::exists(dir.path("out")));
    const auto c = run_tocsin("check " + dir.path("demo.yaml"));
    CHECK(c.exit_code == 2);
}

TEST_CASE("end_to_end.review_size") {
    // The demo's review plan sized from 1 to 6 per unit: one row per size, and
    // a one-line answer (or the statement that no size in range reaches the target).
    ScratchDir dir;
    const auto r = run_tocsin("review-size " + demo + " --plan review-top4 --sizes 1-6 --target-catch-rate 0.6 --out " +
                              dir.path("size"));
    INFO(r.output);
    REQUIRE(r.exit_code == 0);
    const std::string csv = read_file(dir.path("size/review_size.csv"));
    CHECK(csv.rfind("top_n,replications,cases,cases_low,cases_high,caught,caught_low,caught_high,catch_rate,", 0) == 0);
    CHECK(csv.find(",lead_median_h,lead_median_h_low,lead_median_h_high,caught_per_100_reviews,") != std::string::npos);
    CHECK(std::count(csv.begin(), csv.end(), '\n') == 7);
    CHECK((r.output.find("The shortest list reaching a catch rate of 0.6 is N = ") != std::string::npos ||
           r.output.find("No list length from 1 to 6") != std::string::npos));
    check_golden_text(dir, read_file(dir.path("size/review_size.csv")) + terminal_text(r.output), "replay_review_size.txt");
    // Over replications (the generated demo, 3 of them): an interval on every
    // figure, and the same table whatever the thread count.
    const auto three = run_tocsin("review-size " + generated_demo + " --plan review-top4 --sizes 2-4 -r 3 -j 1 --out " +
                                  dir.path("three"));
    INFO(three.output);
    REQUIRE(three.exit_code == 0);
    CHECK(three.output.find("mean over 3 replications (95% CI)") != std::string::npos);
    {
        // The row for N = 2: 3 replications, and an interval on the catch rate.
        std::istringstream rows(read_file(dir.path("three/review_size.csv")));
        std::string header, row, cell;
        std::getline(rows, header);
        std::getline(rows, row);
        std::vector<std::string> cells;
        std::istringstream split(row);
        while (std::getline(split, cell, ',')) cells.push_back(cell);
        REQUIRE(cells.size() > 10);
        CHECK(cells[0] == "2");
        CHECK(cells[1] == "3");
        CHECK_FALSE(cells[9].empty());   // catch_rate_low
        CHECK_FALSE(cells[10].empty());  // catch_rate_high
        CHECK(std::stod(cells[9]) <= std::stod(cells[8]));
        CHECK(std::stod(cells[8]) <= std::stod(cells[10]));
    }
    const auto threaded = run_tocsin("review-size " + generated_demo + " --plan review-top4 --sizes 2-4 -r 3 -j 2 --out " +
                                     dir.path("threaded"));
    CHECK(read_file(dir.path("three/review_size.csv")) == read_file(dir.path("threaded/review_size.csv")));
    const auto replay_many = run_tocsin("review-size " + demo + " --plan review-top4 -r 2");
    CHECK(replay_many.exit_code == 2);
    const auto page = run_tocsin("review-size " + demo + " --plan page-70");
    CHECK(page.exit_code == 2);
    CHECK(page.output.find("list sizing needs a ranked_review plan") != std::string::npos);
}

TEST_CASE("end_to_end.check_describes_the_scenario") {
    const auto r = run_tocsin("check " + demo);
    INFO(r.output);
    CHECK(r.exit_code == 0);
    CHECK(r.output.find("page-55-rise: page to rapid response nurse when deterioration score >= 55; snooze 4 h; a rise of 10") != std::string::npos);
    CHECK(r.output.find("The scenario is valid.") != std::string::npos);
    CHECK(r.output.find("escalation: rapid response nurse -(30 min)-> house physician; worst case 30 min to reach house physician") != std::string::npos);
    ScratchDir dir;
    check_golden_text(dir, r.output, "replay_check.txt");
}

TEST_CASE("end_to_end.generated_demo_with_replications") {
    // The demo of `./go demo`: a generated population, 20 replications, every
    // figure with an interval; the same bytes whatever the thread count.
    ScratchDir dir;
    const auto one = run_tocsin("run " + generated_demo + " --threads 1 --out " + dir.path("one"));
    INFO(one.output);
    REQUIRE(one.exit_code == 0);
    CHECK(one.output.find("Plans compared over 20 replications: mean \xC2\xB1 half-width of its 95% CI") != std::string::npos);
    CHECK(one.output.find("Paired differences from page-70") != std::string::npos);
    CHECK(one.output.find("not a medical device") != std::string::npos);
    check_golden(dir.path("one/plan_comparison.csv"), "demo_plan_comparison.csv");
    check_golden(dir.path("one/plan_differences.csv"), "demo_plan_differences.csv");
    check_golden_text(dir, all_tables(dir.path("one")), "demo_all_tables.txt");
    check_golden(dir.path("one/report.html"), "demo_report.html");
    check_golden_text(dir, terminal_text(one.output), "demo_terminal.txt");
    REQUIRE(run_tocsin("run " + generated_demo + " --threads 2 --out " + dir.path("two")).exit_code == 0);
    for (const auto& entry : std::filesystem::directory_iterator(dir.path("one"))) {
        const std::string name = entry.path().filename().string();
        if (name == "run_record.json") continue;  // records the thread count and time taken, by design
        CAPTURE(name);
        CHECK(read_file(entry.path().string()) == read_file(dir.path("two/" + name)));
    }
}

TEST_CASE("end_to_end.skipped_rows_are_shown_everywhere") {
    // The replayed example with one bad score on line 3, run with bad_rows: skip:
    // the row is skipped, and `check`, the terminal, exclusions.csv/.json and the
    // report all say so with its line.
    ScratchDir dir;
    std::string scores = read_file(source_dir + "/scenarios/demo/scores.csv");
    const std::size_t line3 = scores.find('\n', scores.find('\n') + 1) + 1;
    const std::size_t comma = scores.rfind(',', scores.find('\n', line3));
    scores.replace(comma + 1, scores.find('\n', line3) - comma - 1, "n/a");
    dir.file("demo/scores.csv", scores);
    dir.file("demo/encounters.csv", read_file(source_dir + "/scenarios/demo/encounters.csv"));
    std::string yaml = read_file(demo);
    yaml.replace(yaml.find("    scores: demo/scores.csv\n"), 28, "    scores: demo/scores.csv\n    bad_rows: skip\n");
    dir.file("demo.yaml", yaml);
    const std::string expected = "scores.csv: score that is not a finite number (line 3)";
    const auto c = run_tocsin("check " + dir.path("demo.yaml"));
    INFO(c.output);
    CHECK(c.exit_code == 0);
    CHECK(c.output.find("skipped: 1 row, " + expected) != std::string::npos);
    const auto r = run_tocsin("run " + dir.path("demo.yaml") + " --out " + dir.path("out"));
    REQUIRE(r.exit_code == 0);
    CHECK(r.output.find(expected) != std::string::npos);
    CHECK(read_file(dir.path("out/exclusions.csv")).find("skipped rows," + expected + ",1") != std::string::npos);
    CHECK(read_file(dir.path("out/exclusions.json")).find(expected) != std::string::npos);
    CHECK(read_file(dir.path("out/report.html")).find(expected) != std::string::npos);
}

TEST_CASE("end_to_end.lone_cr_log_checks_like_the_original") {
    // The replayed example saved with lone CR line ends reads the same rows.
    ScratchDir dir;
    for (const std::string name : {"scores.csv", "encounters.csv"}) {
        std::string text = read_file(source_dir + "/scenarios/demo/" + name);
        std::replace(text.begin(), text.end(), '\n', '\r');
        dir.file("demo/" + name, text);
    }
    dir.file("demo.yaml", read_file(demo));
    const auto original = run_tocsin("check " + demo);
    const auto cr = run_tocsin("check " + dir.path("demo.yaml"));
    REQUIRE(original.exit_code == 0);
    CHECK(cr.exit_code == 0);
    const auto input_line = [](const std::string& out) {
        const std::size_t at = out.find("Input: ");
        return at == std::string::npos ? std::string() : out.substr(at, out.find('\n', at) - at);
    };
    CHECK_FALSE(input_line(original.output).empty());
    CHECK(input_line(cr.output) == input_line(original.output));
}

TEST_CASE("end_to_end.stress_test_sweep_and_evaluate_goldens") {
    // The other commands' every output, byte for byte: a generated population
    // under a stress-test shift, a two-axis sweep, and the model evaluation
    // with a probability mapping (calibration and decision curve included).
    ScratchDir dir;
    const auto shifted = run_tocsin("run " + source_dir + "/scenarios/generated.yaml -r 3 --threads 2 --out " + dir.path("shifted"));
    INFO(shifted.output);
    REQUIRE(shifted.exit_code == 0);
    check_golden_text(dir, all_tables(dir.path("shifted")), "generated_all_tables.txt");
    check_golden(dir.path("shifted/report.html"), "generated_report.html");
    check_golden_text(dir, terminal_text(shifted.output), "generated_terminal.txt");

    const auto sweep = run_tocsin("sweep " + generated_demo +
                                  " --vary plan.rule.threshold=50:70:5 --vary plan.rule.snooze_minutes=60,240 -r 2 --threads 2 --out " +
                                  dir.path("sweep"));
    INFO(sweep.output);
    REQUIRE(sweep.exit_code == 0);
    check_golden_text(dir, all_tables(dir.path("sweep")), "sweep_all_tables.txt");
    check_golden(dir.path("sweep/report.html"), "sweep_report.html");
    check_golden(dir.path("sweep/whatif.html"), "sweep_whatif.html");
    check_golden_text(dir, terminal_text(sweep.output), "sweep_terminal.txt");

    const auto evaluation = run_tocsin("evaluate " + demo + " --probability divide:100 --evaluate-per-case 5 --out " +
                                       dir.path("evaluation"));
    INFO(evaluation.output);
    REQUIRE(evaluation.exit_code == 0);
    check_golden_text(dir, all_tables(dir.path("evaluation")) + terminal_text(evaluation.output), "evaluate_all.txt");
}

TEST_CASE("end_to_end.resampled_log_shows_as_logged_and_every_basis") {
    // The invented log with a day bootstrap and 20 replications: each mean has
    // the log's own figure beside it, every table written is listed in
    // tables.csv with what it rests on, and the report shows both.
    const std::string resampled = source_dir + "/scenarios/fernhollow-resampled.yaml";
    ScratchDir dir;
    const auto run = run_tocsin("run " + resampled + " --out " + dir.path("out"));
    INFO(run.output);
    REQUIRE(run.exit_code == 0);
    CHECK(run.output.find("  as logged") != std::string::npos);
    // Its reporting period lies inside the days the bootstrap draws from.
    CHECK(run.output.find("reaches outside the days the bootstrap draws from") == std::string::npos);
    check_golden_text(dir, terminal_text(run.output), "resampled_terminal.txt");
    check_golden(dir.path("out/plan_comparison.csv"), "resampled_plan_comparison.csv");

    // tables.csv: one row per CSV table written, none missing, each with a basis.
    std::vector<std::string> written;
    for (const auto& entry : std::filesystem::directory_iterator(dir.path("out")))
        if (entry.path().extension() == ".csv" && entry.path().stem() != "tables")
            written.push_back(entry.path().stem().string());
    std::sort(written.begin(), written.end());
    std::vector<std::string> indexed;
    std::istringstream index(read_file(dir.path("out/tables.csv")));
    std::string line;
    std::getline(index, line);
    CHECK(line == "table,title,basis,rows");
    while (std::getline(index, line)) {
        indexed.push_back(line.substr(0, line.find(',')));
        CHECK(line.find("replication") != std::string::npos);  // every basis names its replication(s)
    }
    std::sort(indexed.begin(), indexed.end());
    CHECK(indexed == written);
    const std::string report = read_file(dir.path("out/report.html"));
    CHECK(report.find("<span class=\"basis\">Basis: 20 replications (replication 0 included)") != std::string::npos);
    CHECK(report.find("as logged") != std::string::npos);

    // The same scenario with its reporting period over the log's first days,
    // whose census is still filling: a warning, in the terminal and the report.
    std::string text = read_file(resampled);
    const std::string from = "from: \"2026-10-26 07:00:00\"";
    REQUIRE(text.find(from) != std::string::npos);
    text.replace(text.find(from), from.size(), "from: \"2026-10-19 07:00:00\"");
    // The copy names its log relative to itself: point it at the repository's.
    for (std::size_t at = text.find(" demo/"); at != std::string::npos; at = text.find(" demo/", at))
        text.replace(at + 1, 5, source_dir + "/scenarios/demo/");
    const std::string early = dir.path("early.yaml");
    std::ofstream(early, std::ios::binary) << text;
    const auto warned = run_tocsin("run " + early + " --report " + dir.path("early.html"));
    INFO(warned.output);
    REQUIRE(warned.exit_code == 0);
    CHECK(warned.output.find("reaches outside the days the bootstrap draws from") != std::string::npos);
    CHECK(read_file(dir.path("early.html")).find("reaches outside the days the bootstrap draws from") != std::string::npos);
}
