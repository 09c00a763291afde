// Cross-checks against general-purpose reference libraries (Debian packages):
// scikit-learn roc_auc_score, statsmodels proportion_confint(method="wilson")
// and binomial GLMs (per score and per stay), and R's pROC ci.auc(method = "delong"). The scripts are
// in tests/reference/. When an interpreter or module is missing the case says
// so in a visible MESSAGE and checks nothing else.
#include <doctest/doctest.h>

#include <boost/random/bernoulli_distribution.hpp>
#include <boost/random/normal_distribution.hpp>
#include <boost/random/uniform_int_distribution.hpp>
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <map>
#include <optional>
#include <sstream>
#include <string>
#include <unistd.h>
#include <vector>

#include "analysis/calibration.hpp"
#include "analysis/evaluation.hpp"
#include "analysis/roc.hpp"
#include "models/population.hpp"
#include "models/random_streams.hpp"

#include "reference_support.hpp"

using namespace tocsin;
using namespace tocsin::reference;

namespace {

struct DataSet {
    std::vector<double> score, probability;
    std::vector<std::uint8_t> label;
};

// 3,000 encounters, about 1 in 5 a case; scores rounded to one decimal so
// ties (within and across classes) are common; the probability is a logistic
// function of the score, deliberately miscalibrated.
DataSet generated_data() {
    DataSet d;
    RandomEngine engine = make_stream(2026, 0, StreamPurpose::trajectory, 77);
    boost::random::bernoulli_distribution<double> is_case(0.2);
    boost::random::normal_distribution<double> noise(0.0, 1.0);
    for (int i = 0; i < 3000; ++i) {
        const bool c = is_case(engine);
        const double s = std::round((noise(engine) + (c ? 1.1 : 0.0)) * 10.0) / 10.0;
        d.score.push_back(s);
        d.label.push_back(c ? 1 : 0);
        d.probability.push_back(1.0 / (1.0 + std::exp(-(-1.2 + 0.8 * s))));
    }
    return d;
}

std::filesystem::path write_csv(const DataSet& d, const std::string& stem) {
    const auto path = std::filesystem::temp_directory_path() /
                      ("tocsin_" + stem + "_" + std::to_string(::getpid()) + ".csv");
    std::ofstream out(path);
    out << "score,label,probability\n";
    char line[128];
    for (std::size_t i = 0; i < d.score.size(); ++i) {
        std::snprintf(line, sizeof line, "%.17g,%d,%.17g\n", d.score[i], d.label[i], d.probability[i]);
        out << line;
    }
    return path;
}


}  // namespace

