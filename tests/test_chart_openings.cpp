// Chart openings: the generator's counts match the integral of its declared
// rate; the replayed log is read strictly, with exclusions counted by reason.
#include <doctest/doctest.h>

#include <cmath>

#include "models/chart_openings.hpp"
#include "models/errors.hpp"
#include "test_support.hpp"

using namespace tocsin;

namespace {

Instant at(int day, int hour, int minute = 0) {
    return days_from_civil(2026, 3, day) * 86400 + hour * 3600 + minute * 60;
}

// A ward rhythm: quiet nights, a busy morning round, an evening peak (per patient per hour).
ChartOpeningRole nurse() {
    ChartOpeningRole r;
    r.name = "nurse";
    r.clinicians_per_unit = 4;
    const double rate[24] = {0.2, 0.2, 0.2, 0.2, 0.2, 0.3, 0.6, 1.5, 2.0, 1.4, 1.0, 1.0,
                             1.0, 1.0, 1.0, 1.0, 1.0, 1.2, 1.5, 1.8, 1.0, 0.6, 0.4, 0.3};
    for (int h = 0; h < 24; ++h) r.openings_per_hour[static_cast<std::size_t>(h)] = rate[h];
    return r;
}

std::string expect_error(const std::string& path, const std::vector<ChartOpeningRole>& roles, const Population& pop) {
    try {
        load_chart_openings(path, roles, pop, TimeZone::utc());
    } catch (const InputError& e) {
        return e.what();
    }
    return "no error";
}

}  // namespace

TEST_CASE("chart_openings.generated_counts_match_the_rate") {
    // 500 patients, each staying exactly 72 h from a whole hour (UTC): every
    // local hour of the day is covered 3 times per patient, so the expected count
    // in hour h is 500 x 3 x rate(h). Counts are Poisson, so within 4 standard
    // deviations (sqrt of the mean) per hour: with 24 hours the chance that a
    // correct generator fails somewhere is about 24 x 6.3e-5 = 0.15% (the seed
    // is fixed, so the test is deterministic). The total is checked the same way.
    const std::vector<ChartOpeningRole> roles = {nurse()};
    std::array<double, 24> count{};
    double total = 0, expected_total = 0;
    for (std::uint64_t e = 0; e < 500; ++e) {
        Encounter enc;
        enc.admitted = at(3, static_cast<int>(e % 24));
        enc.discharged = enc.admitted + hours(72);
        std::vector<ChartOpening> out;
        generate_chart_openings(roles, enc, e, TimeZone::utc(), ReplicationSeed{20261201, 0}, out);
        for (const ChartOpening& o : out) {
            CHECK(o.at >= enc.admitted);
            CHECK(o.at < enc.discharged);
            count[static_cast<std::size_t>(local_hour(TimeZone::utc(), o.at))] += 1;
        }
        CHECK(std::is_sorted(out.begin(), out.end(), [](auto& a, auto& b) { return a.at < b.at; }));
        total += static_cast<double>(out.size());
        expected_total += expected_chart_openings(roles[0], TimeZone::utc(), enc.admitted, enc.discharged);
    }
    for (std::size_t h = 0; h < 24; ++h) {
        const double mean = 500 * 3 * roles[0].openings_per_hour[h];
        CAPTURE(h);
        CHECK(std::abs(count[h] - mean) <= 4 * std::sqrt(mean));
    }
    double sum_rate = 0;
    for (double r : roles[0].openings_per_hour) sum_rate += r;
    CHECK(expected_total == doctest::Approx(500 * 3 * sum_rate));
    CHECK(std::abs(total - expected_total) <= 4 * std::sqrt(expected_total));
}

TEST_CASE("chart_openings.integral_of_the_rate") {
    // From 06:30 to 09:15: 0.6 x 0.5 h (06:30-07:00)
    // + 1.5 (07-08) + 2.0 (08-09) + 1.4 x 0.25 (09:00-09:15) = 0.3 + 1.5 + 2.0 + 0.35 = 4.15.
    CHECK(expected_chart_openings(nurse(), TimeZone::utc(), at(3, 6, 30), at(3, 9, 15)) == doctest::Approx(4.15));
    // In Chicago (UTC-6 in early March) the same local hours are 6 h later in UTC.
    const TimeZone chicago = TimeZone::load("America/Chicago");
    CHECK(expected_chart_openings(nurse(), chicago, at(3, 12, 30), at(3, 15, 15)) == doctest::Approx(4.15));
}

TEST_CASE("chart_openings.stop_at_time_zero") {
    // Nothing is generated at or after the outcome, even though the stay goes on.
    Encounter enc;
    enc.admitted = at(3, 0);
    enc.discharged = at(10, 0);
    enc.outcome_at = at(4, 0);
    std::vector<ChartOpening> out;
    generate_chart_openings({nurse()}, enc, 0, TimeZone::utc(), ReplicationSeed{1, 0}, out);
    REQUIRE_FALSE(out.empty());
    CHECK(out.back().at < at(4, 0));
}

