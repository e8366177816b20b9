#pragma once
// Failure patterns: failing runs grouped the way a person fixes them.
//
// Runs of one model that fail for the same reason (the same failing
// features, each late through the same source) form a group; each group is
// then described by when it happens — every run, every <weekday>, on a date
// with a daylight-saving change, or on listed dates — and by its fix: how
// much earlier the critical delivery must land (the largest need over the
// group's runs), or how much later the run must start to pass. Pure
// computation over an Evaluation; the text and intake reports render it.

#include <optional>
#include <string>
#include <vector>

#include "engine/check.h"
#include "plan/plan.h"

namespace readyby {

/// One step of a chain, explained against one run.
struct ChainStep {
  int node = -1;
  std::optional<Instant> ready;     // E_node(w); nullopt: never
  std::optional<Instant> latest;    // latest landing that keeps the feature on time; nullopt: unknown
  /// For a cron-triggered node: its last start before its inputs were complete
  /// (that start read stale data), when that start was at or after w.
  std::optional<Instant> stale_start;
};

/// The chain of `feature` for a run at `run_at`, each step with its landing
/// time and the latest landing that would still let the feature be ready by
/// `run_at` (a backward pass: run times subtract, cron triggers round down to
/// their previous occurrence).
std::vector<ChainStep> explain_chain(const Plan& plan, const Evaluation& ev, const FeatureResult& feature,
                                     Instant run_at);

/// Smallest delay d >= 0 (minute resolution, at most kLaterStartSearch) such
/// that a run at at + d passes every non-optional feature; nullopt if none.
std::optional<int64_t> later_start_needed(const Plan& plan, const Evaluation& ev, const RunResult& run);

/// What would make one failing feature of one run on time: the step to
/// change (a delivery that must land earlier, or a fixed start that must
/// move) and by how much, in words for people.
struct Fix {
  int node = -1;                // the step to change
  bool move_start = false;      // true: a cron-triggered node's start must move; false: `node` must land earlier
  int64_t seconds = 0;          // how much earlier it must land / start (0 when only a later start helps)
  std::string text;             // e.g. "'bed_board' lands at 07:20; it would have to land by 06:30 (50m earlier)"
};

/// The fix for `feature` of `run` (status late; nullopt for never or ok).
std::optional<Fix> fix_for(const Plan& plan, const Evaluation& ev, const RunResult& run, const FeatureResult& feature);

struct FailurePattern {
  int model = -1;
  enum class When { every_run, weekday, span, daylight_saving, dates } when = When::dates;
  int weekday = -1;                  // for When::weekday
  std::vector<size_t> runs;          // indices into Evaluation::runs
  std::string description;           // "fails every Monday", "fails on 2026-03-08, a daylight-saving change ..."
  std::vector<int> failing_features; // node indices, the non-optional features not ok
  std::vector<int> critical_chain;   // chain of the worst failing feature in the worst run
  int critical_source = -1;          // first node of that chain
  std::optional<int64_t> land_earlier_seconds;  // how much earlier the critical delivery must land
  std::optional<Fix> fix;            // for the worst run of the pattern
  size_t worst_run = 0;              // index into Evaluation::runs
  std::optional<int64_t> start_later_seconds;   // or how much later the run must start (max over the runs)
  std::vector<int> stale_jobs;       // cron-triggered nodes on the chain that started before their data landed
};

/// The failing runs of every model, grouped into patterns; models in plan
/// order, patterns in order of first occurrence.
std::vector<FailurePattern> failure_patterns(const Plan& plan, const Evaluation& ev);

}  // namespace readyby