TEST_CASE("reference.evaluation_sklearn_statsmodels") {
    if (!command_succeeds(python + " -c 'import sklearn, statsmodels, numpy'")) {
        MESSAGE("SKIPPED: scikit-learn / statsmodels not installed for " << python
                                                                        << " (./go test installs python3-sklearn python3-statsmodels)");
        return;
    }
    const DataSet d = generated_data();
    const auto csv = write_csv(d, "sklearn");
    const std::vector<std::string> thresholds{"-0.5", "0.5", "1.25"};
    std::string command = python + " " + reference_dir + "auc_check.py " + csv.string();
    for (const auto& t : thresholds) command += " " + t;
    const auto ref = parse(run(command));
    std::filesystem::remove(csv);

    // AUC: both sides compute the Mann-Whitney statistic with ties counted
    // one half, exactly; only floating rounding separates them.
    REQUIRE(ref.count("auc"));
    CHECK(std::abs(auc_mann_whitney(d.score, d.label) - ref.at("auc")[0]) < 1e-12);
    CHECK(std::abs(auc_delong(d.score, d.label).auc - ref.at("auc")[0]) < 1e-12);

    // Threshold counts and Wilson intervals: closed-form on both sides.
    std::vector<double> t_values;
    for (const auto& t : thresholds) t_values.push_back(std::stod(t));
    const auto counts = counts_at_thresholds(d.score, d.label, t_values);
    const auto measures = threshold_measures(counts, {}, 0.95);
    for (std::size_t i = 0; i < thresholds.size(); ++i) {
        CAPTURE(thresholds[i]);
        const auto& c = ref.at("counts " + thresholds[i]);
        CHECK(counts[i].true_positives == c[0]);
        CHECK(counts[i].false_positives == c[1]);
        CHECK(counts[i].false_negatives == c[2]);
        CHECK(counts[i].true_negatives == c[3]);
        const ThresholdMeasures& m = measures[i];
        const std::vector<std::pair<std::string, const std::optional<Proportion>*>> proportions{
            {"sensitivity", &m.sensitivity}, {"specificity", &m.specificity}, {"ppv", &m.ppv}, {"npv", &m.npv},
            {"share_flagged", &m.share_flagged}};
        for (const auto& [name, proportion] : proportions) {
            CAPTURE(name);
            const auto& w = ref.at("wilson " + name + " " + thresholds[i]);
            REQUIRE(*proportion);
            CHECK(std::abs((*proportion)->interval.lower - w[0]) < 1e-12);
            CHECK(std::abs((*proportion)->interval.upper - w[1]) < 1e-12);
        }
    }

    // Logistic recalibration: both fit the same likelihood to convergence
    // (statsmodels at tol 1e-13, ours at a step below 1e-10 relative), so the
    // estimates and SEs agree to well within 1e-6 relative.
    const LogisticRecalibration fit = logistic_recalibration(d.probability, d.label);
    const auto& r = ref.at("recalibration");
    REQUIRE(fit.converged);
    CHECK(fit.intercept == doctest::Approx(r[0]).epsilon(1e-6));
    CHECK(fit.slope == doctest::Approx(r[1]).epsilon(1e-6));
    CHECK(fit.intercept_se == doctest::Approx(r[2]).epsilon(1e-6));
    CHECK(fit.slope_se == doctest::Approx(r[3]).epsilon(1e-6));
    const auto& citl = ref.at("calibration_in_the_large");
    CHECK(fit.calibration_in_the_large == doctest::Approx(citl[0]).epsilon(1e-6));
    CHECK(fit.calibration_in_the_large_se == doctest::Approx(citl[1]).epsilon(1e-6));
    MESSAGE("sklearn AUC " << ref.at("auc")[0] << "; statsmodels intercept " << r[0] << " slope " << r[1]
                           << "; tocsin intercept " << fit.intercept << " slope " << fit.slope);
}

TEST_CASE("reference.evaluation_pROC_delong") {
    if (!command_succeeds("Rscript -e 'quit(status = !requireNamespace(\"pROC\", quietly = TRUE))'")) {
        MESSAGE("SKIPPED: R or the pROC package not installed (./go test installs r-base-core r-cran-proc)");
        return;
    }
    const DataSet d = generated_data();
    const auto csv = write_csv(d, "proc");
    const auto ref = parse(run("Rscript " + reference_dir + "pROC_delong.R " + csv.string()));
    std::filesystem::remove(csv);
    const AucEstimate a = auc_delong(d.score, d.label, 0.95);
    // Same estimator and the same Wald interval clipped to [0, 1]; agreement is
    // to floating rounding, checked at 1e-9.
    CHECK(std::abs(a.auc - ref.at("auc")[0]) < 1e-9);
    CHECK(std::abs(a.standard_error * a.standard_error - ref.at("variance")[0]) < 1e-9);
    CHECK(std::abs(a.interval.lower - ref.at("lower")[0]) < 1e-9);
    CHECK(std::abs(a.interval.upper - ref.at("upper")[0]) < 1e-9);
    MESSAGE("pROC DeLong: AUC " << ref.at("auc")[0] << " (" << ref.at("lower")[0] << " to " << ref.at("upper")[0]
                                << "); tocsin " << a.auc << " (" << a.interval.lower << " to " << a.interval.upper << ")");
}

