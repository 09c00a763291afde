// `tocsin evaluate`: the command writes every evaluation table, its numbers
// are the library's on the scenario's own population, and the same seed gives
// the same bytes.
#include <doctest/doctest.h>

#include <filesystem>
#include <string>

#include "analysis/evaluation.hpp"
#include "report/evaluation_tables.hpp"
#include "study/evaluation_scenario.hpp"
#include "models/population_source.hpp"
#include "study/scenario.hpp"
#include "test_support.hpp"

using namespace tocsin;
using namespace tocsin::testing;

TEST_CASE("evaluate.cli_writes_the_library_tables") {
    const std::string demo = std::string(TOCSIN_SOURCE_DIR) + "/scenarios/fernhollow-replay.yaml";
    ScratchDir dir;
    const auto r = run_tocsin("evaluate " + demo + " --threshold 60 --bootstrap 20 --out " + dir.path("one"));
    INFO(r.output);
    REQUIRE(r.exit_code == 0);
    CHECK(r.output.find("Encounter-level AUC") != std::string::npos);
    CHECK(r.output.find("not a medical device") != std::string::npos);

    // Every table as CSV and JSON.
    const Scenario sc = load_scenario(demo);
    const Population pop = population_for(sc.population, prepare_population(sc.population), 0);
    EvaluationOptions o = evaluation_options_for(sc);
    o.thresholds = {60};
    o.bootstrap_replicates = 20;
    const Evaluation ev = evaluate(pop, o);
    for (const Table& t : evaluation_tables(ev)) {
        CAPTURE(t.name);
        CHECK(std::filesystem::exists(dir.path("one/" + t.name + ".json")));
        // The command's numbers are the library's on the same population.
        CHECK(read_file(dir.path("one/" + t.name + ".csv")) == to_csv(t));
    }

    CHECK(read_file(dir.path("one/CAUTIONS.txt")).find("not a medical device") != std::string::npos);

    // Same scenario and seed: byte-identical files, whatever the thread count
    // (the first run used every core, the library call above one thread).
    REQUIRE(run_tocsin("evaluate " + demo + " --threshold 60 --bootstrap 20 --threads 3 --out " + dir.path("two")).exit_code == 0);
    for (const Table& t : evaluation_tables(ev)) {
        CAPTURE(t.name);
        CHECK(read_file(dir.path("one/" + t.name + ".csv")) == read_file(dir.path("two/" + t.name + ".csv")));
    }
}

TEST_CASE("evaluate.cli_rejects_a_bad_thread_count") {
    const std::string demo = std::string(TOCSIN_SOURCE_DIR) + "/scenarios/fernhollow-replay.yaml";
    const auto r = run_tocsin("evaluate " + demo + " --threads -1");
    CHECK(r.exit_code == 2);
    CHECK(r.output.find("--threads") != std::string::npos);
}

TEST_CASE("evaluate.cli_rejects_a_bad_mapping") {
    const std::string demo = std::string(TOCSIN_SOURCE_DIR) + "/scenarios/fernhollow-replay.yaml";
    const auto r = run_tocsin("evaluate " + demo + " --probability divide:ten");
    CHECK(r.exit_code == 2);
    CHECK(r.output.find("--probability") != std::string::npos);
}
