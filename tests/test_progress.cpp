// The phases of a run (PhaseLog), their table (`--phases`), and the progress
// line a terminal shows: its wording, and that nothing reaches a stderr that
// is not a terminal.
#include <doctest/doctest.h>

#include <chrono>
#include <cstdio>
#include <fstream>
#include <sstream>
#include <thread>

#include "report/progress_text.hpp"
#include "report/terminal_progress.hpp"
#include "test_support.hpp"

using namespace tocsin;

TEST_CASE("progress.line_with_a_bar_and_time_left") {
    // 3 of 20 done: 3 of the bar's 20 marks, 15 %, and 12 s x 17 / 3 = 68 s left.
    CHECK(progress_line("simulate", 3, 20, 12.0) ==
          "  simulate  replication 3/20 [###.................]  15%  12 s, ~68 s left");
    // All done: a full bar and no time left to guess.
    CHECK(progress_line("evaluate", 20, 20, 40.2) ==
          "  evaluate  replication 20/20 [####################] 100%  40 s");
}

TEST_CASE("progress.line_without_a_count_shows_the_phase_and_seconds") {
    CHECK(progress_line("read", 0, 0, 3.4) == "  read  3 s");
    // Never wider than the terminal line it is drawn on.
    CHECK(progress_line("a phase with a very long name indeed", 1, 3, 1.0, 30).size() == 30);
}

TEST_CASE("progress.phase_table") {
    const std::vector<PhaseFigures> phases = {{"read", 2.5, 3.25, 1024 * 1200, 1}, {"evaluate", 0.125, 0.5, 1024 * 1500, 2}};
    const PhaseFigures total{"total", 3.0, 4.0, 1024 * 1500, 1};
    CHECK(phase_table_text(phases, total) ==
          "phase        wall s   CPU s  peak MiB  spans\n"
          "read           2.50    3.25      1200      1\n"
          "evaluate       0.12    0.50      1500      2\n"
          "total          3.00    4.00      1500      1\n");
}

TEST_CASE("progress.phase_log_keeps_phases_in_first_entered_order") {
    PhaseLog log;
    std::vector<std::string> started;
    log.on_start([&](std::string_view name) { started.emplace_back(name); });
    { const auto span = phase(&log, "read"); }
    for (int i = 0; i < 3; ++i) {
        const auto span = phase(&log, "simulate");
        std::this_thread::sleep_for(std::chrono::milliseconds(10));
    }
    { const auto span = phase(nullptr, "not logged"); }
    const auto figures = log.figures();
    REQUIRE(figures.size() == 2);
    CHECK(figures[0].name == "read");
    CHECK(figures[0].spans == 1);
    CHECK(figures[1].name == "simulate");
    CHECK(figures[1].spans == 3);
    // From the first entry to the last exit: at least the three sleeps.
    CHECK(figures[1].wall_seconds >= 0.03);
    CHECK(figures[1].peak_memory_kib > 0);
    CHECK(started == std::vector<std::string>{"read", "simulate", "simulate", "simulate"});
}

namespace {
std::string drawn(bool enabled) {
    std::FILE* sink = std::tmpfile();
    {
        PhaseLog log;
        TerminalProgress progress(log, enabled, sink, 0.0);
        const ProgressReport report = progress.replications();
        CHECK(static_cast<bool>(report) == enabled);
        const auto span = phase(&log, "simulate");
        if (report) report(1, 4);
        std::this_thread::sleep_for(std::chrono::milliseconds(800));  // the line is redrawn every 250 ms
    }
    std::rewind(sink);
    std::string text;
    for (int c; (c = std::fgetc(sink)) != EOF;) text += static_cast<char>(c);
    std::fclose(sink);
    return text;
}
}  // namespace

TEST_CASE("progress.drawn_on_a_terminal_only") {
    const std::string on = drawn(true);
    CHECK(on.find("simulate  replication 1/4 [#####...............]  25%") != std::string::npos);
    CHECK(on.back() == '\r');  // the line is cleared at the end
    CHECK(drawn(false).empty());
}

TEST_CASE("progress.a_redirected_run_writes_nothing_on_stderr") {
    testing::ScratchDir dir;
    const std::string demo = std::string(TOCSIN_SOURCE_DIR) + "/scenarios/demo.yaml";
    const std::string err = dir.path("stderr.txt");
    const std::string base = std::string(TOCSIN_BINARY) + " run " + demo + " --threads 1 > /dev/null 2> " + err;
    REQUIRE(std::system(base.c_str()) == 0);
    std::ifstream quiet(err);
    std::stringstream q;
    q << quiet.rdbuf();
    CHECK(q.str().empty());
    // --phases adds the phase table, still without a progress line.
    REQUIRE(std::system((base + " --phases").c_str()) == 0);
    std::ifstream timed(err);
    std::stringstream t;
    t << timed.rdbuf();
    CHECK(t.str().rfind("phase        wall s   CPU s  peak MiB  spans\nread ", 0) == 0);
    CHECK(t.str().find("\ntotal ") != std::string::npos);
    CHECK(t.str().find('\r') == std::string::npos);
}
