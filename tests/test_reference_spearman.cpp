// Spearman's rank correlation (spearman_rank_correlation, what the generator
// reports as the correlation reached between two scores' stay maxima) against
// scipy.stats.spearmanr (Virtanen et al. 2020, SciPy 1.0, Nature Methods
// 17:261-272) through tests/reference/spearman_check.py, on invented pairs
// with many ties (values rounded to whole points, as stay maxima on a points
// scale are). Both use midranks and Pearson's formula on them, so they agree
// to floating rounding: checked to 1e-12. A hand-worked case checks the
// formula itself. When scipy is missing the case says so in a visible MESSAGE.
#include <doctest/doctest.h>

#include <boost/random/normal_distribution.hpp>
#include <cmath>
#include <fstream>
#include <vector>

#include "models/discrimination.hpp"
#include "models/random_streams.hpp"
#include "reference_support.hpp"
#include "test_support.hpp"

using namespace tocsin;
using namespace tocsin::reference;

TEST_CASE("reference.spearman_worked_by_hand") {
    // x ranks 1, 2, 3, 4, 5; y = (10, 20, 20, 40, 30) ranks 1, 2.5, 2.5, 5, 4.
    // Deviations from the mean rank 3: x (-2, -1, 0, 1, 2), y (-2, -0.5, -0.5, 2, 1):
    // sum of products 4 + 0.5 + 0 + 2 + 2 = 8.5; sums of squares 10 and 9.5.
    const std::vector<double> x{1, 2, 3, 4, 5}, y{10, 20, 20, 40, 30};
    CHECK(spearman_rank_correlation(x, y) == doctest::Approx(8.5 / std::sqrt(10 * 9.5)).epsilon(1e-14));
    CHECK(spearman_rank_correlation(x, x) == doctest::Approx(1.0).epsilon(1e-14));
    CHECK(std::isnan(spearman_rank_correlation(std::vector<double>{1, 1, 1}, std::vector<double>{1, 2, 3})));
}

TEST_CASE("reference.spearman_scipy") {
    if (!command_succeeds(python + " -c 'import scipy.stats'")) {
        MESSAGE("SKIPPED: scipy not installed for " << python << "; Spearman not cross-checked");
        return;
    }
    testing::ScratchDir dir;
    const std::string path = dir.file("pairs.csv", "");
    RandomEngine engine = make_stream(2026, 0, StreamPurpose::calibration_search, 77);
    boost::random::normal_distribution<double> normal;
    std::vector<double> x, y;
    std::ofstream out(path);
    out << "x,y\n";
    for (int i = 0; i < 600; ++i) {
        const double shared = normal(engine);
        x.push_back(std::round(50 + 8 * shared + 6 * normal(engine)));
        y.push_back(std::round(30 + 5 * shared + 9 * normal(engine)));
        out << x.back() << "," << y.back() << "\n";
    }
    out.close();
    const auto ref = parse(run(python + " " + reference_dir + "spearman_check.py " + path));
    REQUIRE(ref.count("spearman"));
    const double ours = spearman_rank_correlation(x, y);
    MESSAGE("Spearman " << ours << " (scipy " << ref.at("spearman")[0] << ")");
    CHECK(ours == doctest::Approx(ref.at("spearman")[0]).epsilon(1e-12));
}
