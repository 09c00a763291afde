#include "sim/escalation.hpp"

#include <boost/graph/depth_first_search.hpp>
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <map>

#include "models/errors.hpp"

namespace tocsin {
namespace {

std::string minutes_text(double m) {
    char buf[48];
    std::snprintf(buf, sizeof buf, "%.6g", m);
    return buf;
}

std::string edge_text(const EscalationEdge& e) { return "'" + e.from_role + "' -> '" + e.to_role + "'"; }

using Graph = EscalationGraph::Graph;
using Vertex = boost::graph_traits<Graph>::vertex_descriptor;
using Edge = boost::graph_traits<Graph>::edge_descriptor;

// Records the depth-first tree so that each back edge u -> v can be turned
// into its cycle v -> ... -> u -> v.
struct CycleFinder : boost::default_dfs_visitor {
    std::vector<std::optional<Edge>>* tree_edge_into;
    std::vector<Edge>* back_edges;
    void tree_edge(Edge e, const Graph& g) const { (*tree_edge_into)[boost::target(e, g)] = e; }
    void back_edge(Edge e, const Graph&) const { back_edges->push_back(e); }
};

Graph make_graph(std::span<const std::string> role_names) {
    Graph g(role_names.size());
    for (std::size_t r = 0; r < role_names.size(); ++r) g[r].name = role_names[r];
    return g;
}

// Adds the edges that name known roles and have a usable timeout; reports the others.
Graph graph_of_valid_edges(std::span<const std::string> role_names, std::span<const EscalationEdge> edges,
                           std::vector<EscalationProblem>& problems) {
    Graph g = make_graph(role_names);
    std::map<std::string, std::size_t> index;
    for (std::size_t r = 0; r < role_names.size(); ++r) index.emplace(role_names[r], r);
    std::map<std::pair<std::size_t, std::size_t>, std::size_t> seen;
    for (std::size_t i = 0; i < edges.size(); ++i) {
        const EscalationEdge& e = edges[i];
        auto from = index.find(e.from_role);
        auto to = index.find(e.to_role);
        bool ok = true;
        for (const auto& [it, name] : {std::pair{from, e.from_role}, std::pair{to, e.to_role}})
            if (it == index.end()) {
                problems.push_back({{i}, "edge " + edge_text(e) + ": unknown role '" + name + "'"});
                ok = false;
            }
        if (!std::isfinite(e.timeout_minutes) || e.timeout_minutes <= 0.0) {
            problems.push_back({{i}, "edge " + edge_text(e) + ": timeout_minutes must be > 0 (got " +
                                         minutes_text(e.timeout_minutes) + ")"});
            ok = false;
        }
        if (!ok) continue;
        auto [dup, fresh] = seen.emplace(std::pair{from->second, to->second}, i);
        if (!fresh) {
            problems.push_back({{dup->second, i}, "edge " + edge_text(e) + " is declared twice"});
            continue;
        }
        const Seconds timeout = static_cast<Seconds>(std::llround(e.timeout_minutes * 60.0));
        boost::add_edge(from->second, to->second, EscalationGraph::TimeoutEdge{timeout, e.timeout_minutes, i}, g);
    }
    return g;
}

}  // namespace

EscalationGraph::EscalationGraph(std::vector<std::string> role_names)
    : graph_(make_graph(role_names)), next_(role_names.size()) {}

std::vector<EscalationProblem> escalation_problems(std::span<const std::string> role_names,
                                                   std::span<const EscalationEdge> edges,
                                                   const std::vector<bool>& role_ever_staffed) {
    std::vector<EscalationProblem> problems;
    const Graph g = graph_of_valid_edges(role_names, edges, problems);

    for (Vertex v = 0; v < boost::num_vertices(g); ++v) {
        if (boost::out_degree(v, g) <= 1) continue;
        EscalationProblem p;
        std::string list;
        for (auto [it, end] = boost::out_edges(v, g); it != end; ++it) {
            p.edges.push_back(g[*it].declared_index);
            list += (list.empty() ? "" : ", ") + edge_text(edges[g[*it].declared_index]);
        }
        p.message = "role '" + g[v].name + "' has " + std::to_string(boost::out_degree(v, g)) +
                    " escalation edges (" + list + "); a task must know where to go, so keep one";
        problems.push_back(std::move(p));
    }

    std::vector<std::optional<Edge>> tree_edge_into(boost::num_vertices(g));
    std::vector<Edge> back_edges;
    boost::depth_first_search(g, boost::visitor(CycleFinder{{}, &tree_edge_into, &back_edges}));
    for (const Edge& back : back_edges) {
        // Walk the tree from the back edge's source up to its target.
        std::vector<Edge> cycle{back};
        for (Vertex v = boost::source(back, g); v != boost::target(back, g);) {
            const Edge e = *tree_edge_into[v];
            cycle.push_back(e);
            v = boost::source(e, g);
        }
        std::reverse(cycle.begin(), cycle.end());  // now starts at the back edge's target
        EscalationProblem p;
        std::string path = "'" + g[boost::source(cycle.front(), g)].name + "'";
        for (const Edge& e : cycle) {
            p.edges.push_back(g[e].declared_index);
            path += " -> '" + g[boost::target(e, g)].name + "'";
        }
        p.message = "escalation cycle " + path + ": a task on it would never reach a last role; remove edge " +
                    edge_text(edges[g[back].declared_index]) + " or another edge of the cycle";
        problems.push_back(std::move(p));
    }

    if (!role_ever_staffed.empty()) {
        for (Vertex v = 0; v < boost::num_vertices(g); ++v) {
            if (boost::out_degree(v, g) != 0 || boost::in_degree(v, g) == 0 || role_ever_staffed[v]) continue;
            EscalationProblem p;
            std::string list;
            for (auto [it, end] = boost::in_edges(v, g); it != end; ++it) {
                p.edges.push_back(g[*it].declared_index);
                list += (list.empty() ? "" : ", ") + edge_text(edges[g[*it].declared_index]);
            }
            p.message = "escalation path ends at role '" + g[v].name +
                        "', which has nobody on any shift, so a task escalated there (by " + list +
                        ") could never be taken up; staff the role or add an edge out of it";
            problems.push_back(std::move(p));
        }
    }
    return problems;
}

EscalationGraph build_escalation_graph(std::span<const std::string> role_names, std::span<const EscalationEdge> edges,
                                       const std::vector<bool>& role_ever_staffed) {
    const std::vector<EscalationProblem> problems = escalation_problems(role_names, edges, role_ever_staffed);
    if (!problems.empty()) {
        std::string message = problems.size() == 1 ? problems[0].message
                                                    : std::to_string(problems.size()) + " problems:";
        if (problems.size() > 1)
            for (const EscalationProblem& p : problems) message += "\n  - " + p.message;
        throw InputError("", 0, 0, "escalation", message);
    }
    std::vector<EscalationProblem> ignored;
    EscalationGraph out;
    out.graph_ = graph_of_valid_edges(role_names, edges, ignored);
    out.next_.assign(role_names.size(), std::nullopt);
    for (auto [it, end] = boost::edges(out.graph_); it != end; ++it)
        out.next_[boost::source(*it, out.graph_)] =
            EscalationStep{static_cast<std::uint32_t>(boost::target(*it, out.graph_)), out.graph_[*it].timeout_seconds};
    return out;
}

Seconds EscalationPath::worst_case_seconds_to_last_role() const {
    Seconds total = 0;
    for (Seconds s : timeout_seconds) total += s;
    return total;
}

EscalationPath escalation_path(const EscalationGraph& graph, std::uint32_t first_role) {
    EscalationPath path;
    path.roles.push_back(first_role);
    // A validated graph is acyclic, so this ends within role_count() steps.
    for (std::uint32_t r = first_role; graph.next(r) && path.roles.size() <= graph.role_count();) {
        path.timeout_seconds.push_back(graph.next(r)->timeout_seconds);
        r = graph.next(r)->to_role;
        path.roles.push_back(r);
    }
    return path;
}

std::string describe(const EscalationGraph& graph, const EscalationPath& path) {
    std::string out = graph.role_name(path.roles.front());
    for (std::size_t i = 0; i + 1 < path.roles.size(); ++i)
        out += " -(" + minutes_text(static_cast<double>(path.timeout_seconds[i]) / 60.0) + " min)-> " +
               graph.role_name(path.roles[i + 1]);
    if (path.roles.size() == 1) return out + " (no escalation: a task waits there until taken up)";
    return out + "; worst case " +
           minutes_text(static_cast<double>(path.worst_case_seconds_to_last_role()) / 60.0) + " min to reach " +
           graph.role_name(path.roles.back());
}

}  // namespace tocsin
