#pragma once
// Drift of a source's landings: how late each delivery landed after the
// occurrence it served, its median and 90th percentile against the declared
// `lands_after`, and a robust trend. Pure computation over recorded rows.
//
// Landing offset of one `ok` delivery:
// - cron source: landed_at minus the scheduled occurrence it served — the
//   row's `scheduled_at` when logged, else the latest occurrence of the
//   source's schedule (its zone and calendar) at or before landed_at;
// - stream source: landed_at minus data_through (for a stream, lands_after is
//   the delay from the data's time to its landing).
// Failed deliveries are not landings and are left out.
//
// Trend: the Theil–Sen slope of offset against landed_at, in seconds per
// week (positive: landing later and later). A source is *drifting* when its
// p90 offset exceeds the declared lands_after, or when the trend is positive
// and 30 days of it would use up the current slack of the tightest run whose
// critical chain starts at the source.

#include <optional>
#include <string>
#include <vector>

#include "history/history.h"
#include "plan/plan.h"
#include "time/instant.h"

namespace readyby {

/// How far ahead the trend is projected against a run's slack.
inline constexpr int64_t kDriftHorizonSeconds = 30 * kSecondsPerDay;

struct SourceDrift {
  int source = -1;                          // node index
  int deliveries = 0;                       // ok deliveries with an offset in the window
  std::optional<int64_t> p50_offset_seconds;  // nullopt: no deliveries
  std::optional<int64_t> p90_offset_seconds;
  int64_t declared_seconds = 0;             // the source's lands_after
  std::optional<double> trend_seconds_per_week;  // nullopt: fewer than two distinct landing times
  std::optional<int64_t> slack_seconds;     // current slack of the tightest run it is critical for
  bool drifting = false;
  std::string reason;                       // why it is drifting; empty when not
};

/// The landing offset of one delivery of `source` (see above); nullopt when no
/// scheduled occurrence can be found.
std::optional<int64_t> landing_offset(const Plan& plan, int source, const StoredLanding& landing);

/// Drift of `source` from its `ok` deliveries with landed_at in
/// [window_from, window_to). `slack_seconds` is the current slack to compare
/// the trend with (nullopt: none known; then only p90 can flag drift).
SourceDrift source_drift(const Plan& plan, int source, const std::vector<StoredLanding>& landings,
                         Instant window_from, Instant window_to, std::optional<int64_t> slack_seconds);

}  // namespace readyby
