// The per-ward figures of a real run recomputed by NumPy from the run's own
// data tables (tests/reference/unit_figures.py): each ward's shift and night
// mean, 90th percentile (Hyndman & Fan 1996, type 7, NumPy's default) and
// worst from unit_shift_notices, each ward's notices from notice_log, the
// worst ward's 90th percentile and the sums over wards against plan_summary.
#include <doctest/doctest.h>

#include <string>

#include "test_support.hpp"

using namespace tocsin::testing;

TEST_CASE("reference.per_ward_figures_match_numpy") {
    if (run_command("/usr/bin/python3 -c 'import numpy'").exit_code != 0) {
        MESSAGE("SKIPPED: numpy is not installed for /usr/bin/python3 (./go test installs python3-numpy)");
        return;
    }
    const std::string source_dir = TOCSIN_SOURCE_DIR;
    ScratchDir dir;
    const auto r = run_tocsin("run " + source_dir + "/scenarios/fernhollow-replay.yaml --threads 1 --notice-log --out " +
                              dir.path("out"));
    INFO(r.output);
    REQUIRE(r.exit_code == 0);
    const auto check =
        run_command("/usr/bin/python3 " + source_dir + "/tests/reference/unit_figures.py " + dir.path("out"));
    INFO(check.output);
    CHECK(check.exit_code == 0);
    CHECK(check.output.find("ok: ") != std::string::npos);
}
