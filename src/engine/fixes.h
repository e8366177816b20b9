#pragma once
// Verified fixes (DESIGN §9): for a pattern of runs that are not ok, edits of
// the plan that make every run of the pattern ok, each re-evaluated before it
// is offered, minimal to the minute, with what else it changes.
//
// Kinds of fix, each one edit of engine/edit.h (so `what-if` takes it as is):
// - land_earlier: a source lands D earlier — `delay NODE=-D` while its
//   lands_after allows, else `schedule NODE=CRON` with its delivery schedule
//   moved D earlier — or a job or feature finishes D sooner (`delay`, D at
//   most its run_time).
// - move_start: `schedule NODE=CRON` — a cron-triggered job or feature starts
//   D later (after its input has landed) or D earlier (before its deadline).
// A moved schedule is the old one with every occurrence moved by D of local
// time, when that is expressible as one cron expression (shifted_cron).
// - start_later: `runs MODEL=CRON` — the model's runs start D later, D under
//   a day (the model has one run specification, without a calendar, since
//   the edit replaces the runs with one cron and no calendar). Each
//   run of the pattern is checked at its moved time: its local time plus D
//   (the next local date when that passes midnight), read by the RFC 5545 rule.
//
// Search. Candidates come from the blame of the pattern's worst run (the step
// at fault and, for a fixed start, its input), then from the blame of other
// runs of the pattern; a candidate is tried only when its node is upstream of
// every feature of the pattern. For each, the size D is found by re-evaluation:
// first the size the blame suggests, doubled until every run of the pattern
// clears (bounded), then bisection between a size that leaves a run of the
// pattern not ok and one that clears them all, so the fix clears the pattern
// and one minute less does not. A run *clears* when it is ok — or, for a
// failing run that was also degraded by optional features outside the
// pattern, when its required features are all ok and it is degraded.
//
// Effect. After the search, every other run of the window that the edit can
// affect is re-evaluated: for an earlier landing (E can only move earlier, so
// no run gets worse) the runs that were not ok; for any other edit every run
// of every model downstream of the edited node. The changes are listed.
//
// Order of the fixes found: those that turn no other run worse first, then
// the order of the candidates (the cause first, starting the runs later last).
//
// Re-evaluation applies the edit to a working copy of the plan exactly as
// apply_edits does, then evaluates by the DESIGN §4 recursion: nodes
// downstream of the edited one are recomputed per query (a pattern has few
// runs, and a profile rebuild would cover the whole window), every other
// node's E is read from the evaluation's profiles. tests/fixes_test.cpp checks
// it against reevaluate() of engine/edit.h and against the literal reference
// on random plans.

#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "engine/edit.h"
#include "engine/patterns.h"

namespace readyby {

enum class FixKind { land_earlier, move_start, start_later };
/// "land-earlier" | "move-start" | "start-later".
const char* to_string(FixKind k);

struct RunChange {
  int model = -1;
  Instant at;             ///< the run as scheduled before the edit
  RunStatus before = RunStatus::ok, after = RunStatus::ok;
};

struct Fix {
  FixKind kind = FixKind::land_earlier;
  Edit edit;
  int node = -1;            ///< the step changed; -1 for start_later
  int64_t seconds = 0;      ///< size D (> 0, whole minutes), minimal to the minute
  bool later = false;       ///< move_start: the start moves later (else earlier)
  std::string from_cron;    ///< move_start, start_later: the cron expression before the edit
  /// In the pattern's worst run: the step's landing (land_earlier), its start
  /// (move_start) or the run (start_later) before and after the edit.
  Instant before, after;
  size_t pattern_runs = 0;  ///< runs of the pattern; every one clears with the edit
  std::vector<RunChange> other_changes;  ///< other runs of the window whose status the edit changes
  size_t runs_rechecked = 0;             ///< runs re-evaluated for other_changes
  /// True when some other run gets worse (ok -> degraded or fail, degraded -> fail).
  bool breaks_others() const;
};

struct FixSearch {
  std::vector<Fix> fixes;        ///< verified fixes, in the order above; empty: no single edit found
  /// The pattern's features have no common upstream step, so no edit of one
  /// step can clear it (only moving the runs could).
  bool causes_apart = false;
  /// Steps whose edits were tried and could not clear every run of the pattern.
  std::vector<int> tried_nodes;
  /// The pattern is never-fresh at its cause (nothing lands): no size of a
  /// timing edit of that step helps.
  bool never = false;
};

/// Finds verified fixes for patterns of one collected window.
class FixFinder {
 public:
  /// `collector` holds every run of the window (all added).
  explicit FixFinder(const PatternCollector& collector);
  ~FixFinder();
  FixFinder(const FixFinder&) = delete;
  FixFinder& operator=(const FixFinder&) = delete;

  FixSearch find(const Pattern& pattern) const;

 private:
  struct State;
  std::unique_ptr<State> state_;
};

/// `cron` with every occurrence moved by `minutes` (local wall-clock time),
/// as a cron expression; nullopt when that cannot be written as one
/// expression (several minutes in the minute field, or a move across
/// midnight with day fields that do not move with it, or with a calendar).
std::optional<std::string> shifted_cron(const Cron& cron, int64_t minutes, bool has_calendar);

}  // namespace readyby
