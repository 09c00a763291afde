// Response that falls with load (sim/fatigue.hpp): the logistic form worked by
// hand, a story whose loads and probabilities are counted by hand, the draws
// keyed by what they are about, realised acceptance against the declared odds
// ratios over many draws, the loader's refusals, and a run whose effect is
// declared at zero writing what a run without it writes, byte for byte.
#include <doctest/doctest.h>

#include <boost/math/distributions/chi_squared.hpp>
#include <cmath>
#include <map>
#include <string>
#include <vector>

#include "analysis/acceptance_by_load.hpp"
#include "models/population_source.hpp"
#include "report/run_files.hpp"
#include "sim/fatigue.hpp"
#include "study/run.hpp"
#include "study/scenario.hpp"
#include "test_support.hpp"

using namespace tocsin;
using namespace tocsin::testing;

namespace {

Notice page(Instant at, std::uint32_t encounter, std::uint32_t unit) {
    return make_notice(NoticeOrigin{encounter, unit, 0, Channel::page}, at, 60.0, NoticeReason::first);
}

// The logistic form written out once more, independently of the code under test.
double by_hand(double base, double repeat_ratio, double recent_ratio, int earlier, int recent) {
    const double odds = base / (1 - base) * std::pow(repeat_ratio, earlier) * std::pow(recent_ratio, recent);
    return odds / (1 + odds);
}

const ReplicationSeed seed{20261205, 0};

}  // namespace

TEST_CASE("fatigue.probability_multiplies_the_odds") {
    const FatigueEffect e{.base_response = 0.6, .repeat_odds_ratio = 0.7, .recent_odds_ratio = 0.9};
    // Base odds 0.6 / 0.4 = 1.5; two earlier notices: 1.5 x 0.49 = 0.735 -> 0.735 / 1.735.
    CHECK(fatigued_probability(0.6, e, 2, 0) == doctest::Approx(0.735 / 1.735).epsilon(1e-14));
    // One earlier, three recent: 1.5 x 0.7 x 0.729 = 0.76545 -> 0.76545 / 1.76545.
    CHECK(fatigued_probability(0.6, e, 1, 3) == doctest::Approx(0.76545 / 1.76545).epsilon(1e-14));
    // No load, or odds ratios of 1: the base itself, bit for bit (no round trip through the odds).
    CHECK(fatigued_probability(0.6, e, 0, 0) == 0.6);
    const FatigueEffect none{.base_response = 0.3};
    CHECK(fatigued_probability(0.3, none, 7, 40) == 0.3);
    // Bases of 0 and 1 have no odds to move.
    CHECK(fatigued_probability(0.0, e, 3, 3) == 0.0);
    CHECK(fatigued_probability(1.0, e, 3, 3) == 1.0);
}

TEST_CASE("fatigue.a_story_counted_by_hand") {
    // Window 2 h, base 0.8 (odds 4), odds x0.5 per earlier notice about the
    // patient and x0.5 per notice the team had in the window before.
    const FatigueEffect e{.base_response = 0.8, .repeat_odds_ratio = 0.5, .recent_odds_ratio = 0.5, .window = hours(2)};
    const std::vector<Notice> story = {
        page(0, 1, 0),                   // n0: nothing before                      odds 4   -> 0.8
        page(hours(1), 1, 0),            // n1: patient 1 once; unit 0 had n0      odds 1   -> 0.5
        page(hours(1), 2, 0),            // n2: unit 0 had n0 (n1 is simultaneous)  odds 2   -> 2/3
        page(hours(3) + 1800, 2, 1),     // n3: patient 2 once; unit 1 had nothing  odds 2   -> 2/3
        page(hours(4), 1, 0),            // n4: patient 1 twice; unit 0's n1, n2 left the window [2h, 4h)
    };                                   //                                         odds 1   -> 0.5
    std::vector<Notice> per_unit = story;
    const auto loads = apply_fatigue(per_unit, e, e.base_response, RecipientTeams{true}, seed);
    REQUIRE(loads.size() == 5);
    const std::vector<std::uint32_t> earlier = {0, 1, 0, 1, 2}, recent = {0, 1, 1, 0, 0};
    const std::vector<double> probability = {0.8, 0.5, 2.0 / 3.0, 2.0 / 3.0, 0.5};
    for (std::size_t i = 0; i < 5; ++i) {
        CAPTURE(i);
        CHECK(loads[i].earlier_for_patient == earlier[i]);
        CHECK(loads[i].recent_for_team == recent[i]);
        CHECK(loads[i].probability == doctest::Approx(probability[i]).epsilon(1e-14));
        CHECK(per_unit[i].response_draw >= 0.0);
        CHECK(per_unit[i].response_draw < 1.0);
        CHECK(per_unit[i].asks_evaluation == (per_unit[i].response_draw < loads[i].probability));
    }
    // One team for the hospital: n3 sees nothing in [1h30, 3h30); n4 sees n3 in
    // [2h, 4h): odds 4 x 0.25 x 0.5 = 0.5 -> 1/3. The draws are the same notices' draws.
    std::vector<Notice> hospital = story;
    const auto shared = apply_fatigue(hospital, e, e.base_response, RecipientTeams{false}, seed);
    CHECK(shared[3].recent_for_team == 0);
    CHECK(shared[4].recent_for_team == 1);
    CHECK(shared[4].probability == doctest::Approx(1.0 / 3.0).epsilon(1e-14));
    for (std::size_t i = 0; i < 5; ++i) CHECK(hospital[i].response_draw == per_unit[i].response_draw);
}

