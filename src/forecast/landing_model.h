#pragma once
// Landing models (DESIGN §10): how each monitored node has really landed,
// fitted from its recorded deliveries, for the forecast to sample from. Pure
// computation over a plan and recorded rows; no I/O.
//
// Occurrences and offsets. A node with a schedule of its own — a cron source,
// or a job or feature with a cron trigger — has *occurrences*: the instants of
// that schedule (its zone and calendar). Each recorded row serves one
// occurrence: its `scheduled_at` when logged (the latest occurrence at or
// before it when it is not one of the schedule's instants), else the latest
// occurrence at or before `landed_at`. A row's *offset* is landed_at minus
// its scheduled_at, or minus the occurrence it serves (§10). An occurrence
// *lands* with the smallest offset among its `ok` rows (the earliest
// delivery is the one freshness uses) and is *missing* when no `ok` row
// serves it. The fitting span runs from the first to the last occurrence
// that any row (ok or failed) serves, so occurrences after the last
// delivery — late or not yet landed — are not counted as missing.
// A row that lands after the node's next occurrence and has no
// scheduled_at is taken to serve that next occurrence (the earlier one then
// counts as missing): log scheduled_at where deliveries can be that late.
//
// Nodes without a schedule of their own (streams, and jobs or features
// started by their inputs whose completions are logged) have no scheduled
// occurrence. For them the offset is landed_at minus data_through (as drift
// measures streams), and the occurrences are *slots*: a grid of data ends at
// the node's cadence (the median gap between consecutive recorded
// data_through values), ending at the latest one; a row serves the slot its
// data_through falls in, and a slot no ok row serves is missing.
//
// What a delivery covers. A synthetic delivery of an occurrence holds data
// through (occurrence − data_lag_seconds), where data_lag_seconds is the
// median over ok rows of (served occurrence − data_through) — the recorded
// coverage, which is what `nightly` judges by, rather than the declared
// data_lag. A slot's delivery holds data through the slot's data end.
//
// The distribution. The empirical distribution of occurrence outcomes
// (offsets, and missing with its rate) — per local weekday of the occurrence
// (node's zone) when every weekday on which the node has occurrences has at
// least kMinWeekdayLandings landings and there are at least two such
// weekdays, else pooled. ("Every weekday" is read as every weekday the node
// is scheduled on: a weekday-only or weekly feed has no Saturday landings to
// count, and needs no Saturday model.)
//
// Warnings: a model is *short* with fewer than kShortHistoryLandings
// landings, and *stale* when none of its landings falls in the
// kStaleSeconds before the forecast window.

#include <array>
#include <cstdint>
#include <optional>
#include <vector>

#include "history/history.h"
#include "plan/plan.h"
#include "time/instant.h"

namespace readyby {

/// An occurrence outcome that did not land.
inline constexpr int64_t kMissingOccurrence = INT64_MIN;
/// Landings every scheduled weekday needs for per-weekday distributions.
inline constexpr int kMinWeekdayLandings = 8;
/// Fewer landings than this: the model is flagged as short.
inline constexpr int kShortHistoryLandings = 20;
/// No landing within this long before the window: the model is stale.
inline constexpr int64_t kStaleSeconds = 7 * kSecondsPerDay;

enum class OffsetBasis {
  schedule,  // offsets from scheduled occurrences (cron source, cron trigger)
  data_end,  // offsets from the data's end, on slots (stream, inputs-triggered)
};

/// Counts and quantiles of a set of occurrence outcomes.
struct OutcomeSummary {
  int occurrences = 0;
  int landings = 0;                            // occurrences that landed
  double missing_rate = 0;                     // (occurrences - landings) / occurrences; 0 when none
  std::optional<int64_t> p50_offset_seconds;   // nullopt: no landing. Hyndman & Fan definition 7, rounded
  std::optional<int64_t> p90_offset_seconds;
};

/// One occurrence (or slot) of the fitting span.
struct HistoricalOccurrence {
  Instant at;       // the scheduled occurrence, or the slot's data end
  int64_t outcome;  // offset in seconds, or kMissingOccurrence
  int weekday = 0;  // local weekday of `at` in the node's zone (0 = Sunday)
};

struct LandingModel {
  int node = -1;                         // plan node index
  const Zone* zone = nullptr;            // the node's zone (never null once fitted)
  OffsetBasis basis = OffsetBasis::schedule;
  int64_t data_lag_seconds = 0;          // schedule basis: occurrence - data_through of its deliveries
  int64_t cadence_seconds = 0;           // data_end basis: slot spacing (> 0)
  Instant anchor;                        // data_end basis: slots are anchor + k * cadence
  std::vector<HistoricalOccurrence> history;  // the fitting span, in time order
  bool by_weekday = false;               // outcomes drawn per local weekday of the occurrence
  OutcomeSummary pooled;                 // over the whole span
  std::array<OutcomeSummary, 7> weekdays;  // by local weekday (0 = Sunday); occurrences 0 where none
  std::optional<Instant> last_landing;   // latest landed_at of an ok row used; nullopt: none
  bool short_history = false;            // pooled.landings < kShortHistoryLandings
  bool stale = false;                    // no landing in the kStaleSeconds before the window

  /// The local weekday (node's zone, 0 = Sunday) of an occurrence or slot.
  int weekday_of(Instant at) const;
  /// The outcomes a draw samples from for an occurrence on `weekday`: that
  /// weekday's when by_weekday and it has any, else the pooled ones. Never
  /// empty: a model with no occurrence at all yields {kMissingOccurrence}.
  std::vector<int64_t> outcomes_for(int weekday) const;
};

struct LandingModels {
  std::vector<LandingModel> models;  // monitored nodes, plan order
  std::vector<int> by_node;          // plan node index -> index into models, -1: unmonitored

  const LandingModel* of(int node) const {
    int i = by_node[static_cast<size_t>(node)];
    return i < 0 ? nullptr : &models[static_cast<size_t>(i)];
  }
};

/// The node's own schedule: a cron source's schedule or a job's or feature's
/// cron trigger; nullptr for streams and inputs-triggered nodes.
const Cron* own_schedule(const Node& node);

/// Fits a landing model for every node of `plan` that has a recorded row
/// (ok or failed) landed before `fit_until`; rows landed at or after it are
/// ignored (a backtest fits on the past only). `history` is indexed like
/// plan.nodes (nullopt: never recorded). `window_start` is the first instant
/// of the forecast window, for the stale flag.
LandingModels fit_landing_models(const Plan& plan, const History& history, Instant fit_until, Instant window_start);

}  // namespace readyby
