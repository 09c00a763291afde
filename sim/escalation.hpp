#pragma once
// Escalation: a directed graph of roles. A task not taken up within the
// timeout on its role's outgoing edge moves to the role at the other end.
// Each role has at most one outgoing edge (a task must know where to go), the
// graph is acyclic, and every path ends in a role that is staffed on at least
// one shift; a graph breaking any of these is rejected at load, naming the edges.
#include <boost/graph/adjacency_list.hpp>
#include <cstdint>
#include <optional>
#include <span>
#include <string>
#include <vector>

#include "models/time.hpp"

namespace tocsin {

// As declared in a scenario, by role name.
struct EscalationEdge {
    std::string from_role;
    std::string to_role;
    double timeout_minutes = 0.0;  // time allowed at from_role before the task moves on
};

struct EscalationStep {
    std::uint32_t to_role = 0;
    Seconds timeout_seconds = 0;
};

class EscalationGraph {
public:
    struct RoleVertex {
        std::string name;
    };
    struct TimeoutEdge {
        Seconds timeout_seconds = 0;
        double timeout_minutes = 0.0;
        std::size_t declared_index = 0;  // position in the declared edge list
    };
    using Graph = boost::adjacency_list<boost::vecS, boost::vecS, boost::bidirectionalS, RoleVertex, TimeoutEdge>;

    EscalationGraph() = default;
    // Roles only, no edges: tasks wait where they were created.
    explicit EscalationGraph(std::vector<std::string> role_names);

    const Graph& graph() const { return graph_; }
    std::size_t role_count() const { return next_.size(); }
    const std::string& role_name(std::uint32_t role) const { return graph_[role].name; }
    // Where a task waiting at `role` goes, and after how long; nothing at the end of a path.
    const std::optional<EscalationStep>& next(std::uint32_t role) const { return next_[role]; }

private:
    friend EscalationGraph build_escalation_graph(std::span<const std::string>, std::span<const EscalationEdge>,
                                                  const std::vector<bool>&);
    Graph graph_;
    std::vector<std::optional<EscalationStep>> next_;  // cached from graph_ for the event loop
};

// One thing wrong with a declared graph; `edges` index the input edge list so a
// loader can point at the lines that declared them.
struct EscalationProblem {
    std::vector<std::size_t> edges;
    std::string message;
};

// Every problem found (empty = valid): unknown role, timeout not > 0, duplicate
// edge, a role with more than one outgoing edge, a cycle (each named by its
// edges, e.g. "ward nurse -> charge nurse -> ward nurse"), and a path whose last
// role has nobody on any shift so a task reaching it could never be taken up.
// `role_ever_staffed` may be empty (then that last check is skipped).
std::vector<EscalationProblem> escalation_problems(std::span<const std::string> role_names,
                                                   std::span<const EscalationEdge> edges,
                                                   const std::vector<bool>& role_ever_staffed = {});

// Builds the graph or throws InputError (field "escalation") listing every problem.
EscalationGraph build_escalation_graph(std::span<const std::string> role_names, std::span<const EscalationEdge> edges,
                                       const std::vector<bool>& role_ever_staffed = {});

// The path a task created at `first_role` follows when nobody takes it up.
struct EscalationPath {
    std::vector<std::uint32_t> roles;          // first_role first
    std::vector<Seconds> timeout_seconds;      // one per edge (roles.size() - 1)
    // Longest time from creation until the task reaches the last role: the sum
    // of the timeouts (reached only if nobody on the way takes it up).
    Seconds worst_case_seconds_to_last_role() const;
};

EscalationPath escalation_path(const EscalationGraph& graph, std::uint32_t first_role);
// "ward nurse -(15 min)-> charge nurse -(10 min)-> rapid-response nurse; worst case 25 min to reach rapid-response nurse"
std::string describe(const EscalationGraph& graph, const EscalationPath& path);

}  // namespace tocsin