TEST_CASE("fatigue.a_page_draw_is_keyed_by_the_notice_not_its_place") {
    const FatigueEffect e{.base_response = 0.5};
    std::vector<Notice> alone = {page(hours(5), 7, 0)};
    std::vector<Notice> among = {page(hours(1), 3, 0), page(hours(5), 9, 1), page(hours(5), 7, 0)};
    apply_fatigue(alone, e, 0.5, {}, seed);
    apply_fatigue(among, e, 0.5, {}, seed);
    CHECK(alone[0].response_draw == among[2].response_draw);
    CHECK(among[1].response_draw != among[2].response_draw);
    // Another replication draws afresh.
    std::vector<Notice> next = {page(hours(5), 7, 0)};
    apply_fatigue(next, e, 0.5, {}, ReplicationSeed{seed.seed, 1});
    CHECK(next[0].response_draw != alone[0].response_draw);
}

TEST_CASE("fatigue.a_chart_interruption_keeps_its_acceptance_draw") {
    // The opening's draw decides, as without fatigue: at zero effect nothing moves.
    std::vector<Notice> notices;
    for (int i = 0; i < 6; ++i) {
        Notice n = make_notice(NoticeOrigin{5, 0, 0, Channel::chart_interruption}, hours(i), 61.0, NoticeReason::first,
                               true, 0);
        n.response_draw = 0.1 * i + 0.05;
        n.asks_evaluation = n.response_draw < 0.6;
        notices.push_back(n);
    }
    const std::vector<Notice> before = notices;
    apply_fatigue(notices, FatigueEffect{}, 0.6, {}, seed);
    for (std::size_t i = 0; i < notices.size(); ++i) {
        CHECK(notices[i].response_draw == before[i].response_draw);
        CHECK(notices[i].asks_evaluation == before[i].asks_evaluation);
    }
    // With odds x0.5 per earlier notice: the fourth (draw 0.35, three earlier: odds 1.5/8 -> 0.158) is dismissed.
    apply_fatigue(notices, FatigueEffect{.repeat_odds_ratio = 0.5}, 0.6, {}, seed);
    CHECK(notices[0].asks_evaluation);  // 0.05 < 0.6
    CHECK(notices[1].asks_evaluation);  // 0.15 < 1.5 x 0.5 / 1.75 = 0.4286
    CHECK(notices[2].asks_evaluation);  // 0.25 < 0.375 / 1.375 = 0.2727
    CHECK_FALSE(notices[3].asks_evaluation);
}

