// Common random numbers across plans, through the real scenario -> run path on
// the replayed example: a plan's figures depend on the plan, the patients and
// the staff, never on which other plans are listed, where it sits in the list,
// or which chart-opening roles it never interrupts. Each check edits the
// scenario text, runs both versions and compares every row that names the plan
// in every per-plan table (staff figures and task log included).
#include <doctest/doctest.h>

#include <algorithm>
#include <cstdio>
#include <map>
#include <string>
#include <variant>
#include <vector>

#include "study/run.hpp"
#include "report/comparison_tables.hpp"
#include "report/run_tables.hpp"
#include "report/unit_tables.hpp"
#include "models/population_source.hpp"
#include "study/sweep.hpp"
#include "test_support.hpp"

using namespace tocsin;
using namespace tocsin::testing;

namespace {

const std::string scenario_dir = std::string(TOCSIN_SOURCE_DIR) + "/scenarios";

std::string example_text() { return read_file(scenario_dir + "/fernhollow-replay.yaml"); }

// `text` with `from` replaced by `to`, which must occur exactly once.
std::string replace_once(std::string text, const std::string& from, const std::string& to) {
    const auto at = text.find(from);
    REQUIRE(at != std::string::npos);
    REQUIRE(text.find(from, at + 1) == std::string::npos);
    return text.replace(at, from.size(), to);
}

std::string cell_text(const Cell& c) {
    return std::visit(
        [](const auto& v) -> std::string {
            using T = std::decay_t<decltype(v)>;
            if constexpr (std::is_same_v<T, std::monostate>) return "";
            else if constexpr (std::is_same_v<T, std::string>) return v;
            else if constexpr (std::is_same_v<T, std::int64_t>) return std::to_string(v);
            else {
                char buf[40];
                std::snprintf(buf, sizeof buf, "%.17g", v);
                return buf;
            }
        },
        c);
}

// table name -> plan name -> that plan's rows in table order, the plan column left out
// (so a plan copied under another name compares equal).
using RowsByPlan = std::map<std::string, std::map<std::string, std::vector<std::string>>>;

// A run's output and the zone its tables show times in.
struct RunWithZone {
    RunOutput out;
    TimeZone zone;
};

RowsByPlan rows_by_plan(const RunWithZone& run) {
    const RunOutput& out = run.out;
    const RunTables t = run_tables(out.first_replication, run.zone);
    const ComparisonTables comparison = comparison_tables(out.figures);
    const Table net_benefit = plan_net_benefit_table(out.plan_net_benefit);
    const Table unit_comparison = plan_unit_comparison_table(out.unit_figures);
    std::vector<const Table*> tables = {&t.plan_summary, &t.plan_unit_summary, &unit_comparison, &t.unit_shift_notices, &t.channel_burden, &t.rounds,
                                        &t.chart_interruptions, &comparison.comparison,
                                        &comparison.replication_figures, &net_benefit};
    for (const auto* opt : {&t.notice_log, &t.staff_workload, &t.staff_escalations, &t.task_fates, &t.task_log})
        if (*opt) tables.push_back(&**opt);
    RowsByPlan rows;
    for (const Table* table : tables) {
        const auto plan_col = std::find(table->columns.begin(), table->columns.end(), "plan") - table->columns.begin();
        REQUIRE_MESSAGE(static_cast<std::size_t>(plan_col) < table->columns.size(), table->name << " has no plan column");
        for (const auto& row : table->rows) {
            std::string line;
            for (std::size_t c = 0; c < row.size(); ++c)
                if (static_cast<std::ptrdiff_t>(c) != plan_col) line += cell_text(row[c]) + ",";
            rows[table->name][cell_text(row[static_cast<std::size_t>(plan_col)])].push_back(line);
        }
    }
    return rows;
}

RunWithZone run_text(const std::string& yaml) {
    Scenario sc = parse_scenario(yaml, "fernhollow-replay.yaml", scenario_dir);
    sc.replications = 2;
    return {run_scenario(sc, population_factory(sc.population), logged_run_settings()), sc.simulation.zone};
}

// Every table row of plan `plan` in `a` equals the rows of plan `as` in `b`;
// returns how many rows were compared.
int check_same_rows(const RowsByPlan& a, const std::string& plan, const RowsByPlan& b, const std::string& as) {
    int compared = 0;
    for (const auto& [table, plans] : a) {
        CAPTURE(table);
        CAPTURE(plan);
        const auto mine = plans.find(plan);
        if (mine == plans.end()) continue;
        REQUIRE(b.count(table));
        const auto theirs = b.at(table).find(as);
        REQUIRE(theirs != b.at(table).end());
        CHECK(mine->second == theirs->second);
        compared += static_cast<int>(mine->second.size());
    }
    return compared;
}

const std::vector<std::string> example_plans = {"page-70",   "page-55-rise", "page-55-twice", "page-45-noisy",
                                                "page-50-thin-nights", "chart-60", "handoff-50", "review-top4"};

const std::string inserted_plans = R"(  - name: inserted-page
    channel: page
    role: rapid response nurse
    rule: {threshold: 62, snooze_minutes: 90}
  - name: inserted-handoff
    channel: handoff_list
    role: charge nurse
    rule: {threshold: 58}
    handoff: {times: ["07:00", "13:00", "19:00"], minutes_per_flag: 3, follow_up_probability: 0.5}
)";

}  // namespace