namespace {

// 1,500 stays of 4 to 15 hourly scores, about 1 in 6 with the outcome half an
// hour after its eleventh score (or its last, if fewer): a longer case's later
// scores come after time zero and must be left out, so the highest usable
// score is not simply the highest recorded one. Cases score higher on average; scores are rounded to 0.1 so
// stays tie.
Population generated_stays(const std::filesystem::path& csv) {
    RandomEngine engine = make_stream(2026, 0, StreamPurpose::trajectory, 78);
    boost::random::bernoulli_distribution<double> is_case(1.0 / 6.0);
    boost::random::uniform_int_distribution<int> length(4, 15);
    boost::random::normal_distribution<double> noise(0.0, 1.0);
    Population pop;
    pop.units = {"Ward A"};
    std::vector<Score> scores;
    std::vector<std::uint32_t> owner;
    std::ofstream out(csv);
    out << "encounter,available_hours,score,outcome_hours\n";
    const Instant start = days_from_civil(2026, 3, 1) * 86400;
    for (std::uint32_t e = 0; e < 1500; ++e) {
        const int n = length(engine);
        const bool c = is_case(engine);
        const Instant admitted = start + static_cast<Instant>(e) * 3600;
        std::optional<Instant> outcome;
        if (c) outcome = admitted + static_cast<Instant>(std::min(n, 11)) * 3600 - 1800;
        pop.encounters.push_back({"S" + std::to_string(e), 0, admitted, admitted + (n + 1) * 3600, outcome});
        for (int k = 0; k < n; ++k) {
            const double v = std::round((noise(engine) + (c ? 0.9 : 0.0)) * 10.0) / 10.0;
            const Instant at = admitted + k * 3600;
            scores.push_back({at, at, v});
            owner.push_back(e);
            out << e << "," << k << "," << v << ",";
            if (outcome) out << static_cast<double>(*outcome - admitted) / 3600.0;
            out << "\n";
        }
    }
    group_scores_by_encounter(pop, scores, owner);
    apply_score_exclusions(pop);
    default_period(pop);
    return pop;
}

}  // namespace

TEST_CASE("reference.stay_calibration_statsmodels") {
    if (!command_succeeds(python + " -c 'import statsmodels, numpy'")) {
        MESSAGE("SKIPPED: statsmodels not installed for " << python << " (./go test installs python3-statsmodels)");
        return;
    }
    const auto csv = std::filesystem::temp_directory_path() / ("tocsin_stays_" + std::to_string(::getpid()) + ".csv");
    const Population pop = generated_stays(csv);
    // A deliberately miscalibrated mapping, so neither figure sits at its ideal.
    ProbabilityMapping m;
    m.kind = ProbabilityMapping::Kind::logistic;
    m.intercept = -2.5;
    m.slope = 0.7;
    const StayCalibration c = stay_level_calibration(encounter_level_scores(pop), m, 10, 0.95);
    const auto ref = parse(run(python + " " + reference_dir + "stay_calibration.py " + csv.string() + " -2.5 0.7"));
    std::filesystem::remove(csv);

    // Which stays and which score: counts are exact, the expected sum is the
    // same 1,500 probabilities added in another order (1e-9 relative is
    // thousands of times the rounding of such a sum).
    const auto& oe = ref.at("oe");
    CHECK(c.observed_expected.predictions == oe[0]);
    CHECK(c.observed_expected.observed == oe[1]);
    CHECK(c.observed_expected.expected == doctest::Approx(oe[2]).epsilon(1e-9));
    // Slope: Cox (1958), logit P(y) = a + b logit(p); calibration-in-the-large:
    // the intercept with b fixed at 1 (Van Calster et al. 2016, J Clin
    // Epidemiol, "a calibration hierarchy"; both cited from memory). Both sides
    // fit the same likelihood to convergence (statsmodels at tol 1e-13, ours at
    // a step below 1e-10 relative), so estimates and SEs agree within 1e-6 relative.
    const LogisticRecalibration& fit = c.recalibration;
    REQUIRE(fit.converged);
    const auto& r = ref.at("recalibration");
    CHECK(fit.intercept == doctest::Approx(r[0]).epsilon(1e-6));
    CHECK(fit.slope == doctest::Approx(r[1]).epsilon(1e-6));
    CHECK(fit.intercept_se == doctest::Approx(r[2]).epsilon(1e-6));
    CHECK(fit.slope_se == doctest::Approx(r[3]).epsilon(1e-6));
    const auto& citl = ref.at("calibration_in_the_large");
    CHECK(fit.calibration_in_the_large == doctest::Approx(citl[0]).epsilon(1e-6));
    CHECK(fit.calibration_in_the_large_se == doctest::Approx(citl[1]).epsilon(1e-6));
    MESSAGE("stay level, statsmodels: calibration-in-the-large " << citl[0] << " slope " << r[1] << "; tocsin "
                                                                   << fit.calibration_in_the_large << " " << fit.slope);
}