TEST_CASE("fatigue.realised_acceptance_matches_the_declared_odds_ratios") {
    // 3,000 units, each with six pages 10 minutes apart to patients A B A C A B
    // (window 2 h, one team per unit), so every notice's (earlier for the
    // patient, recent for the team) is one of six cells with one declared
    // probability each: A(0,0) B(0,1) A(1,2) C(0,3) A(2,4) B(1,5).
    constexpr int units = 3000;
    const FatigueEffect e{.base_response = 0.7, .repeat_odds_ratio = 0.7, .recent_odds_ratio = 0.9, .window = hours(2)};
    const std::uint32_t who[6] = {0, 1, 0, 2, 0, 1};
    std::vector<Notice> notices;
    for (int k = 0; k < 6; ++k)
        for (std::uint32_t u = 0; u < units; ++u) notices.push_back(page(600 * k, u * 3 + who[k], u));
    const auto loads = apply_fatigue(notices, e, e.base_response, {}, ReplicationSeed{7, 0});
    std::map<std::pair<std::uint32_t, std::uint32_t>, std::pair<int, int>> cells;  // -> (notices, evaluations)
    for (std::size_t i = 0; i < notices.size(); ++i) {
        auto& c = cells[{loads[i].earlier_for_patient, loads[i].recent_for_team}];
        ++c.first;
        c.second += notices[i].asks_evaluation;
    }
    REQUIRE(cells.size() == 6);
    // Pearson's statistic over the cells' evaluations and non-evaluations,
    // sum (O - n p)^2 / (n p (1 - p)): under the declared model each cell is
    // binomial(n, p) with p known, not estimated, so it is chi-square with as
    // many degrees of freedom as cells (6). The tolerance: reject below a
    // p-value of 0.001 (a false alarm once in a thousand seeds; the seed is
    // fixed). The same statistic against the model without the effect (p = the
    // base everywhere) must be far beyond that: the test can fail.
    auto statistic = [&](bool declared) {
        double x2 = 0;
        for (const auto& [load, counts] : cells) {
            const double p = declared ? by_hand(0.7, 0.7, 0.9, static_cast<int>(load.first), static_cast<int>(load.second)) : 0.7;
            const double n = counts.first, expected = n * p;
            x2 += (counts.second - expected) * (counts.second - expected) / (expected * (1 - p));
        }
        return x2;
    };
    const boost::math::chi_squared chi2(6);
    const double critical = boost::math::quantile(boost::math::complement(chi2, 0.001));  // 22.4577 (scipy: reference test)
    CHECK(critical == doctest::Approx(22.457744484825323).epsilon(1e-9));
    const double fit = statistic(true);
    MESSAGE("chi-square " << fit << " on 6 df, p = " << boost::math::cdf(boost::math::complement(chi2, fit)));
    CHECK(fit < critical);
    CHECK(statistic(false) > 10 * critical);
    // The table a run reports counts the same notices by band.
    SimulationSetup setup;
    Plan plan;
    plan.name = "p";
    plan.fatigue = e;
    setup.plans = {plan};
    ReplicationRecord record;
    record.plans.resize(1);
    record.plans[0].notices = notices;
    record.plans[0].loads = loads;
    const auto rows = acceptance_by_load(setup, record, 0, hours(24));
    std::int64_t evaluations = 0, counted = 0;
    for (const LoadBandRow& r : rows)
        if (r.load == LoadKind::recent_for_team) {
            counted += r.notices;
            evaluations += r.evaluations;
            if (r.band == load_band(5)) CHECK(*r.declared == doctest::Approx(by_hand(0.7, 0.7, 0.9, 1, 5)));
        }
    CHECK(counted == 6 * units);
    int all_evaluations = 0;
    for (const auto& [load, counts] : cells) all_evaluations += counts.second;
    CHECK(evaluations == all_evaluations);
}

TEST_CASE("fatigue.bands_of_a_load") {
    CHECK(load_band_name(load_band(0)) == "0");
    CHECK(load_band_name(load_band(2)) == "2");
    CHECK(load_band_name(load_band(4)) == "3-4");
    CHECK(load_band_name(load_band(9)) == "5-9");
    CHECK(load_band_name(load_band(10)) == "10-19");
    CHECK(load_band_name(load_band(49)) == "20-49");
    CHECK(load_band_name(load_band(50)) == "50+");
    CHECK(load_band_name(load_band(4000000000u)) == "50+");
}

