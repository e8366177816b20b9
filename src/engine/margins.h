#pragma once
// Margins (DESIGN §9): how much later every landing of a node could happen
// without any run that is ok today becoming degraded or failing.
//
// The margin of node n over a window is the largest whole number of minutes
// D such that `delay n=D` turns no run that is `ok` into `degraded` or
// `fail`. Runs that are degraded or failing already do not bind it.
//
// How it is found. E is non-decreasing in every delay, and each step of the
// §4 recursion is "at most" friendly: a job triggered by its inputs is on
// time for a limit L exactly when each input lands by L - run_time; a
// cron-triggered one exactly when each input lands by the latest trigger
// occurrence o with o + run_time <= L. So one backward pass over the lineage
// (as in the critical path method's backward pass) gives, for every node and
// every w that some ok run asks a downstream feature about, the latest
// instant L_n(w) by which n must land; a delay D keeps every ok run ok
// exactly when E_n(w) + D <= L_n(w) for all those w. The margin is then
// min over w of floor((L_n(w) - E_n(w)) / 60 s): exact, in one pass for all
// nodes, instead of a bisection of re-evaluations per node.
//
// Each margin M is then checked by re-evaluation (MarginOptions::check):
// `binding_run` re-evaluates the binding run alone with `delay n=M+1m` (the
// §4 recursion at its instants over the node's downstream cone) and expects
// it to degrade or fail; `full` re-evaluates the node's whole downstream cone
// with `delay n=M` (no ok run may change) and `delay n=M+1m` (some ok run
// must). Should a check disagree, the margin is found by bisection on cone
// re-evaluations instead and `method` says so. The tests hold the backward
// pass to the full check on random plans.
//
// Pure computation over a loaded plan and its evaluation; no I/O.

#include <optional>
#include <vector>

#include "engine/check.h"
#include "plan/plan.h"

namespace readyby {

struct Margin {
  int node = -1;
  /// The margin in seconds (a multiple of 60, >= 0). nullopt: unbounded — no
  /// ok run has a feature at or downstream of the node.
  std::optional<int64_t> seconds;
  /// The binding run: of the ok runs that a delay of the margin plus one
  /// minute degrades or fails, the one with the least room (the smallest
  /// L_n(w) - E_n(w)), the earliest in run order on ties. Model -1 when
  /// unbounded.
  int binding_model = -1;
  Instant binding_at;
  size_t binding_run = 0;  // its index in the evaluation's runs (when bounded)
  /// Seconds by which the node lands before it must for the binding run
  /// (L_n(w) - E_n(w), >= seconds); 0 when unbounded.
  int64_t room_seconds = 0;
  /// How the margin was established: the backward pass alone (no check), the
  /// backward pass checked on its binding run or on the whole cone, or
  /// bisection on cone re-evaluations (a check disagreed).
  enum class Method { backward_pass, binding_run_checked, cone_checked, bisection } method = Method::backward_pass;
  int reevaluations = 0;  // cone re-evaluations spent on this node
};

struct MarginOptions {
  enum class Check { none, binding_run, full };
  Check check = Check::binding_run;
};

/// The margin of every node of `plan` over the window of `base`, which must
/// come from evaluate(plan, ...) without recorded deliveries (runs stored).
/// Indexed like plan.nodes.
std::vector<Margin> margins(const Plan& plan, const Evaluation& base, MarginOptions options = {});

}  // namespace readyby
