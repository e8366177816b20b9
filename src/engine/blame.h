#pragma once
// Blame: why one feature of one run is late (or never fresh), step by step
// along its chain (DESIGN §4 chain), and which step is the cause.
//
// Facts per step (source first):
// - `ready`: E_step(w) for the run's w = needs_data_through.
// - `latest`: the latest landing of the step that still lets the feature be
//   ready by the run, by a backward pass from the run: a run time subtracts, a
//   cron trigger rounds down to its latest occurrence at or before the latest
//   start. A step is late when ready > latest. On a late chain every step is
//   late against its `latest` (the backward pass is exact), so lateness alone
//   does not say who is at fault; the split below does.
// - `own_late_seconds` / `waited_seconds`: how much of the step's lateness is
//   its own doing versus waiting for its input:
//   * a derived step whose input's deadline lies before w (no landing of data
//     that reaches w could be in time for it: its own start rule or run time
//     cannot meet the run) is late on its own account;
//   * a cron-triggered step whose input landed by its latest on-time start is
//     late on its own account (its fixed start is before its input, or after
//     the last good moment: its schedule, or a daylight-saving shift of it);
//   * any other late derived step waited for its input;
//   * a source is late on its own account (its schedule, data_lag,
//     lands_after) when its deadline is not before w; otherwise a step
//     downstream made its deadline impossible, and the source is not at fault.
// - The cause is the step nearest the feature with own lateness (one always
//   exists on a late chain). For a never chain it is the first step that never
//   lands.
//
// Pure computation over a freshness engine; the writers make the sentences.

#include <optional>
#include <vector>

#include "engine/freshness.h"
#include "plan/plan.h"

namespace readyby {

/// One step of a chain, against one run.
struct BlameStep {
  int node = -1;
  std::optional<Instant> ready;     ///< E_node(w); nullopt: never lands
  std::optional<Instant> latest;    ///< latest on-time landing; nullopt: no trigger occurrence allows one
  /// Derived steps only (nullopt at a source): when its deciding input (the
  /// previous step) landed, when it started (ready - run_time) and the latest
  /// start that keeps the run on time (latest - run_time).
  std::optional<Instant> input_ready, start, start_by;
  /// Cron-triggered steps: its last start at or after w, before its input
  /// landed and not after its latest on-time start: that start read older
  /// data, and with its input there it would have kept the run on time.
  std::optional<Instant> stale_start;
  /// The step's start (cron-triggered step) or scheduled delivery (cron
  /// source) is a local time inside a spring-forward gap, read with the offset
  /// before the gap (RFC 5545 §3.3.5); this is the wall-clock time it was
  /// written for, e.g. 02:30 for a start that ran at 03:30.
  std::optional<LocalTime> gap_nominal;
  /// The node's landings are recorded (nightly): it is a leaf of the chain.
  bool recorded = false;
  /// True when `latest` is before w (or absent): no landing of data that
  /// reaches w could be on time; a step downstream is at fault.
  bool deadline_before_data = false;
  int64_t own_late_seconds = 0;     ///< lateness on its own account (>= 0)
  int64_t waited_seconds = 0;       ///< lateness from waiting for its input (>= 0)
};

enum class CauseKind {
  none,           ///< the feature is on time
  never,          ///< the cause step never lands (no qualifying occurrence, or not landed)
  late_delivery,  ///< a source lands after its deadline (its schedule, data_lag, lands_after)
  stale_start,    ///< a cron-triggered step started before its input landed; its next start is too late
  late_start,     ///< a cron-triggered step had its input in time but its next start is after the latest on-time start
  slow_step,      ///< an inputs-triggered step cannot finish in time even with its input at once
};
/// "none" | "never" | "late-delivery" | "stale-start" | "late-start" | "slow-step".
const char* to_string(CauseKind k);

struct Blame {
  Instant needs_data_through;  ///< w
  Instant run_at;
  int feature = -1;
  std::vector<BlameStep> steps;  ///< the chain, source first, feature last
  int cause = -1;                ///< index into steps; -1 when on time
  CauseKind kind = CauseKind::none;
  /// The node at the cause step, -1 when none.
  int cause_node() const { return cause < 0 ? -1 : steps[static_cast<size_t>(cause)].node; }
};

/// Blame for `feature` needing data through `needs_data_through` for a run at
/// `run_at`. `engine` must hold profiles of the feature's upstream for that w.
/// `monitored` (optional, indexed like plan.nodes): nodes whose landings are
/// recorded; they are leaves of the chain and have no start or gap facts.
Blame blame(const Plan& plan, const FreshnessEngine& engine, int feature, Instant needs_data_through, Instant run_at,
            const std::vector<bool>* monitored = nullptr);

/// When occurrence `c` of `cron` (in `zone`) is a local time in a
/// spring-forward gap read with the earlier offset, the local time it was
/// written for; else nullopt.
std::optional<LocalTime> gap_nominal(const Cron& cron, const Zone& zone, Instant c);

}  // namespace readyby
