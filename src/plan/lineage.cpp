#include "plan/lineage.h"

// GCC 12 reports -Wmaybe-uninitialized inside Boost.Graph's edge iterator
// (boost::optional storage it fills before use); the warning is in the
// library's headers, not in this file, so it is silenced for them only.
#if defined(__GNUC__) && !defined(__clang__)
#pragma GCC diagnostic push
#pragma GCC diagnostic ignored "-Wmaybe-uninitialized"
#endif
#include <boost/graph/adjacency_list.hpp>
#include <boost/graph/breadth_first_search.hpp>
#include <boost/pending/queue.hpp>
#include <boost/graph/depth_first_search.hpp>
#include <boost/graph/topological_sort.hpp>
#if defined(__GNUC__) && !defined(__clang__)
#pragma GCC diagnostic pop
#endif

#include <algorithm>
#include <functional>
#include <queue>
#include <set>

#include "plan/plan.h"

namespace readyby {
namespace {

using Graph = boost::adjacency_list<boost::vecS, boost::vecS, boost::directedS>;
using Vertex = boost::graph_traits<Graph>::vertex_descriptor;
using Edge = boost::graph_traits<Graph>::edge_descriptor;

Graph build_graph(const std::vector<std::vector<int>>& inputs) {
  Graph g(inputs.size());
  for (size_t j = 0; j < inputs.size(); ++j) {
    for (int i : inputs[j]) boost::add_edge(static_cast<Vertex>(i), static_cast<Vertex>(j), g);
  }
  return g;
}

// Records tree-edge parents and every back edge of a depth-first search.
struct CycleVisitor : boost::default_dfs_visitor {
  std::vector<Vertex>* parent;
  std::vector<std::pair<Vertex, Vertex>>* back_edges;
  void tree_edge(Edge e, const Graph& g) const { (*parent)[boost::target(e, g)] = boost::source(e, g); }
  void back_edge(Edge e, const Graph& g) const { back_edges->emplace_back(boost::source(e, g), boost::target(e, g)); }
};

}  // namespace

Lineage::Lineage(std::vector<std::vector<int>> inputs) : inputs_(std::move(inputs)), consumers_(inputs_.size()) {
  for (size_t j = 0; j < inputs_.size(); ++j) {
    for (int i : inputs_[j]) consumers_[static_cast<size_t>(i)].push_back(static_cast<int>(j));
  }
}

Lineage Lineage::of(const Plan& plan) {
  std::vector<std::vector<int>> inputs;
  inputs.reserve(plan.nodes.size());
  for (const Node& n : plan.nodes) inputs.push_back(n.inputs);
  return Lineage(std::move(inputs));
}

std::vector<int> Lineage::topological_order() const {
  // Kahn's algorithm with a min-heap gives the deterministic order; Boost's
  // topological_sort (reverse DFS finish order) decides acyclicity.
  Graph g = build_graph(inputs_);
  std::vector<Vertex> reverse_order;
  try {
    boost::topological_sort(g, std::back_inserter(reverse_order));
  } catch (const boost::not_a_dag&) {
    return {};
  }
  std::vector<int> pending(inputs_.size());
  std::priority_queue<int, std::vector<int>, std::greater<int>> ready;
  for (size_t j = 0; j < inputs_.size(); ++j) {
    // Distinct inputs only: a node may list the same input twice.
    std::set<int> distinct(inputs_[j].begin(), inputs_[j].end());
    pending[j] = static_cast<int>(distinct.size());
    if (pending[j] == 0) ready.push(static_cast<int>(j));
  }
  std::vector<std::set<int>> distinct_consumers(inputs_.size());
  for (size_t j = 0; j < inputs_.size(); ++j) {
    for (int c : consumers_[j]) distinct_consumers[j].insert(c);
  }
  std::vector<int> order;
  order.reserve(inputs_.size());
  while (!ready.empty()) {
    int n = ready.top();
    ready.pop();
    order.push_back(n);
    for (int c : distinct_consumers[static_cast<size_t>(n)]) {
      if (--pending[static_cast<size_t>(c)] == 0) ready.push(c);
    }
  }
  return order;
}

std::vector<std::vector<int>> Lineage::cycles() const {
  Graph g = build_graph(inputs_);
  std::vector<Vertex> parent(inputs_.size());
  for (size_t i = 0; i < parent.size(); ++i) parent[i] = i;
  std::vector<std::pair<Vertex, Vertex>> back_edges;
  CycleVisitor visitor;
  visitor.parent = &parent;
  visitor.back_edges = &back_edges;
  std::vector<boost::default_color_type> colors(inputs_.size());
  boost::depth_first_search(
      g, boost::visitor(visitor).color_map(boost::make_iterator_property_map(colors.begin(),
                                                                             boost::get(boost::vertex_index, g))));
  std::vector<std::vector<int>> out;
  std::set<std::vector<int>> seen;
  for (auto [from, to] : back_edges) {
    // Back edge from -> to: `to` is an ancestor of `from` on the DFS tree, so
    // to -> ... -> from -> to is a cycle.
    std::vector<int> cycle;
    for (Vertex v = from;; v = parent[v]) {
      cycle.push_back(static_cast<int>(v));
      if (v == to || parent[v] == v) break;
    }
    std::reverse(cycle.begin(), cycle.end());
    auto smallest = std::min_element(cycle.begin(), cycle.end());
    std::rotate(cycle.begin(), smallest, cycle.end());
    if (seen.insert(cycle).second) out.push_back(cycle);
  }
  return out;
}

std::vector<int> Lineage::upstream(int node) const {
  std::vector<bool> mask = upstream_mask({node});
  std::vector<int> out;
  for (size_t i = 0; i < mask.size(); ++i) {
    if (mask[i] && static_cast<int>(i) != node) out.push_back(static_cast<int>(i));
  }
  return out;
}

std::vector<bool> Lineage::upstream_mask(const std::vector<int>& targets) const {
  std::vector<bool> mask(inputs_.size(), false);
  std::vector<int> stack(targets.begin(), targets.end());
  for (int t : targets) mask[static_cast<size_t>(t)] = true;
  while (!stack.empty()) {
    int n = stack.back();
    stack.pop_back();
    for (int i : inputs_[static_cast<size_t>(n)]) {
      if (!mask[static_cast<size_t>(i)]) {
        mask[static_cast<size_t>(i)] = true;
        stack.push_back(i);
      }
    }
  }
  return mask;
}

namespace {

// Records every vertex a breadth-first visit discovers.
struct ConeVisitor : boost::default_bfs_visitor {
  std::vector<int>* found;
  void discover_vertex(Vertex v, const Graph&) const { found->push_back(static_cast<int>(v)); }
};

}  // namespace

struct DownstreamCones::Impl {
  Graph graph;
  std::vector<int> rank;
  std::vector<boost::default_color_type> colours;  // all white between queries
};

DownstreamCones::DownstreamCones(const Lineage& lineage) : impl_(std::make_unique<Impl>()) {
  std::vector<std::vector<int>> inputs(lineage.size());
  for (size_t j = 0; j < lineage.size(); ++j) inputs[j] = lineage.inputs(static_cast<int>(j));
  impl_->graph = build_graph(inputs);
  impl_->rank.assign(lineage.size(), 0);
  std::vector<int> order = lineage.topological_order();
  for (size_t i = 0; i < order.size(); ++i) impl_->rank[static_cast<size_t>(order[i])] = static_cast<int>(i);
  impl_->colours.assign(lineage.size(), boost::white_color);
}

DownstreamCones::~DownstreamCones() = default;
DownstreamCones::DownstreamCones(DownstreamCones&&) noexcept = default;
DownstreamCones& DownstreamCones::operator=(DownstreamCones&&) noexcept = default;

int DownstreamCones::rank(int node) const { return impl_->rank[static_cast<size_t>(node)]; }

std::vector<int> DownstreamCones::of(const std::vector<int>& seeds) const {
  Impl& m = *impl_;
  auto colour_map = boost::make_iterator_property_map(m.colours.begin(), boost::get(boost::vertex_index, m.graph));
  std::vector<int> found;
  ConeVisitor visitor;
  visitor.found = &found;
  boost::queue<Vertex> queue;
  for (int s : seeds) {
    if (m.colours[static_cast<size_t>(s)] != boost::white_color) continue;
    boost::breadth_first_visit(m.graph, static_cast<Vertex>(s), queue, visitor, colour_map);
  }
  for (int n : found) m.colours[static_cast<size_t>(n)] = boost::white_color;
  std::sort(found.begin(), found.end(), [&](int a, int b) { return m.rank[static_cast<size_t>(a)] < m.rank[static_cast<size_t>(b)]; });
  return found;
}

}  // namespace readyby
