// A run cut into work items for MPI ranks (study/work_items.hpp) and their
// results as bytes (study/work_codec.hpp), checked in one process: the MPI
// tests themselves (tests/mpi/check_ranks.py) run only in a TOCSIN_MPI build.
#include <doctest/doctest.h>

#include <algorithm>
#include <bit>
#include <cmath>
#include <cstring>
#include <limits>
#include <set>

#include "report/run_files.hpp"
#include "study/work_codec.hpp"
#include "study/work_items.hpp"
#include "test_support.hpp"

using namespace tocsin;

namespace {

std::string all_files(const Scenario& sc, const RunOutput& out, const RunSettings& settings) {
    std::string s;
    for (const OutputFile& f : run_output_files(sc, out, settings)) s += f.name + "\n" + f.content;
    return s;
}

// Computes every item in this process, last item first, as a rank far away
// might return them; `first` runs after the items, to show the order does not matter.
class BackwardsDistributor : public WorkDistributor {
public:
    explicit BackwardsDistributor(unsigned ranks) : ranks_(ranks) {}
    unsigned ranks() const override { return ranks_; }
    std::vector<WorkResult> distribute(std::span<const WorkItem> items, const std::function<void()>& first,
                                       const std::function<WorkResult(const WorkItem&)>& compute) override {
        std::vector<WorkResult> out;
        for (std::size_t i = items.size(); i-- > 0;)  // through the bytes, as between ranks
            out.push_back(decode_work_result(encode_work_result(compute(items[i]))));
        first();
        handed_out = items.size();
        return out;
    }
    std::size_t handed_out = 0;

private:
    unsigned ranks_;
};

Scenario demo(std::uint64_t replications) {
    Scenario sc = load_scenario(std::string(TOCSIN_SOURCE_DIR) + "/scenarios/demo.yaml");
    sc.replications = replications;
    return sc;
}

}  // namespace

TEST_CASE("work_items.tile_every_plan_of_every_replication_but_the_first") {
    Scenario sc = demo(5);
    const std::size_t plans = sc.simulation.plans.size();
    RunSettings settings;
    for (unsigned ranks : {1u, 2u, 3u, 64u}) {
        const std::vector<WorkItem> items = work_items(sc, settings, ranks);
        std::set<std::pair<std::uint64_t, std::size_t>> covered;
        for (const WorkItem& i : items) {
            CHECK(i.replication >= 1);
            CHECK(i.replication < 5);
            CHECK(i.plan_count >= 1);
            for (std::size_t p = i.first_plan; p < i.first_plan + i.plan_count; ++p)
                CHECK(covered.insert({i.replication, p}).second);  // no plan twice
        }
        CHECK(covered.size() == 4 * plans);
        // Enough items to keep the ranks busy: 8 per rank while plans allow.
        CHECK(items.size() == 4 * std::min<std::size_t>(plans, (8 * ranks + 3) / 4));
    }
    settings.notice_log = true;  // a log stays in its replication's order: whole replications
    CHECK(work_items(sc, settings, 3).size() == 4);
    sc.replications = 1;
    CHECK(work_items(sc, RunSettings{}, 3).empty());
}

