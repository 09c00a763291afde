// The score by patient group against outside references, on the same subsets:
// each group's encounter-level AUC and DeLong interval against R's pROC
// (Robin et al. 2011; DeLong, DeLong & Clarke-Pearson 1988), and its
// sensitivity and specificity at the plans' thresholds with Wilson intervals
// (Wilson 1927) and its calibration-in-the-large against statsmodels
// (proportion_confint, and a binomial GLM with the logit as offset), through
// the reference scripts the evaluation tests use.
#include <doctest/doctest.h>

#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <string>
#include <unistd.h>
#include <vector>

#include "analysis/group_figures.hpp"
#include "models/generator.hpp"
#include "population_fixtures.hpp"
#include "reference_support.hpp"

using namespace tocsin;
using namespace tocsin::reference;
using namespace tocsin::testing;

namespace {

// Two wards over 240 days; an age band whose "old" group's scores run 8
// points low; over 1,000 stays in each of the two declared groups.
struct GroupedData {
    Population pop;
    ProbabilityMapping mapping;
    std::vector<PlanThreshold> thresholds{{"page-40", 40.0}, {"page-55", 55.0}};

    GroupedData() {
        GeneratorConfig c = two_wards(240);
        c.scores.drift_size = 25;
        c.groups = {GeneratedGroup{GroupColumn{"age_band", {"young", "old"}, {}}, {0.55, 0.4}, {0, -8, 0}}};
        pop = generate_population(c, 2027, 0);
        mapping.kind = ProbabilityMapping::Kind::logistic;
        mapping.intercept = -4.0;
        mapping.slope = 0.05;
    }
};

// The stays of one group as score,label,probability rows.
std::string write_group_csv(const GroupedData& d, std::uint16_t level, const std::string& stem) {
    const auto path = std::filesystem::temp_directory_path() /
                      ("tocsin_groups_" + stem + "_" + std::to_string(::getpid()) + ".csv");
    std::ofstream out(path);
    out << "score,label,probability\n";
    char line[128];
    for (const EncounterScore& s : encounter_level_scores(d.pop)) {
        if (d.pop.encounters[s.encounter].groups[0] != level) continue;
        std::snprintf(line, sizeof line, "%.17g,%d,%.17g\n", s.highest_score, s.is_case ? 1 : 0,
                      d.mapping.probability(s.highest_score));
        out << line;
    }
    return path.string();
}

}  // namespace

TEST_CASE("reference.group_auc_matches_pROC_and_wilson_matches_statsmodels") {
    const bool have_r = command_succeeds("Rscript -e 'quit(status = !requireNamespace(\"pROC\", quietly = TRUE))'");
    const bool have_python = command_succeeds(python + " -c 'import sklearn, statsmodels, numpy'");
    if (!have_r || !have_python) {
        MESSAGE("SKIPPED: R's pROC or scikit-learn/statsmodels not installed (./go test installs them)");
        return;
    }
    const GroupedData d;
    const std::vector<GroupScoreFigures> rows = group_score_figures(d.pop, d.thresholds, d.mapping, 11);
    REQUIRE(rows.size() == 3);
    for (std::uint16_t level = 0; level < 3; ++level) {
        const GroupScoreFigures& g = rows[level];
        CAPTURE(g.value);
        const std::string csv = write_group_csv(d, level, g.value == "not recorded" ? "missing" : g.value);
        const auto proc = parse(run("Rscript " + reference_dir + "pROC_delong.R " + csv));
        const auto stats = parse(run(python + " " + reference_dir + "auc_check.py " + csv + " 40 55"));
        std::filesystem::remove(csv);
        // Same estimator and Wald interval: agreement to floating rounding, checked at 1e-9.
        REQUIRE(g.auc);
        CHECK(std::abs(g.auc->auc - proc.at("auc")[0]) < 1e-9);
        CHECK(std::abs(g.auc->interval.lower - proc.at("lower")[0]) < 1e-9);
        CHECK(std::abs(g.auc->interval.upper - proc.at("upper")[0]) < 1e-9);
        CHECK(std::abs(g.auc->auc - stats.at("auc")[0]) < 1e-9);
        // The same closed form as statsmodels: 1e-12.
        for (std::size_t t = 0; t < 2; ++t) {
            const std::string at = t == 0 ? "40" : "55";
            const auto& sens = stats.at("wilson sensitivity " + at);
            const auto& spec = stats.at("wilson specificity " + at);
            REQUIRE(g.at_plan_thresholds[t].sensitivity);
            REQUIRE(g.at_plan_thresholds[t].specificity);
            CHECK(std::abs(g.at_plan_thresholds[t].sensitivity->interval.lower - sens[0]) < 1e-12);
            CHECK(std::abs(g.at_plan_thresholds[t].sensitivity->interval.upper - sens[1]) < 1e-12);
            CHECK(std::abs(g.at_plan_thresholds[t].specificity->interval.lower - spec[0]) < 1e-12);
            CHECK(std::abs(g.at_plan_thresholds[t].specificity->interval.upper - spec[1]) < 1e-12);
        }
        // Both fit the same likelihood to convergence: 1e-6 relative.
        REQUIRE(g.calibration_in_the_large);
        CHECK(*g.calibration_in_the_large == doctest::Approx(stats.at("calibration_in_the_large")[0]).epsilon(1e-6));
        CHECK(*g.calibration_in_the_large_se == doctest::Approx(stats.at("calibration_in_the_large")[1]).epsilon(1e-6));
        MESSAGE(g.group << " " << g.value << ": " << g.encounters << " stays, " << g.cases << " cases; AUC "
                        << g.auc->auc << " (pROC " << proc.at("auc")[0] << ")");
    }
    // A score that runs low for one group leaves its AUC (ranks within the
    // group) about where it was, but a common threshold reaches fewer of its cases.
    CHECK(rows[1].at_plan_thresholds[1].sensitivity->value < rows[0].at_plan_thresholds[1].sensitivity->value);
}

TEST_CASE("reference.group_sensitivity_wilson_matches_statsmodels") {
    if (!command_succeeds(python + " -c 'import statsmodels'")) {
        MESSAGE("SKIPPED: statsmodels not installed for " << python);
        return;
    }
    // The caught-of-cases counts of the hand-worked language story (test_group_figures).
    for (const auto& [caught, cases] : std::vector<std::pair<int, int>>{{9, 10}, {1, 10}, {0, 7}, {13, 40}}) {
        CAPTURE(caught);
        CAPTURE(cases);
        const auto ref = parse(run(python + " -c 'from statsmodels.stats.proportion import proportion_confint as c; "
                                            "print(\"wilson a b\", *map(repr, c(" + std::to_string(caught) + ", " +
                                   std::to_string(cases) + ", alpha=0.05, method=\"wilson\")))'"));
        const Interval ours = wilson_interval(caught, cases);
        CHECK(std::abs(ours.lower - ref.at("wilson a b")[0]) < 1e-12);
        CHECK(std::abs(ours.upper - ref.at("wilson a b")[1]) < 1e-12);
    }
}
