#include "history/drift.h"

#include <cmath>

#include "history/stats.h"
#include "time/duration.h"

namespace readyby {

std::optional<int64_t> landing_offset(const Plan& plan, int source, const StoredLanding& landing) {
  const Node& node = plan.nodes[static_cast<size_t>(source)];
  if (node.stream) return (landing.landed_at - landing.data_through).count();
  if (landing.scheduled_at) return (landing.landed_at - *landing.scheduled_at).count();
  if (!node.schedule) return std::nullopt;
  std::optional<Instant> scheduled =
      previous_occurrence(*node.schedule, *node.zone, plan.calendar(node.calendar), landing.landed_at);
  if (!scheduled) return std::nullopt;
  return (landing.landed_at - *scheduled).count();
}

SourceDrift source_drift(const Plan& plan, int source, const std::vector<StoredLanding>& landings,
                         Instant window_from, Instant window_to, std::optional<int64_t> slack_seconds) {
  const Node& node = plan.nodes[static_cast<size_t>(source)];
  SourceDrift d;
  d.source = source;
  d.declared_seconds = node.lands_after.seconds;
  d.slack_seconds = slack_seconds;
  std::vector<double> weeks, offsets;
  for (const StoredLanding& l : landings) {
    if (l.status != LandingStatus::ok || l.landed_at < window_from || l.landed_at >= window_to) continue;
    std::optional<int64_t> offset = landing_offset(plan, source, l);
    if (!offset) continue;
    weeks.push_back(static_cast<double>(to_unix(l.landed_at)) / (7.0 * kSecondsPerDay));
    offsets.push_back(static_cast<double>(*offset));
  }
  d.deliveries = static_cast<int>(offsets.size());
  if (offsets.empty()) return d;
  d.p50_offset_seconds = std::llround(*percentile(offsets, 0.5));
  d.p90_offset_seconds = std::llround(*percentile(offsets, 0.9));
  // Thin evenly (landings are in landed_at order) to bound the O(n^2) slope.
  if (weeks.size() > kMaxTrendPoints) {
    std::vector<double> w, o;
    for (size_t i = 0; i < kMaxTrendPoints; ++i) {
      size_t k = i * (weeks.size() - 1) / (kMaxTrendPoints - 1);
      w.push_back(weeks[k]);
      o.push_back(offsets[k]);
    }
    weeks.swap(w);
    offsets.swap(o);
  }
  d.trend_seconds_per_week = theil_sen_slope(weeks, offsets);
  if (*d.p90_offset_seconds > d.declared_seconds) {
    d.drifting = true;
    d.reason = "p90 landing offset " + human_duration(*d.p90_offset_seconds) + " exceeds the declared lands_after " +
               human_duration(d.declared_seconds);
  }
  if (d.trend_seconds_per_week && *d.trend_seconds_per_week > 0 && slack_seconds) {
    const double projected = *d.trend_seconds_per_week * static_cast<double>(kDriftHorizonSeconds) / (7.0 * kSecondsPerDay);
    if (projected > static_cast<double>(*slack_seconds)) {
      d.drifting = true;
      std::string why = "at " + human_duration(std::llround(*d.trend_seconds_per_week)) +
                        " later per week, landings will use up the current slack of " +
                        human_duration(std::max<int64_t>(*slack_seconds, 0)) + " within 30 days";
      d.reason = d.reason.empty() ? why : d.reason + "; " + why;
    }
  }
  return d;
}

}  // namespace readyby