TEST_CASE("common_random_numbers.inserting_a_plan_changes_no_other_plan") {
    // Two plans inserted before page-55-twice, one of them a handoff list read
    // at other times: every plan listed after them moved down the list.
    const std::string base = example_text();
    const std::string more = replace_once(base, "  - name: page-55-twice\n", inserted_plans + "  - name: page-55-twice\n");
    const RowsByPlan a = rows_by_plan(run_text(base)), b = rows_by_plan(run_text(more));
    int compared = 0;
    for (const std::string& plan : example_plans) compared += check_same_rows(a, plan, b, plan);
    CHECK(compared > 1000);  // the task log alone has a row per evaluation
    // The inserted plans did run, with staff figures of their own.
    CHECK(b.at("staff_workload").count("inserted-page"));
    CHECK(b.at("staff_workload").count("inserted-handoff"));
}

TEST_CASE("common_random_numbers.a_copied_plan_gets_the_same_figures") {
    // Copies of three plans under other names, appended: each copy answers the
    // same notices for the same patients with the same minutes, acceptance and
    // follow-up draws, so all its figures equal the original's.
    const std::string base = example_text();
    std::string copies;
    for (const char* name : {"page-55-rise", "chart-60", "handoff-50"}) {
        const std::string key = std::string("  - name: ") + name + "\n";
        const auto from = base.find(key);
        REQUIRE(from != std::string::npos);
        const auto to = base.find("  - name: ", from + key.size());
        const auto blank = base.find("\n\n", from);
        const std::string block = base.substr(from, std::min(to, blank + 1) - from);
        copies += replace_once(block, key, std::string("  - name: copy-of-") + name + "\n");
    }
    const std::string more = replace_once(base, "\n# When charts are opened", "\n" + copies + "\n# When charts are opened");
    const RowsByPlan b = rows_by_plan(run_text(more));
    for (const char* name : {"page-55-rise", "chart-60", "handoff-50"})
        CHECK(check_same_rows(b, name, b, std::string("copy-of-") + name) > 50);
}

namespace {

// `text` without the plan or chart-opening role item that starts with `head`
// (up to the next item at the same indentation, a blank line or the end).
std::string without_item(const std::string& text, const std::string& head) {
    const auto from = text.find(head);
    REQUIRE(from != std::string::npos);
    const std::string indent = head.substr(0, head.find('-') + 2);
    auto to = std::min(text.find("\n" + indent, from + 1), text.find("\n\n", from));
    to = to == std::string::npos ? text.size() : to + 1;
    return text.substr(0, from) + text.substr(to);
}

}  // namespace

