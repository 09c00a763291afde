// `tocsin generate`: the written files replay as the same population, so a
// scenario that replays them gives the generating scenario's figures; the
// same replication gives the same bytes; bad input writes nothing.
#include <doctest/doctest.h>

#include <cstdio>
#include <filesystem>
#include <sstream>
#include <string>

#include "models/population_source.hpp"
#include "study/scenario.hpp"
#include "population_fixtures.hpp"
#include "test_support.hpp"

using namespace tocsin;
using namespace tocsin::testing;

namespace {

const std::string source_dir = TOCSIN_SOURCE_DIR;


// `scenario_text` without its top-level time_zone, reporting and population
// blocks, followed by `fragment` (what replay.yaml says to do).
std::string with_fragment(const std::string& scenario_text, const std::string& fragment) {
    std::istringstream in(scenario_text);
    std::string out;
    bool skipping = false;
    for (std::string line; std::getline(in, line);) {
        if (!line.empty() && line[0] != ' ' && line[0] != '#') {
            const std::string key = line.substr(0, line.find(':'));
            skipping = key == "time_zone" || key == "reporting" || key == "population";
        }
        if (!skipping) out += line + "\n";
    }
    return out + fragment;
}

Population population_of(const std::string& scenario, std::uint64_t replication) {
    const Scenario sc = load_scenario(scenario);
    return population_for(sc.population, prepare_population(sc.population), replication);
}

}  // namespace

TEST_CASE("generate.cli_replayed_files_give_the_same_figures") {
    const std::string generated = source_dir + "/scenarios/generated.yaml";
    ScratchDir dir;
    const auto g = run_tocsin("generate " + generated + " --out " + dir.path("gen"));
    INFO(g.output);
    REQUIRE(g.exit_code == 0);
    CHECK(g.output.find("The files hold encounter ids") != std::string::npos);
    for (const std::string name : {"encounters.csv\n", "scores.csv\n", "replay.yaml\n"})
        CHECK(read_file(dir.path("gen/tocsin-manifest.txt")).find(name) != std::string::npos);

    // A scenario beside the files: generated.yaml's shifts, outcome and plans, replay.yaml's population.
    const std::string replay = dir.file("gen/replay-scenario.yaml",
                                        with_fragment(read_file(generated), read_file(dir.path("gen/replay.yaml"))));
    CHECK(population_rows(population_of(replay, 0)) == population_rows(population_of(generated, 0)));

    const auto a = run_tocsin("run " + generated + " --threads 1 --out " + dir.path("a"));
    const auto b = run_tocsin("run " + replay + " --threads 1 --out " + dir.path("b"));
    INFO(a.output);
    INFO(b.output);
    REQUIRE(a.exit_code == 0);
    REQUIRE(b.exit_code == 0);
    for (const std::string table : {"plan_summary.csv", "plan_comparison.csv", "unit_shift_notices.csv", "channel_burden.csv"}) {
        CAPTURE(table);
        CHECK(read_file(dir.path("a/" + table)).size() > 100);
        CHECK(read_file(dir.path("a/" + table)) == read_file(dir.path("b/" + table)));
    }
}

TEST_CASE("generate.cli_replication_n_and_a_resampled_log") {
    ScratchDir dir;
    SUBCASE("the same replication gives the same bytes, another gives other patients") {
        const std::string generated = source_dir + "/scenarios/generated.yaml";
        REQUIRE(run_tocsin("generate " + generated + " --replication 2 --out " + dir.path("one")).exit_code == 0);
        REQUIRE(run_tocsin("generate " + generated + " --replication 2 -o " + dir.path("two")).exit_code == 0);
        REQUIRE(run_tocsin("generate " + generated + " --out " + dir.path("zero")).exit_code == 0);
        CHECK(read_file(dir.path("one/scores.csv")) == read_file(dir.path("two/scores.csv")));
        CHECK(read_file(dir.path("one/encounters.csv")) == read_file(dir.path("two/encounters.csv")));
        CHECK(read_file(dir.path("one/encounters.csv")) != read_file(dir.path("zero/encounters.csv")));
        CHECK(read_file(dir.path("one/replay.yaml")).find("replication 2") != std::string::npos);
    }
    SUBCASE("a bootstrap replication of the demo log comes back as population_for gives it") {
        const std::string demo = source_dir + "/scenarios/demo/";
        const std::string boot = dir.file("boot.yaml",
                                          "scenario_schema: 1\nname: resampled demo\ntime_zone: America/Chicago\nseed: 4\n"
                                          "shifts:\n  - {name: day, starts: \"07:00\"}\n  - {name: night, starts: \"19:00\", night: true}\n"
                                          "outcome: {window_hours: 24}\n"
                                          "plans:\n  - name: p\n    rule: {threshold: 60}\n"
                                          "population:\n  replay:\n    encounters: " + demo + "encounters.csv\n"
                                          "    scores: " + demo + "scores.csv\n  bootstrap: {block_days: 1}\n");
        const auto r = run_tocsin("generate " + boot + " --replication 2 --out " + dir.path("out"));
        INFO(r.output);
        REQUIRE(r.exit_code == 0);
        CHECK(r.output.find("from the log (patient-level identifiers)") != std::string::npos);
        CHECK(read_file(dir.path("out/encounters.csv")).find('~') != std::string::npos);  // resampled copies
        const std::string replay = dir.file("out/replay-scenario.yaml",
                                            with_fragment(read_file(boot), read_file(dir.path("out/replay.yaml"))));
        CHECK(population_rows(population_of(replay, 0)) == population_rows(population_of(boot, 2)));
    }
}

TEST_CASE("generate.cli_refuses_bad_input_and_writes_nothing") {
    const std::string generated = source_dir + "/scenarios/generated.yaml";
    const std::string plain_replay = source_dir + "/scenarios/fernhollow-replay.yaml";
    ScratchDir dir;
    std::string args, expected, target = dir.path("out");
    int exit_code = 2;
    SUBCASE("no --out") {
        args = "generate " + generated;
        expected = "command line: --out: required";
    }
    SUBCASE("a replication a plain replay does not have") {
        args = "generate " + plain_replay + " --replication 1 --out " + target;
        expected = "--replication: no replication 1 in " + plain_replay + ": a plain replay is the same in every replication";
    }
    SUBCASE("a replication index out of range") {
        args = "generate " + generated + " --replication 100000 --out " + target;
        expected = "--replication";
    }
    SUBCASE("a replication that is not a number") {
        args = "generate " + generated + " --replication two --out " + target;
        expected = "--replication";
    }
    SUBCASE("a directory tocsin did not make") {
        dir.file("out/notes.txt", "mine\n");
        args = "generate " + generated + " --out " + target;
        expected = "out";
    }
    SUBCASE("a file where the directory would go") {
        dir.file("file", "not a directory\n");
        target = dir.path("file/out");
        args = "generate " + generated + " --out " + target;
        expected = "file";
        exit_code = 1;
    }
    const auto r = run_tocsin(args);
    INFO(r.output);
    CHECK(r.exit_code == exit_code);
    CHECK(r.output.find("tocsin: error:") != std::string::npos);
    CHECK(r.output.find(expected) != std::string::npos);
    CHECK_FALSE(std::filesystem::exists(target + "/encounters.csv"));
    CHECK_FALSE(std::filesystem::exists(target + "/scores.csv"));
    CHECK_FALSE(std::filesystem::exists(target + "/tocsin-manifest.txt"));
}