TEST_CASE("work_items.results_travel_bit_for_bit") {
    WorkResult r;
    r.item = {7, 3, 2};
    PlanFigures f;
    f.notices = -5;
    f.per_unit_shift_mean = -0.0;
    f.per_unit_shift_p90 = std::numeric_limits<double>::denorm_min();
    f.per_unit_shift_max = std::bit_cast<double>(std::uint64_t{0x7ff8dead0000beefULL});  // a NaN with a payload
    f.sensitivity = 0.1 + 0.2;
    f.never_taken_up = 12;
    f.unit_shift_counts = {1, 0, 9};
    r.figures = {f, PlanFigures{}};
    UnitFigures u;
    u.plan = "page-55 t55 s=é";
    u.unit = std::string("a\0b", 3);
    u.lead_median_hours = 1.0 / 3;
    r.unit_figures = {u};
    LoggedNotice n;
    n.opener = "ward nurse";
    n.channel = Channel::ranked_review;
    r.notice_log = {n};
    LoggedTask t;
    t.wait_minutes = 2.5;
    t.fate = TaskFate::in_progress_at_end;
    r.task_log = {t};

    const std::string bytes = encode_work_result(r);
    const WorkResult back = decode_work_result(bytes);
    CHECK(back.item.replication == 7);
    CHECK(back.item.first_plan == 3);
    CHECK(back.item.plan_count == 2);
    REQUIRE(back.figures.size() == 2);
    const PlanFigures& g = back.figures[0];
    CHECK(g.notices == -5);
    CHECK(std::signbit(g.per_unit_shift_mean));
    CHECK(g.per_unit_shift_p90 == std::numeric_limits<double>::denorm_min());
    CHECK(std::bit_cast<std::uint64_t>(g.per_unit_shift_max) == 0x7ff8dead0000beefULL);
    CHECK(std::bit_cast<std::uint64_t>(*g.sensitivity) == std::bit_cast<std::uint64_t>(0.1 + 0.2));
    CHECK(g.never_taken_up == std::optional<std::int64_t>(12));
    CHECK(!g.per_unit_night_mean);
    CHECK(g.unit_shift_counts == std::vector<std::int64_t>{1, 0, 9});
    REQUIRE(back.unit_figures.size() == 1);
    CHECK(back.unit_figures[0].plan == u.plan);
    CHECK(back.unit_figures[0].unit == u.unit);
    CHECK(*back.unit_figures[0].lead_median_hours == 1.0 / 3);
    REQUIRE(back.notice_log.size() == 1);
    CHECK(back.notice_log[0].opener == std::optional<std::string>("ward nurse"));
    CHECK(back.notice_log[0].channel == Channel::ranked_review);
    REQUIRE(back.task_log.size() == 1);
    CHECK(back.task_log[0].fate == TaskFate::in_progress_at_end);
    CHECK(back.task_log[0].wait_minutes == std::optional<double>(2.5));
    CHECK(encode_work_result(back) == bytes);

    // Damaged bytes are refused, never read as other figures.
    CHECK_THROWS_WITH(decode_work_result(bytes.substr(0, bytes.size() - 1)), "work result bytes end early");
    CHECK_THROWS_WITH(decode_work_result(bytes + "x"), "work result bytes run on past their end");
    std::string huge = bytes;
    huge[31] = '\x01';  // the top byte of the count of plan figures (after the item's 24 bytes): 2^56 of them
    CHECK_THROWS(decode_work_result(huge));
}

TEST_CASE("work_items.a_run_cut_into_items_writes_the_same_files") {
    // The demo's plans (every channel, staff with escalation, hospital-wide
    // and per-unit teams) over four replications, with both logs and without.
    const Scenario sc = demo(4);
    const PopulationFactory factory = population_factory(sc.population);
    for (bool logs : {false, true}) {
        RunSettings settings;
        settings.threads = 2;
        settings.notice_log = settings.task_log = logs;
        const RunOutput whole = run_scenario(sc, factory, settings);
        BackwardsDistributor distributor(3);
        const RunOutput cut = run_scenario_distributed(sc, factory, settings, distributor);
        CHECK(distributor.handed_out == (logs ? 3u : 3u * sc.simulation.plans.size()));
        CHECK(all_files(sc, whole, settings) == all_files(sc, cut, settings));
    }
}

TEST_CASE("work_items.a_replayed_log_travels_whole") {
    // What rank 0 broadcasts: the invented log as read, with its exclusions
    // (scores after discharge, a repeated local hour) and its skipped rows.
    const Scenario sc = load_scenario(std::string(TOCSIN_SOURCE_DIR) + "/scenarios/fernhollow-replay.yaml");
    const PreparedPopulation read = prepare_population(sc.population);
    REQUIRE(read.log);
    const Population& log = *read.log;
    const std::string bytes = encode_population(log);
    const Population back = decode_population(bytes);
    CHECK(back.units == log.units);
    REQUIRE(back.encounters.size() == log.encounters.size());
    CHECK(back.encounters.back().id == log.encounters.back().id);
    CHECK(back.encounters.back().outcome_at == log.encounters.back().outcome_at);
    REQUIRE(back.scores.size() == log.scores.size());
    CHECK(std::memcmp(back.scores.data(), log.scores.data(), log.scores.size() * sizeof(Score)) == 0);
    CHECK(back.score_start == log.score_start);
    CHECK(back.excluded.scores_by_reason == log.excluded.scores_by_reason);
    CHECK(!log.excluded.scores_by_reason.empty());
    CHECK(back.excluded.notes == log.excluded.notes);
    CHECK(back.excluded.rows_skipped.size() == log.excluded.rows_skipped.size());
    CHECK(back.period_start == log.period_start);
    CHECK(back.period_end == log.period_end);
    CHECK(encode_population(back) == bytes);
    // Prepared from the received log, the population is the one prepared from the file.
    const PreparedPopulation received = prepare_population(sc.population, back);
    CHECK(encode_population(population_for(sc.population, received, 0)) ==
          encode_population(population_for(sc.population, read, 0)));
}
