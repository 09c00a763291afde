// Command-line options that stand for scenario keys get the keys' checks, and
// the other numeric options have ranges of their own: a bad value is exit 2,
// "command line: --option: ...", and nothing is written.
#include <doctest/doctest.h>

#include <filesystem>

#include "test_support.hpp"

using namespace tocsin::testing;

namespace {

const std::string source_dir = TOCSIN_SOURCE_DIR;
const std::string replayed = source_dir + "/scenarios/fernhollow-replay.yaml";   // a plain replay
const std::string generated = source_dir + "/scenarios/demo.yaml";               // a generated population

bool says(const CommandResult& r, const std::string& words) { return r.output.find(words) != std::string::npos; }

// Runs `args --out DIR` and checks it is refused for `option` without writing.
CommandResult refused(const std::string& args, const std::string& option) {
    ScratchDir dir;
    const CommandResult r = run_tocsin(args + " --out " + dir.path("out"));
    CAPTURE(args);
    CAPTURE(r.output);
    CHECK(r.exit_code == 2);
    CHECK(says(r, "command line: " + option + ": "));
    CHECK_FALSE(std::filesystem::exists(dir.path("out")));
    return r;
}

}  // namespace

TEST_CASE("options.replications_as_the_key") {
    // The key is refused on a plain replay; so is the option.
    CHECK(says(refused("run " + replayed + " --replications 3", "--replications"), "plain replay"));
    // The key's range, 1 to 100000, stated as the key states it.
    CHECK(says(refused("run " + generated + " --replications 0", "--replications"),
               "'0' is out of range (expected 1 to 100000)"));
    CHECK(says(refused("run " + generated + " --replications 100000000", "--replications"),
               "'100000000' is out of range (expected 1 to 100000)"));
    CHECK(says(refused("run " + generated + " --replications 99999999999999999999999", "--replications"),
               "out of range (expected 1 to 100000)"));
    CHECK(says(refused("run " + generated + " --replications 2.5", "--replications"), "expected a whole number"));
    CHECK(says(refused("sweep " + replayed + " --vary plan.rule.threshold=60,70 --replications 3", "--replications"),
               "plain replay"));
}

TEST_CASE("options.max_burden_is_a_finite_number") {
    CHECK(says(refused("run " + replayed + " --max-burden nan", "--max-burden"), "'nan' is not a finite number"));
    CHECK(says(refused("run " + replayed + " --max-burden inf", "--max-burden"), "'inf' is not a finite number"));
    CHECK(says(refused("run " + replayed + " --max-burden -1", "--max-burden"), "out of range (expected >= 0)"));
    CHECK(says(refused("run " + replayed + " --max-burden four", "--max-burden"), "expected a number"));
}

TEST_CASE("options.evaluate_bounds") {
    CHECK(says(refused("evaluate " + replayed + " --grid-points 100000", "--grid-points"), "expected 0 to 10000"));
    CHECK(says(refused("evaluate " + replayed + " --bootstrap 1000000", "--bootstrap"), "expected 0 to 100000"));
    CHECK(says(refused("evaluate " + replayed + " --bootstrap -1", "--bootstrap"), "expected 0 to 100000"));
    CHECK(says(refused("evaluate " + replayed + " --threshold nan", "--threshold"), "not a finite number"));
    CHECK(says(refused("evaluate " + replayed + " --horizon 0", "--horizon"), "out of range"));
    CHECK(says(refused("evaluate " + replayed + " --decision-threshold 1", "--decision-threshold"),
               "expected 0.001 to 0.999 probability"));
    CHECK(says(refused("evaluate " + replayed + " --evaluate-per-case inf", "--evaluate-per-case"),
               "'inf' is not a finite number (expected 1.001 to 1000 evaluations)"));
    // Options standing for outcome keys take the keys' ranges (min_lead in hours).
    CHECK(says(refused("evaluate " + replayed + " --window-hours 1e6", "--window-hours"),
               "expected 0.0166 to 8760 hours"));
    CHECK(says(refused("evaluate " + replayed + " --min-lead-hours 1000", "--min-lead-hours"),
               "expected 0 to 720 hours"));
}

TEST_CASE("options.sweep_grid_is_sized_first") {
    // Ten billion values would exhaust memory if built; the size is refused first.
    const CommandResult r = refused("sweep " + generated + " --vary plan.rule.threshold=0:1e10:1", "--vary");
    CHECK(says(r, "10000000001 values"));
    CHECK(says(r, "limit of 5000"));
    // A sweep path that does not exist is the user's input, not an internal error.
    CHECK(says(refused("sweep " + generated + " --vary plan.rulez.threshold=60", "--vary"), "no key 'rulez'"));
    CHECK(says(refused("sweep " + generated + " --plan nope --vary plan.rule.threshold=60", "--plan"),
               "no plan named 'nope'"));
}

TEST_CASE("options.threads_and_review_size") {
    CHECK(says(refused("run " + replayed + " --threads 100000000", "--threads"), "expected 0 to 4096"));
    CHECK(says(refused("run " + replayed + " --threads two", "--threads"), "expected a whole number"));
    // --sizes are values of plans[].review.top_n, with its range, and one
    // simulation each, so no more of them than plans in a sweep.
    CHECK(says(refused("review-size " + replayed + " --plan review-top4 --sizes 0-5", "--sizes"),
               "'0' is out of range (expected 1 to 100000 patients)"));
    CHECK(says(refused("review-size " + replayed + " --plan review-top4 --sizes 1-100000", "--sizes"),
               "100000 list sizes, more than the limit of 5000"));
    CHECK(says(refused("review-size " + replayed + " --plan review-top4 --sizes 9-3", "--sizes"), "FROM <= TO"));
    CHECK(says(refused("review-size " + replayed + " --plan review-top4 --target-catch-rate nan", "--target-catch-rate"),
               "'nan' is not a finite number (expected 0 to 1)"));
}

TEST_CASE("options.metric_names_are_checked_first") {
    // An unknown metric is an input error before the population is prepared.
    for (const char* option : {"--burden", "--benefit", "--budget-metric"})
        CHECK(says(refused("run " + generated + " " + option + " pages_per_moon", option),
                   "unknown metric 'pages_per_moon' (expected one of"));
}
