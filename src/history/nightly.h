#pragma once
// The nightly check: one local day's runs evaluated against what
// actually landed, with drift and on-time rates from the history. Pure
// computation over a plan and recorded deliveries; the store reads them and
// the report writers render the result.
//
// Semantics.
// - A node with any recorded row (ok or failed) is *monitored*: its E(w) is
//   the earliest landed_at among its `ok` rows with data_through >= w, and
//   "not landed" when there is none; its chain is the node alone. Failed rows
//   only make a node monitored. Every other node keeps its declared timing;
//   sources among them are listed as *unmonitored*.
// - The window is the `window` local dates ending with `date` (plan zone),
//   shortened so that it starts no earlier than the day after every monitored
//   node's first recorded data_through (days before the history began would
//   read as "not landed"). `date` itself is always evaluated.
// - Runs of the whole window are evaluated with one freshness engine; the
//   runs of `date` are the report's runs (status ok / degraded / fail; a
//   feature never ready is "not-landed").
// - On-time rate per model and local run time (HH:MM in the model's zone):
//   runs on time over runs evaluated in the window, with a Wilson 95%
//   interval. A run is on time when it is ok or degraded — every required
//   feature was fresh; a degraded run scored without an optional one — the
//   same line the exit status, JUnit and the metrics' run_ok draw. Degraded
//   runs are also counted on their own.
// - Silent nodes: a monitored node with no recorded row (ok or failed) that
//   landed in the kSilentDays days up to `as_of` (the day's last run), when a
//   delivery was due in that time: its own schedule or cron trigger has an
//   occurrence after its last landing whose declared landing time
//   (occurrence + lands_after + run_time) is at or before `as_of`; a node
//   without a schedule of its own (stream, input-triggered job) was due
//   every day. A silent node looks like a feed that stopped, or a log that is
//   no longer recorded.
// - Weakest link: the node that most often starts the chain of a failing
//   non-optional feature, counted once per failing run over the window.
// - Drift: for every monitored source (drift.h), over the window, compared
//   with the slack of the latest run whose ok feature's chain starts there.
// - Advice: each run of `date` that is not ok, as a one-run pattern with the
//   blame of its worst feature (engine/blame.h: a recorded node is a leaf of
//   its chain) and its verified fixes (engine/fixes.h), whose effects are
//   re-checked over the window's runs.

#include <optional>
#include <string>
#include <vector>

#include "engine/check.h"
#include "engine/fixes.h"
#include "engine/patterns.h"
#include "history/drift.h"
#include "history/stats.h"
#include "history/history.h"
#include "plan/plan.h"

namespace readyby {

/// Days without a recorded landing after which a monitored node is silent.
inline constexpr int kSilentDays = 3;

struct OnTimeRate {
  int model = -1;
  std::string at_local;      // "07:00": local run time in the model's zone
  int days = 0;              // runs evaluated
  int on_time = 0;           // runs ok or degraded
  int degraded = 0;          // of on_time: runs degraded
  double rate = 0;           // on_time / days
  ProportionInterval interval;  // Wilson 95%
};

/// A monitored node that has gone quiet (see "Silent nodes" above).
struct SilentNode {
  int node = -1;
  std::optional<Instant> last_landed_at;  // nullopt: no row in the history read
};

struct WeakestLink {
  int node = -1;             // usually a source
  int failing_runs = 0;      // failing runs whose failure chain starts at `node`
  int total_failing_runs = 0;
};

/// One step of a chain with its actual (or, for unmonitored nodes, declared) landing.
struct ChainLanding {
  int node = -1;
  std::optional<Instant> ready_at;   // nullopt: not landed
  bool monitored = false;
};

struct NightlyReport {
  LocalDays date;
  int window = 0;                    // as asked
  LocalDays window_from;             // first local date evaluated (<= date)
  Evaluation evaluation;             // every run in [window_from, date]
  std::vector<size_t> today;         // indices into evaluation.runs of the runs of `date`
  std::vector<int> unmonitored;      // sources with no recorded row, plan order
  std::vector<bool> monitored;       // by node index
  std::vector<SourceDrift> drift;    // monitored sources, plan order
  std::vector<OnTimeRate> on_time;   // by model (plan order), then local time
  std::optional<WeakestLink> weakest_link;  // nullopt: no failing run in the window
  Instant as_of;                     // the latest run of `date`; the end of `date` when it has none
  std::vector<std::optional<Instant>> last_landed;  // by node: latest landed_at at or before as_of
  std::vector<SilentNode> silent;    // plan order
  /// When the check was made: set by the caller from the clock (the engine
  /// reads none); nullopt when not known. Reports may show it.
  std::optional<Instant> evaluated_at;
  struct RunAdvice {
    size_t run = 0;          // index into evaluation.runs (one of `today`)
    Pattern pattern;         // the run as a one-run pattern, with its blame
    FixSearch fixes;         // verified fixes
  };
  std::vector<RunAdvice> advice;     // the runs of `date` that are not ok, in order

  /// False iff some run of `date` fails.
  bool ok() const;
  /// The chain of a feature result with each step's landing time.
  std::vector<ChainLanding> chain_landings(const FeatureResult& f) const;
};

/// "HH:MM": the local time of `t` in `zone` — how a run is named from day to
/// day (on-time rates, metrics labels, JUnit test names).
std::string local_run_time(Instant t, const Zone& zone);

/// The earliest data_through that a nightly check of `date` with `window`
/// can need: read history from here on.
Instant history_needed_since(const Plan& plan, LocalDays date, int window);

/// Evaluates the nightly check. `history` holds every node's rows with
/// data_through >= history_needed_since(plan, date, window) (nullopt:
/// never recorded); `first_data_through` per node the earliest ever recorded
/// (may be empty: the window is then not shortened). `window` >= 1.
NightlyReport evaluate_nightly(const Plan& plan, const History& history,
                               const std::vector<std::optional<Instant>>& first_data_through, LocalDays date,
                               int window);

}  // namespace readyby
