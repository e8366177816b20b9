#pragma once
// The report page's one door to the advice facts: failure and degradation
// patterns, the run each pattern is explained by, its cause, its verified
// fixes, and each node's margin. The page writers read only these structs,
// so where the facts come from is a matter for advice_adapter.cpp alone.
//
// Today the facts come from:
// - patterns, their worst run and its blame (the chain with each step's
//   landing, latest on-time landing and the step at fault):
//   engine/patterns.h (PatternCollector) and engine/blame.h;
// - fixes: engine/fixes.h (FixFinder): each fix has been re-evaluated over
//   the window (every run of its pattern clears; the other runs it changes
//   are listed); the sentences come from report/advice_text.h;
// - margins: engine/margins.h (DESIGN §9): how much later every landing of
//   the node could happen without an ok run degrading or failing, whole
//   minutes, with the run that binds it; from its exact backward pass (the
//   per-node re-evaluation checks of `readyby margins` are left out: they
//   cost a cone re-evaluation per node).
// Pure computation over an Evaluation: no I/O.

#include <optional>
#include <string>
#include <vector>

#include "engine/check.h"
#include "plan/plan.h"

namespace readyby::html {

/// One step of an explained chain, on the time axis of its run.
struct TimelineStep {
  int node = -1;
  std::optional<Instant> start;        // when the step starts: scheduled delivery, job start; nullopt: never
  std::optional<Instant> landed;       // E_node(w); nullopt: never
  std::optional<Instant> latest;       // latest landing that keeps the run on time; nullopt: none possible
  std::optional<Instant> stale_start;  // a fixed start that came before its input landed (read old data)
  bool at_fault = false;               // the cause: the step nearest the feature late on its own account
};

/// One feature of one run, its chain laid out for a timeline.
struct ExplainedRun {
  size_t run = 0;                      // index into Evaluation::runs
  int feature = -1;                    // node index of the feature explained
  Instant needs_data_through;
  Instant deadline;                    // the run's instant
  std::optional<int64_t> slack_seconds;  // nullopt: never
  FeatureStatus status = FeatureStatus::ok;
  std::vector<TimelineStep> steps;     // source first
};

/// A fix, re-evaluated over the window before it is offered.
struct FixFacts {
  std::string text;                    // what it changes, with the edit ("delay bed_board=-PT50M")
  std::string effect;                  // the re-check: pattern runs ok, other runs that change
  bool breaks_others = false;          // some other run gets worse
};

struct PatternFacts {
  int model = -1;
  RunStatus status = RunStatus::fail;  // fail or degraded
  std::string description;             // "fails every Monday (4 of 4 Monday runs)"
  std::vector<size_t> runs;            // indices into Evaluation::runs
  std::vector<int> features;           // the features not fresh (node indices)
  ExplainedRun worst;                  // the pattern's worst run, its blamed feature
  int fault_node = -1;                 // the step at fault; -1 when none
  std::string cause;                   // why, in words; empty when none
  std::vector<FixFacts> fixes;         // verified fixes, best first; empty: see no_fix
  std::string no_fix;                  // why no fix is offered (when fixes is empty)
};

struct NodeMargin {
  std::optional<int64_t> margin_seconds;  // nullopt: unbounded (no ok run depends on the node)
  int binding_model = -1;                 // the run that binds it
  std::optional<Instant> binding_at;
};

struct AdviceFacts {
  std::vector<PatternFacts> patterns;  // models in plan order; failing before degraded, then first run
  std::vector<NodeMargin> margins;     // by node index (empty when not asked for)
};

/// Patterns of every model in `ev` (runs must be filled, not lazy, and
/// evaluated without recorded deliveries); with `with_margins`, every node's
/// margin too.
AdviceFacts gather_advice(const Plan& plan, const Evaluation& ev, bool with_margins);

/// The explanation of feature `feature_pos` (position in run.features) of
/// run `run_index`, with its cause step marked.
ExplainedRun explain_for_timeline(const Plan& plan, const Evaluation& ev, size_t run_index, size_t feature_pos);

}  // namespace readyby::html
