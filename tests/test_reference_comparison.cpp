// The interval every figure carries, checked against scipy.stats.t.interval
// (SciPy, Virtanen et al. 2020) on random samples of several sizes.
#include <doctest/doctest.h>

#include <boost/math/distributions/chi_squared.hpp>
#include <boost/random/normal_distribution.hpp>
#include <sstream>
#include <utility>
#include <vector>

#include "analysis/comparison.hpp"
#include "models/random_streams.hpp"
#include "test_support.hpp"

using namespace tocsin;
using namespace tocsin::testing;

TEST_CASE("reference.t_interval_matches_scipy") {
    if (run_command("/usr/bin/python3 -c 'import scipy, numpy'").exit_code != 0) {
        MESSAGE("SKIPPED: scipy is not installed for /usr/bin/python3 (./go test installs python3-scipy)");
        return;
    }
    ScratchDir dir;
    RandomEngine rng = make_stream(3, 0, StreamPurpose::evaluation_bootstrap, 0);
    boost::random::normal_distribution<double> normal(5.0, 2.0);
    std::vector<std::vector<double>> samples;
    std::string text;
    for (int n : {2, 3, 5, 10, 20, 50, 200}) {
        std::vector<double> s;
        for (int i = 0; i < n; ++i) s.push_back(normal(rng));
        std::ostringstream line;
        line.precision(17);
        for (int i = 0; i < n; ++i) line << (i ? "," : "") << s[i];
        text += line.str() + "\n";
        samples.push_back(s);
    }
    const std::string data = dir.file("samples.csv", text);
    const auto r = run_command("/usr/bin/python3 " + std::string(TOCSIN_SOURCE_DIR) + "/tests/reference/t_interval.py " + data);
    REQUIRE(r.exit_code == 0);
    std::istringstream out(r.output);
    std::string line;
    for (const auto& s : samples) {
        REQUIRE(std::getline(out, line));
        double mean = 0, low = 0, high = 0;
        REQUIRE(std::sscanf(line.c_str(), "%lf,%lf,%lf", &mean, &low, &high) == 3);
        const MeanInterval m = mean_interval(s);
        CAPTURE(s.size());
        CHECK(m.mean == doctest::Approx(mean).epsilon(1e-10));
        CHECK(m.low == doctest::Approx(low).epsilon(1e-9));
        CHECK(m.high == doctest::Approx(high).epsilon(1e-9));
    }
}

// The chi-square quantile and tail that tests/test_fatigue.cpp's goodness-of-fit
// check relies on (Boost.Math), against scipy.stats.chi2 (Virtanen et al. 2020).
TEST_CASE("reference.chi_square_tail_matches_scipy") {
    if (run_command("/usr/bin/python3 -c 'import scipy'").exit_code != 0) {
        MESSAGE("SKIPPED: scipy is not installed for /usr/bin/python3 (./go test installs python3-scipy)");
        return;
    }
    const auto r = run_command(
        "/usr/bin/python3 -c 'from scipy.stats import chi2\n"
        "print(repr(chi2.isf(0.001, 6)))\n"
        "for x, df in ((3.5, 6), (12.0, 6), (22.0, 6), (7.0, 2), (40.0, 18)): print(repr(chi2.sf(x, df)))'");
    REQUIRE(r.exit_code == 0);
    std::istringstream out(r.output);
    double critical = 0;
    REQUIRE(static_cast<bool>(out >> critical));
    const boost::math::chi_squared six(6);
    CHECK(boost::math::quantile(boost::math::complement(six, 0.001)) == doctest::Approx(critical).epsilon(1e-10));
    for (const auto& [x, df] : std::vector<std::pair<double, double>>{{3.5, 6}, {12.0, 6}, {22.0, 6}, {7.0, 2}, {40.0, 18}}) {
        double tail = 0;
        REQUIRE(static_cast<bool>(out >> tail));
        CAPTURE(x);
        CHECK(boost::math::cdf(boost::math::complement(boost::math::chi_squared(df), x)) ==
              doctest::Approx(tail).epsilon(1e-10));
    }
}
