#pragma once
// The lineage graph: which node feeds which, on Boost.Graph.
//
// Vertices are node indices 0..n-1; an edge i -> j means "i is an input of j"
// (data flows from i to j). Built from each node's input list.

#include <cstddef>
#include <memory>
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

/// Downstream cones of an acyclic lineage, on Boost.Graph: prepared once,
/// then each query costs about the size of its cone. Queries reuse internal
/// scratch space, so one object must not be queried from two threads at once.
class DownstreamCones {
 public:
  /// `lineage` must be acyclic; it need not outlive this object.
  explicit DownstreamCones(const Lineage& lineage);
  ~DownstreamCones();
  DownstreamCones(DownstreamCones&&) noexcept;
  DownstreamCones& operator=(DownstreamCones&&) noexcept;

  /// Every node reachable from a node of `seeds` along the data flow, seeds
  /// included, each once, in topological order (each node after all of its
  /// inputs that are listed; ties in the order of Lineage::topological_order).
  std::vector<int> of(const std::vector<int>& seeds) const;
  /// Position of `node` in Lineage::topological_order.
  int rank(int node) const;

 private:
  struct Impl;
  std::unique_ptr<Impl> impl_;
};

}  // namespace readyby
