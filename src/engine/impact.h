#pragma once
// Impact (DESIGN §9): which runs `fail NODE` turns from ok or degraded to
// fail, or from ok to degraded, per model.
//
// A node that never lands makes every node downstream of it never land
// (§4: an input that is never makes its consumer never, whatever its
// trigger), so the features it takes down are exactly the features in its
// downstream cone, found on the lineage graph (Boost.Graph). A run that was
// ok or degraded then fails when one of its required features is in the
// cone; an ok run whose only features in the cone are optional degrades.
// Runs failing already are not counted. No profile is rebuilt.
//
// Pure computation over a loaded plan and its evaluation; no I/O.

#include <vector>

#include "engine/check.h"
#include "plan/plan.h"

namespace readyby {

struct ModelImpact {
  int model = -1;
  int fail = 0;     // runs turned from ok or degraded to fail
  int degrade = 0;  // runs turned from ok to degraded
};

struct NodeImpact {
  int node = -1;
  int failed_runs = 0;
  int degraded_runs = 0;
  std::vector<ModelImpact> models;  // models with a run that changes, in plan order
  /// Its failure fails runs of two or more models.
  bool single_point_of_failure() const;
};

/// The impact of every node of `plan` over the window of `base` (from
/// evaluate(plan, ...), runs stored), ranked: most failed runs first, then
/// most degraded runs, then plan order.
std::vector<NodeImpact> impact(const Plan& plan, const Evaluation& base);

}  // namespace readyby
