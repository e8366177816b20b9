#pragma once
// The report page's one door to the advice facts: failure patterns, the run
// each pattern is explained by, the fix under it, and each node's margin.
// The page writers read only these structs, so switching the source of the
// facts (to the engine's patterns, verified fixes and margins of DESIGN §9)
// is a change inside advice_adapter.cpp alone.
//
// Today the facts come from:
// - failing patterns, their worst run, critical chain and fix:
//   report/failure_patterns.h (failure_patterns, explain_chain, fix_for). The
//   fix is the proposed edit; it is not yet re-evaluated, so `fix_verified`
//   is false and `fix_changes` empty;
// - degraded runs: grouped here per model by the optional features they miss
//   and the source their chain starts at (failure_patterns groups failing
//   runs only), each group explained by its worst run;
// - margins: the smallest headroom (latest on-time landing minus landing,
//   explain_chain) of the node over the chains that decide ok runs, with the
//   run that binds it. DESIGN §9's margin re-evaluates delays of the node; on
//   a chain that decides a run the two agree, and a node on no deciding chain
//   has no margin here (`margin_seconds` nullopt).
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
  std::optional<Instant> latest;       // latest landing that keeps the run on time; nullopt: unknown
  std::optional<Instant> stale_start;  // a fixed start that came before its input landed (read old data)
  bool at_fault = false;               // the step the fix changes
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

struct PatternFacts {
  int model = -1;
  RunStatus status = RunStatus::fail;  // fail or degraded
  std::string description;             // "fails every Monday (4 of 4 Monday runs)"
  std::vector<size_t> runs;            // indices into Evaluation::runs
  std::vector<int> features;           // the features not fresh (node indices)
  ExplainedRun worst;                  // the pattern's worst run, its worst feature
  int fault_node = -1;                 // the step to change; -1 when none can be named
  std::string fix;                     // the fix in words; empty when none
  bool fix_verified = false;           // true once re-evaluated with the edit applied (DESIGN §9)
  std::vector<std::string> fix_changes;  // other runs whose status the fix changes (verified fixes only)
  std::optional<int64_t> start_later_seconds;  // or start the pattern's runs this much later
  std::vector<int> stale_jobs;         // fixed-time steps that read old data
};

struct NodeMargin {
  std::optional<int64_t> margin_seconds;  // nullopt: on no chain deciding an ok run
  int binding_model = -1;                 // the run that binds it
  std::optional<Instant> binding_at;
};

struct AdviceFacts {
  std::vector<PatternFacts> patterns;  // models in plan order; failing patterns first, then degraded
  std::vector<NodeMargin> margins;     // by node index (empty when not asked for)
};

/// Patterns of every model in `ev` (runs must be filled, not lazy). With
/// `margins_for` (a mask over plan.nodes), margins of those nodes too.
AdviceFacts gather_advice(const Plan& plan, const Evaluation& ev, const std::vector<bool>* margins_for);

/// The explanation of feature `feature_pos` (position in run.features) of
/// run `run_index`, with the step at fault marked when a fix names one.
ExplainedRun explain_for_timeline(const Plan& plan, const Evaluation& ev, size_t run_index, size_t feature_pos,
                                  int fault_node);

}  // namespace readyby::html
