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
// exactly when E_n(w) + D <= L_n(w) for all those w. The candidate margin is
// then min over w of floor((L_n(w) - E_n(w)) / 60 s). With `confirm`, each
// candidate M is checked by re-evaluating the node's downstream cone with
// `delay n=M` (no ok run changes) and `delay n=M+1m` (the binding run
// degrades or fails); should a check disagree, the margin is found by
// bisection on such re-evaluations instead, and `confirmed` says so.
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
  /// Seconds by which the node lands before it must for the binding run
  /// (L_n(w) - E_n(w), >= seconds); 0 when unbounded.
  int64_t room_seconds = 0;
  /// How the margin was established: by the backward pass alone (confirm
  /// off), confirmed by two re-evaluations, or found by bisection.
  enum class Method { backward_pass, confirmed, bisection } method = Method::backward_pass;
  int reevaluations = 0;  // cone re-evaluations spent on this node
};

struct MarginOptions {
  bool confirm = true;  // re-evaluate each bounded margin at M and M + 1 minute
};

/// The margin of every node of `plan` over the window of `base`, which must
/// come from evaluate(plan, ...) without recorded deliveries (runs stored).
/// Indexed like plan.nodes.
std::vector<Margin> margins(const Plan& plan, const Evaluation& base, MarginOptions options = {});

}  // namespace readyby
