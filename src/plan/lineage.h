#pragma once
// The lineage graph: which node feeds which, on Boost.Graph.
//
// Vertices are node indices 0..n-1; an edge i -> j means "i is an input of j"
// (data flows from i to j). Built from each node's input list.

#include <cstddef>
#include <vector>

namespace readyby {

struct Plan;

class Lineage {
 public:
  /// `inputs[j]` lists the inputs of node j (indices < inputs.size()).
  explicit Lineage(std::vector<std::vector<int>> inputs);
  /// The lineage of a loaded plan.
  static Lineage of(const Plan& plan);

  size_t size() const { return inputs_.size(); }
  const std::vector<int>& inputs(int node) const { return inputs_[static_cast<size_t>(node)]; }
  const std::vector<int>& consumers(int node) const { return consumers_[static_cast<size_t>(node)]; }

  /// Every node once, each after all of its inputs; empty when the graph has
  /// a cycle. Ties are broken by index, so the order is deterministic.
  std::vector<int> topological_order() const;

  /// The cycles found by a depth-first search, each as the list of nodes in
  /// data-flow order starting at its smallest index (the first node is not
  /// repeated at the end). Each back edge gives one cycle; empty when acyclic.
  std::vector<std::vector<int>> cycles() const;

  /// Every node upstream of `node` (its inputs, their inputs, ...), excluding
  /// `node` itself, in ascending index order.
  std::vector<int> upstream(int node) const;
  /// Nodes from which some node in `targets` is reachable, targets included,
  /// as a mask of size size().
  std::vector<bool> upstream_mask(const std::vector<int>& targets) const;

 private:
  std::vector<std::vector<int>> inputs_;
  std::vector<std::vector<int>> consumers_;
};

}  // namespace readyby
