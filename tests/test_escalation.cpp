// Escalation graphs: what is accepted, what is rejected at load (naming the
// edges), and the path and worst-case time `tocsin check` prints.
#include <doctest/doctest.h>

#include <algorithm>

#include "models/errors.hpp"
#include "sim/escalation.hpp"

using namespace tocsin;

namespace {
const std::vector<std::string> roles = {"ward nurse", "charge nurse", "rapid-response nurse", "physician on call"};

std::vector<std::size_t> sorted(std::vector<std::size_t> v) {
    std::sort(v.begin(), v.end());
    return v;
}
}  // namespace

TEST_CASE("escalation.path_and_worst_case") {
    // ward nurse -15-> charge nurse -10-> rapid-response nurse; nothing beyond.
    // A task created at the ward nurse reaches the rapid-response nurse after
    // 15 + 10 = 25 min at worst; one created at the charge nurse after 10 min.
    const std::vector<EscalationEdge> edges = {{"charge nurse", "rapid-response nurse", 10},
                                               {"ward nurse", "charge nurse", 15}};
    const EscalationGraph g = build_escalation_graph(roles, edges);
    CHECK(boost::num_edges(g.graph()) == 2);
    REQUIRE(g.next(0).has_value());
    CHECK(g.next(0)->to_role == 1);
    CHECK(g.next(0)->timeout_seconds == 15 * 60);
    CHECK_FALSE(g.next(2).has_value());

    const EscalationPath from_ward = escalation_path(g, 0);
    CHECK(from_ward.roles == std::vector<std::uint32_t>{0, 1, 2});
    CHECK(from_ward.worst_case_seconds_to_last_role() == 25 * 60);
    CHECK(describe(g, from_ward) ==
          "ward nurse -(15 min)-> charge nurse -(10 min)-> rapid-response nurse; worst case 25 min to reach "
          "rapid-response nurse");
    CHECK(escalation_path(g, 1).worst_case_seconds_to_last_role() == 10 * 60);
    CHECK(describe(g, escalation_path(g, 3)) == "physician on call (no escalation: a task waits there until taken up)");
}

TEST_CASE("escalation.rejects_cycles") {
    SUBCASE("a three-role cycle names all three edges") {
        const std::vector<EscalationEdge> edges = {{"ward nurse", "charge nurse", 15},
                                                   {"charge nurse", "rapid-response nurse", 10},
                                                   {"rapid-response nurse", "ward nurse", 5},
                                                   {"physician on call", "ward nurse", 5}};
        const auto problems = escalation_problems(roles, edges);
        REQUIRE(problems.size() == 1);
        CHECK(sorted(problems[0].edges) == std::vector<std::size_t>{0, 1, 2});
        CHECK(problems[0].message.find("'ward nurse' -> 'charge nurse' -> 'rapid-response nurse' -> 'ward nurse'") !=
              std::string::npos);
        CHECK_THROWS_WITH_AS(build_escalation_graph(roles, edges), doctest::Contains("escalation cycle"), InputError);
    }
    SUBCASE("a role escalating to itself") {
        const std::vector<EscalationEdge> edges = {{"charge nurse", "charge nurse", 10}};
        const auto problems = escalation_problems(roles, edges);
        REQUIRE(problems.size() == 1);
        CHECK(problems[0].edges == std::vector<std::size_t>{0});
        CHECK(problems[0].message.find("'charge nurse' -> 'charge nurse'") != std::string::npos);
    }
}

TEST_CASE("escalation.rejects_bad_edges") {
    SUBCASE("two ways out of one role") {
        const std::vector<EscalationEdge> edges = {{"ward nurse", "charge nurse", 15},
                                                   {"ward nurse", "rapid-response nurse", 30}};
        const auto problems = escalation_problems(roles, edges);
        REQUIRE(problems.size() == 1);
        CHECK(sorted(problems[0].edges) == std::vector<std::size_t>{0, 1});
        CHECK(problems[0].message.find("role 'ward nurse' has 2 escalation edges") != std::string::npos);
    }
    SUBCASE("unknown role, zero timeout, duplicate: all reported together") {
        const std::vector<EscalationEdge> edges = {{"ward nurse", "night matron", 15},
                                                   {"charge nurse", "rapid-response nurse", 0},
                                                   {"rapid-response nurse", "physician on call", 10},
                                                   {"rapid-response nurse", "physician on call", 12}};
        const auto problems = escalation_problems(roles, edges);
        REQUIRE(problems.size() == 3);
        CHECK(problems[0].message == "edge 'ward nurse' -> 'night matron': unknown role 'night matron'");
        CHECK(problems[1].message ==
              "edge 'charge nurse' -> 'rapid-response nurse': timeout_minutes must be > 0 (got 0)");
        CHECK(problems[2].edges == std::vector<std::size_t>{2, 3});
        try {
            build_escalation_graph(roles, edges);
            FAIL("expected an InputError");
        } catch (const InputError& e) {
            CHECK(e.field == "escalation");
            const std::string what = e.what();
            CHECK(what.find("3 problems:") != std::string::npos);
            CHECK(what.find("night matron") != std::string::npos);
            CHECK(what.find("declared twice") != std::string::npos);
        }
    }
    SUBCASE("a path ending at a role nobody staffs never ends") {
        const std::vector<EscalationEdge> edges = {{"ward nurse", "charge nurse", 15},
                                                   {"charge nurse", "physician on call", 20}};
        const std::vector<bool> staffed = {true, true, true, false};
        const auto problems = escalation_problems(roles, edges, staffed);
        REQUIRE(problems.size() == 1);
        CHECK(problems[0].edges == std::vector<std::size_t>{1});
        CHECK(problems[0].message.find("ends at role 'physician on call', which has nobody on any shift") !=
              std::string::npos);
        // Staffed, the same graph is fine.
        CHECK(escalation_problems(roles, edges, std::vector<bool>(4, true)).empty());
    }
}