TEST_CASE("chart_openings.replay") {
    tocsin::testing::ScratchDir dir;
    Population pop;
    pop.units = {"A"};
    pop.encounters.push_back({"E1", 0, at(3, 0), at(5, 0), at(4, 12)});
    pop.encounters.push_back({"E2", 0, at(3, 0), at(4, 0), std::nullopt});
    ChartOpeningRole doctor;
    doctor.name = "doctor";
    const std::vector<ChartOpeningRole> roles = {nurse(), doctor};
    // Row order is not time order; extra columns are ignored. E1: 13:00 nurse,
    // 09:00 doctor, 4 Mar 12:00 (time zero: excluded), 2 Mar (before admission:
    // excluded). E2: 10:00, and 4 Mar 00:00 (at discharge: excluded).
    const std::string path = dir.file("openings.csv",
                                      "role,encounter,opened_at,terminal\n"
                                      "nurse,E1,2026-03-03T13:00:00Z,t1\n"
                                      "doctor,E1,2026-03-03T09:00:00Z,t2\n"
                                      "nurse,E1,2026-03-04T12:00:00Z,t1\n"
                                      "nurse,E1,2026-03-02T12:00:00Z,t1\n"
                                      "\n"
                                      "nurse,E2,2026-03-03 10:00:00,t3\n"
                                      "nurse,E2,2026-03-04T00:00:00Z,t3\n");
    const ChartOpeningLog log = load_chart_openings(path, roles, pop, TimeZone::utc());
    REQUIRE(log.of(0).size() == 2);
    CHECK(log.of(0)[0].at == at(3, 9));
    CHECK(log.of(0)[0].role == 1);
    CHECK(log.of(0)[1].at == at(3, 13));
    REQUIRE(log.of(1).size() == 1);
    CHECK(log.of(1)[0].at == at(3, 10));
    CHECK(log.excluded_by_reason == std::map<std::string, std::int64_t>{{"opened at or after discharge", 1},
                                                                        {"opened at or after the outcome (time zero)", 1},
                                                                        {"opened before admission", 1}});

    SUBCASE("errors name file, line and column") {
        const std::string head = "encounter,opened_at,role\n";
        CHECK(expect_error(dir.file("a.csv", head + "E1,2026-03-03T09:00:00Z,nurse\nE9,2026-03-03T09:00:00Z,nurse\n"), roles, pop)
                  .find("a.csv:3:1: encounter: chart opening for an unknown encounter 'E9'") != std::string::npos);
        CHECK(expect_error(dir.file("b.csv", head + "E1,yesterday,nurse\n"), roles, pop)
                  .find("b.csv:2:2: opened_at: expected a timestamp") != std::string::npos);
        CHECK(expect_error(dir.file("c.csv", head + "E1,2026-03-03T09:00:00Z,porter\n"), roles, pop)
                  .find("c.csv:2:3: role: role 'porter' is not declared in chart_openings.roles (declared: nurse, doctor)") !=
              std::string::npos);
        CHECK(expect_error(dir.file("d.csv", "encounter,role\nE1,nurse\n"), roles, pop)
                  .find("d.csv:1: opened_at: required column is missing") != std::string::npos);
        CHECK(expect_error(dir.file("e.csv", head + "E1,2026-03-03T09:00:00Z\n"), roles, pop)
                  .find("e.csv:2: expected 3 fields as in the header, found 2") != std::string::npos);
        CHECK(expect_error(dir.path("missing.csv"), roles, pop).find("missing.csv") != std::string::npos);
    }
}

TEST_CASE("chart_openings.replayed_through_the_command_line") {
    // The demo with its chart openings replayed from a three-row log: one usable
    // opening (FH-00003, admitted 2 Nov 18:52, outcome 3 Nov 18:12 local), one
    // after its outcome and one before its admission, both counted as excluded.
    tocsin::testing::ScratchDir dir;
    const std::string source = std::string(TOCSIN_SOURCE_DIR) + "/scenarios/";
    std::string yaml = tocsin::testing::read_file(source + "fernhollow-replay.yaml");
    yaml.replace(yaml.find("chart_openings:\n"), 16, "chart_openings:\n  replay: openings.csv\n");
    dir.file("demo.yaml", yaml);
    dir.file("demo/encounters.csv", tocsin::testing::read_file(source + "demo/encounters.csv"));
    dir.file("demo/scores.csv", tocsin::testing::read_file(source + "demo/scores.csv"));
    dir.file("openings.csv",
             "encounter,opened_at,role\n"
             "FH-00003,2026-11-03 10:00:00,ward nurse\n"
             "FH-00003,2026-11-03 19:00:00,ward nurse\n"
             "FH-00003,2026-11-01 00:00:00,ward physician\n");
    const auto check = tocsin::testing::run_tocsin("check " + dir.path("demo.yaml"));
    INFO(check.output);
    CHECK(check.exit_code == 0);
    CHECK(check.output.find("Chart openings: 1 usable.") != std::string::npos);
    const auto run = tocsin::testing::run_tocsin("run " + dir.path("demo.yaml") + " --out " + dir.path("out"));
    REQUIRE(run.exit_code == 0);
    const std::string exclusions = tocsin::testing::read_file(dir.path("out/exclusions.csv"));
    CHECK(exclusions.find("chart openings,opened at or after the outcome (time zero),1") != std::string::npos);
    CHECK(exclusions.find("chart openings,opened before admission,1") != std::string::npos);
    const std::string burden = tocsin::testing::read_file(dir.path("out/channel_burden.csv"));
    CHECK(burden.find("chart-60,chart_interruption,1,") != std::string::npos);  // one opening asked

    // A bad row stops the run with its place, and nothing is written.
    dir.file("openings.csv", "encounter,opened_at,role\nFH-00003,2026-11-03 10:00:00,porter\n");
    const auto bad = tocsin::testing::run_tocsin("run " + dir.path("demo.yaml") + " --out " + dir.path("bad"));
    CHECK(bad.exit_code == 2);
    CHECK(bad.output.find("openings.csv:2:3: role: role 'porter' is not declared") != std::string::npos);
    CHECK_FALSE(std::filesystem::exists(dir.path("bad")));
}