TEST_CASE("common_random_numbers.an_opening_role_a_plan_never_sees") {
    // chart-60 interrupts ward nurses only; a plan interrupting ward physicians
    // only is added (with a ward physician staff role to answer it). Dropping
    // the physicians' openings and their plan leaves every other plan alone, and
    // so does dropping the nurses' openings with chart-60.
    std::string base = replace_once(example_text(), "escalation:\n", R"(  - name: ward physician
    team: each_unit
    roster: {day: 1, night: 1}
    minutes: {distribution: lognormal, median: 20, spread: 1.6}

escalation:
)");
    base = replace_once(base, "\n# When charts are opened", R"(
  - name: chart-physician
    channel: chart_interruption
    role: ward physician
    rule: {threshold: 45, snooze_minutes: 120}
    chart: {interruption_minutes: 3, acceptance_probability: 0.5}

# When charts are opened)");
    const RowsByPlan all = rows_by_plan(run_text(base));
    const std::string no_physician =
        without_item(without_item(base, "  - name: chart-physician\n"), "    - name: ward physician\n      clinicians");
    const std::string no_nurse =
        without_item(without_item(base, "  - name: chart-60\n"), "    - name: ward nurse\n      clinicians");
    const RowsByPlan a = rows_by_plan(run_text(no_physician)), b = rows_by_plan(run_text(no_nurse));
    CHECK_FALSE(a.at("plan_summary").count("chart-physician"));
    CHECK_FALSE(b.at("plan_summary").count("chart-60"));
    for (const std::string& plan : example_plans) {
        if (plan != "chart-60") CHECK(check_same_rows(all, plan, b, plan) > 0);
        CHECK(check_same_rows(all, plan, a, plan) > 0);
    }
    CHECK(check_same_rows(all, "chart-60", a, "chart-60") > 50);
    CHECK(check_same_rows(all, "chart-physician", b, "chart-physician") > 20);
}

TEST_CASE("common_random_numbers.staffing_sweep_points_draw_the_same_minutes") {
    // A staffing axis answers each grid point with a copy of the role under its
    // own name. With one cover nurse at night against twelve, queues and
    // escalations differ, but a task evaluated by the cover nurse (no escalation)
    // at both grid points needs the same minutes at both: the draws are keyed by
    // the task, not by the role's name.
    SweepRequest request;
    request.base_plan = "page-50-thin-nights";
    request.axes = {parse_sweep_axis("roles.cover nurse.roster.night=1,12")};
    Scenario sc = sweep_scenario(scenario_dir + "/fernhollow-replay.yaml", request);
    REQUIRE(sc.simulation.plans.size() == 2);
    sc.replications = 1;
    RunSettings settings;
    settings.threads = 2;
    settings.task_log = true;
    settings.evaluate = false;
    const RunOutput out = run_scenario(sc, population_factory(sc.population), settings);
    const RunTables tables = run_tables(out.first_replication, sc.simulation.zone);
    REQUIRE(tables.task_log);
    const Table& log = *tables.task_log;
    const auto column = [&](const char* name) {
        const auto at = std::find(log.columns.begin(), log.columns.end(), name) - log.columns.begin();
        REQUIRE(static_cast<std::size_t>(at) < log.columns.size());
        return static_cast<std::size_t>(at);
    };
    const std::size_t plan = column("plan"), task = column("task"), work = column("work_minutes"),
                      escalations = column("escalations");
    // task index -> work minutes at the first role, per grid point
    std::map<std::string, std::map<std::string, std::string>> minutes;
    for (const auto& row : log.rows)
        if (cell_text(row[escalations]) == "0" && !cell_text(row[work]).empty())
            minutes[cell_text(row[plan])][cell_text(row[task])] = cell_text(row[work]);
    REQUIRE(minutes.size() == 2);
    const auto& thin = minutes.begin()->second;
    const auto& ample = std::next(minutes.begin())->second;
    int compared = 0;
    for (const auto& [t, m] : thin) {
        const auto other = ample.find(t);
        if (other == ample.end()) continue;
        CAPTURE(t);
        CHECK(m == other->second);
        ++compared;
    }
    CHECK(compared > 500);  // page-50-thin-nights sends about 1,300 notices
}

TEST_CASE("common_random_numbers.a_plan_with_its_own_escalation_changes_no_other_plan") {
    // page-45-noisy shares the rapid response nurse with three other page
    // plans and inherits their escalation edge to the house physician; given
    // its own escalation (none) and its own roster, only its own rows may change.
    const std::string base = example_text();
    const std::string own = replace_once(base, "    role: rapid response nurse\n    rule: {threshold: 45, snooze_minutes: 60}\n",
                                         "    role: rapid response nurse\n    escalation: []\n"
                                         "    roster: {day: 3, night: 3}\n    rule: {threshold: 45, snooze_minutes: 60}\n");
    const RowsByPlan a = rows_by_plan(run_text(base)), b = rows_by_plan(run_text(own));
    int compared = 0;
    for (const std::string& plan : example_plans)
        if (plan != "page-45-noisy") compared += check_same_rows(a, plan, b, plan);
    CHECK(compared > 1000);
    // Its tasks escalated before and do not now; its workload lists the nurse
    // only, no longer the physician.
    REQUIRE(a.count("staff_escalations"));
    CHECK(a.at("staff_escalations").count("page-45-noisy"));
    CHECK_FALSE(b.at("staff_escalations").count("page-45-noisy"));
    CHECK(a.at("staff_workload").at("page-45-noisy").size() == 2);
    CHECK(b.at("staff_workload").at("page-45-noisy").size() == 1);
}

TEST_CASE("common_random_numbers.other_work_moves_no_notice_and_no_plan_that_does_not_meet_it") {
    // The cover nurse (page-50-thin-nights' role) gains ward calls no score
    // raised. Every notice of every plan is unchanged (other work draws from its
    // own stream), every plan that never reaches the cover nurse keeps every
    // figure, and page-50-thin-nights' staff now wait longer.
    const std::string base = example_text();
    const std::string busy = replace_once(base, "    minutes: {distribution: gamma, mean: 30, sd: 10}\n",
                                          "    minutes: {distribution: gamma, mean: 30, sd: 10}\n"
                                          "    other_work:\n"
                                          "      - name: ward calls\n"
                                          "        per_hour: [1.5]\n"
                                          "        minutes: {distribution: exponential, mean: 30}\n");
    const RowsByPlan a = rows_by_plan(run_text(base));
    RowsByPlan b = rows_by_plan(run_text(busy));
    // staff_workload gains seven columns for other work (zero or empty on roles
    // without any): the columns the two runs share are compared.
    for (auto& [plan, rows] : b.at("staff_workload"))
        for (std::string& row : rows) {
            CHECK(std::count(row.begin(), row.end(), ',') == 24);
            for (int k = 0; k < 7; ++k) row.erase(row.rfind(',', row.size() - 2) + 1);
        }
    for (const std::string& plan : example_plans) {
        CAPTURE(plan);
        CHECK(a.at("notice_log").at(plan) == b.at("notice_log").at(plan));
        if (plan != "page-50-thin-nights") CHECK(check_same_rows(a, plan, b, plan) > 0);
    }
    CHECK(a.at("task_log").at("page-50-thin-nights") != b.at("task_log").at("page-50-thin-nights"));
}

TEST_CASE("common_random_numbers.a_look_up_plan_changes_no_other_plan") {
    // Two look-up plans (nothing pushed) inserted before chart-60: their
    // look-up draws have a purpose of their own, so every other plan, the chart
    // interruptions included, keeps every figure. The two see the same
    // look-ups (the same draw per opening) and differ only in what they do
    // with the score, and their burden is counted in look-ups per clinician.
    const std::string lookups = R"(  - name: lookup-60
    channel: score_lookup
    role: ward nurse
    rule: {threshold: 60, snooze_minutes: 240}
    lookup: {minutes_per_lookup: 0.5, probability: [0.1]}
  - name: lookup-45
    channel: score_lookup
    role: ward nurse
    rule: {threshold: 45, snooze_minutes: 240}
    lookup: {minutes_per_lookup: 0.5, probability: [0.1]}
)";
    const std::string base = example_text();
    const std::string more = replace_once(base, "  - name: chart-60\n", lookups + "  - name: chart-60\n");
    const RowsByPlan a = rows_by_plan(run_text(base)), b = rows_by_plan(run_text(more));
    int compared = 0;
    for (const std::string& plan : example_plans) compared += check_same_rows(a, plan, b, plan);
    CHECK(compared > 1000);
    const auto notices_of = [&](const std::string& plan) {
        std::vector<std::string> at;  // encounter, unit, instant of each look-up
        for (const std::string& row : b.at("notice_log").at(plan)) {
            std::vector<std::string> cells;
            std::size_t from = 0;
            for (std::size_t to = row.find(','); to != std::string::npos; from = to + 1, to = row.find(',', from))
                cells.push_back(row.substr(from, to - from));
            at.push_back(cells[0] + "," + cells[1] + "," + cells[2] + "," + cells[3]);  // replication, encounter, unit, at
        }
        return at;
    };
    const auto looked_60 = notices_of("lookup-60"), looked_45 = notices_of("lookup-45");
    CHECK(looked_60.size() > 100);
    CHECK(looked_60 == looked_45);
    const std::string burden = b.at("channel_burden").at("lookup-60").front();
    CHECK(burden.find("score_lookup,") != std::string::npos);
    CHECK(burden.find("look-ups per clinician per shift") != std::string::npos);
    // The lower threshold acts on more look-ups.
    const std::string caught_60 = b.at("plan_summary").at("lookup-60").front(), caught_45 = b.at("plan_summary").at("lookup-45").front();
    CHECK(caught_60 != caught_45);
}