namespace {

const std::string scenario_dir = std::string(TOCSIN_SOURCE_DIR) + "/scenarios";

std::string replace_once(std::string text, const std::string& from, const std::string& to) {
    const auto at = text.find(from);
    REQUIRE_MESSAGE(at != std::string::npos, from);
    REQUIRE(text.find(from, at + 1) == std::string::npos);
    return text.replace(at, from.size(), to);
}

std::map<std::string, std::string> run_files(const std::string& yaml) {
    Scenario sc = parse_scenario(yaml, "demo.yaml", scenario_dir);
    sc.replications = 2;
    const RunSettings settings = logged_run_settings();
    const RunOutput out = run_scenario(sc, population_factory(sc.population), settings);
    std::map<std::string, std::string> files;
    for (OutputFile& f : run_output_files(sc, out, settings)) files[f.name] = std::move(f.content);
    return files;
}

std::string demo_text() { return read_file(scenario_dir + "/demo.yaml"); }

// The demo's fatigue lines (one per plan that declares it), in file order.
std::vector<std::string> fatigue_lines(const std::string& text) {
    std::vector<std::string> out;
    for (std::size_t at = text.find("    fatigue: {"); at != std::string::npos; at = text.find("    fatigue: {", at + 1))
        out.push_back(text.substr(at, text.find('\n', at) + 1 - at));
    return out;
}

}  // namespace

TEST_CASE("fatigue.declared_at_zero_effect_changes_no_output") {
    // The demo with its fatigue taken out, and with each plan's fatigue at zero
    // effect (odds ratios 1; a page's base response 1): every file both runs
    // write is the same byte for byte. Only the zero-effect run adds the
    // acceptance table (and tables.csv, which lists it).
    const std::string demo = demo_text();
    const auto lines = fatigue_lines(demo);
    REQUIRE(lines.size() >= 2);
    std::string without = demo, at_zero = demo;
    for (const std::string& line : lines) {
        without = replace_once(without, line, "");
        const bool is_page = line.find("base_response") != std::string::npos;
        at_zero = replace_once(at_zero, line,
                               std::string("    fatigue: {") + (is_page ? "base_response: 1, " : "") +
                                   "repeat_odds_ratio: 1, recent_odds_ratio: 1}\n");
    }
    const auto a = run_files(without), b = run_files(at_zero);
    int compared = 0;
    for (const auto& [name, content] : a) {
        CAPTURE(name);
        REQUIRE(b.count(name));
        if (name == "tables.csv") continue;
        CHECK(b.at(name) == content);
        ++compared;
    }
    CHECK(compared > 20);
    CHECK(b.count("acceptance_by_load.csv"));
    CHECK_FALSE(a.count("acceptance_by_load.csv"));
    // And the declared demo does move what fatigue explains.
    const auto declared = run_files(demo);
    CHECK(declared.at("plan_comparison.csv") != a.at("plan_comparison.csv"));
}

TEST_CASE("fatigue.the_loader_refuses_what_cannot_work") {
    const std::string demo = demo_text();
    const auto lines = fatigue_lines(demo);
    REQUIRE(!lines.empty());
    auto error_of = [](const std::string& text) { return std::string(scenario_error(text).what()); };
    // A page at base 1: infinite odds, no factor lowers them.
    std::string base_one = demo;
    for (const std::string& line : lines)
        if (line.find("base_response") != std::string::npos)
            base_one = replace_once(base_one, line, "    fatigue: {base_response: 1, repeat_odds_ratio: 0.7}\n");
    CHECK(error_of(base_one).find("infinite odds") != std::string::npos);
    CHECK(error_of(base_one).find("s.yaml:") != std::string::npos);
    // A page must state its base; a chart interruption must not.
    std::string no_base = demo, chart_base = demo;
    for (const std::string& line : lines) {
        if (line.find("base_response") != std::string::npos)
            no_base = replace_once(no_base, line, "    fatigue: {repeat_odds_ratio: 0.7}\n");
        else
            chart_base = replace_once(chart_base, line, "    fatigue: {base_response: 0.5, repeat_odds_ratio: 0.7}\n");
    }
    CHECK(error_of(no_base).find("required for a page") != std::string::npos);
    CHECK(error_of(chart_base).find("chart.acceptance_probability") != std::string::npos);
    // A handoff list is not answered notice by notice.
    const std::string handoff = replace_once(
        demo, "    handoff: {minutes_per_flag: 3, follow_up_probability: 0.8}\n",
        "    handoff: {minutes_per_flag: 3, follow_up_probability: 0.8}\n    fatigue: {repeat_odds_ratio: 0.7}\n");
    CHECK(error_of(handoff).find("fatigue applies to pages and chart interruptions") != std::string::npos);
    // An odds ratio of 0 is out of range.
    std::string zero = demo;
    zero = replace_once(zero, lines.front(), "    fatigue: {base_response: 0.9, repeat_odds_ratio: 0}\n");
    CHECK(error_of(zero).find("repeat_odds_ratio") != std::string::npos);
}
