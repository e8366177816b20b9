#include "forecast/landing_model.h"

#include <algorithm>
#include <climits>
#include <cmath>

#include "history/stats.h"
#include "time/calendar.h"
#include "time/cron.h"

namespace readyby {

namespace {

// The lower median of a non-empty list (a value of the list, so integer).
int64_t lower_median(std::vector<int64_t> values) {
  const size_t mid = (values.size() - 1) / 2;
  std::nth_element(values.begin(), values.begin() + static_cast<std::ptrdiff_t>(mid), values.end());
  return values[mid];
}

int64_t floor_div(int64_t a, int64_t b) {
  int64_t q = a / b;
  return (a % b != 0 && (a < 0) != (b < 0)) ? q - 1 : q;
}

OutcomeSummary summarise(const std::vector<int64_t>& outcomes) {
  OutcomeSummary s;
  std::vector<double> offsets;
  for (int64_t o : outcomes) {
    ++s.occurrences;
    if (o == kMissingOccurrence) continue;
    ++s.landings;
    offsets.push_back(static_cast<double>(o));
  }
  if (s.occurrences > 0) s.missing_rate = static_cast<double>(s.occurrences - s.landings) / s.occurrences;
  if (!offsets.empty()) {
    s.p50_offset_seconds = std::llround(*percentile(offsets, 0.5));
    s.p90_offset_seconds = std::llround(*percentile(offsets, 0.9));
  }
  return s;
}

// Rows recorded before `fit_until`, in landed_at order.
std::vector<const StoredLanding*> rows_before(const std::vector<StoredLanding>& rows, Instant fit_until) {
  std::vector<const StoredLanding*> out;
  for (const StoredLanding& r : rows) {
    if (r.landed_at < fit_until) out.push_back(&r);
  }
  return out;
}

// Occurrences of `cron` from `from` to `to` inclusive, in order.
std::vector<Instant> occurrences_between(const Cron& cron, const Zone& zone, const Calendar& calendar, Instant from,
                                         Instant to) {
  std::vector<Instant> out;
  Instant search = from;
  while (true) {
    std::optional<Instant> o = next_occurrence(cron, zone, calendar, search);
    if (!o || *o > to) break;
    out.push_back(*o);
    search = *o + Seconds(1);
  }
  return out;
}

// Schedule basis: rows to occurrences, outcomes over the span, coverage lag.
void fit_scheduled(const Plan& plan, const Node& node, const Cron& cron, const std::vector<const StoredLanding*>& rows,
                   LandingModel* m) {
  const Calendar& calendar = plan.calendar(node.calendar);
  Instant earliest = rows.front()->landed_at, latest = rows.front()->landed_at;
  for (const StoredLanding* r : rows) {
    earliest = std::min(earliest, r->scheduled_at ? std::min(*r->scheduled_at, r->landed_at) : r->landed_at);
    latest = std::max(latest, r->landed_at);
  }
  Instant from = earliest - Seconds(8 * kSecondsPerDay);
  // A sparse schedule (monthly, yearly) may have its occurrence further back.
  if (std::optional<Instant> before = previous_occurrence(cron, *node.zone, calendar, earliest)) {
    from = std::min(from, *before);
  }
  std::vector<Instant> occurrences = occurrences_between(cron, *node.zone, calendar, from, latest);
  if (occurrences.empty()) return;
  // The occurrence a row serves: index into `occurrences`, -1 when none.
  auto served = [&](const StoredLanding& r) -> long {
    Instant key = r.scheduled_at ? *r.scheduled_at : r.landed_at;
    auto it = std::upper_bound(occurrences.begin(), occurrences.end(), key);
    return static_cast<long>(it - occurrences.begin()) - 1;
  };
  long first = LONG_MAX, last = -1;
  std::vector<int64_t> best(occurrences.size(), kMissingOccurrence);
  std::vector<int64_t> lags;
  for (const StoredLanding* r : rows) {
    long k = served(*r);
    if (k < 0) continue;
    first = std::min(first, k);
    last = std::max(last, k);
    if (r->status != LandingStatus::ok) continue;
    const Instant scheduled = r->scheduled_at ? *r->scheduled_at : occurrences[static_cast<size_t>(k)];
    const int64_t offset = (r->landed_at - scheduled).count();
    int64_t& b = best[static_cast<size_t>(k)];
    if (b == kMissingOccurrence || offset < b) b = offset;
    lags.push_back((scheduled - r->data_through).count());
  }
  if (last < 0) return;
  for (long k = first; k <= last; ++k) {
    m->history.push_back({occurrences[static_cast<size_t>(k)], best[static_cast<size_t>(k)]});
  }
  m->data_lag_seconds = lags.empty() ? node.data_lag.seconds : lower_median(lags);
}

// Data-end basis: slots at the recorded cadence, offsets from the data's end.
void fit_slots(const std::vector<const StoredLanding*>& rows, LandingModel* m) {
  std::vector<int64_t> ends;
  for (const StoredLanding* r : rows) ends.push_back(to_unix(r->data_through));
  std::sort(ends.begin(), ends.end());
  ends.erase(std::unique(ends.begin(), ends.end()), ends.end());
  std::vector<int64_t> gaps;
  for (size_t i = 1; i < ends.size(); ++i) gaps.push_back(ends[i] - ends[i - 1]);
  m->cadence_seconds = gaps.empty() ? kSecondsPerDay : std::max<int64_t>(60, lower_median(gaps));
  m->anchor = from_unix(ends.back());
  const int64_t first_slot = floor_div(ends.front() - ends.back(), m->cadence_seconds);
  std::vector<int64_t> best(static_cast<size_t>(-first_slot + 1), kMissingOccurrence);
  for (const StoredLanding* r : rows) {
    if (r->status != LandingStatus::ok) continue;
    const int64_t slot = floor_div(to_unix(r->data_through) - ends.back(), m->cadence_seconds);
    const int64_t offset = (r->landed_at - r->data_through).count();
    int64_t& b = best[static_cast<size_t>(slot - first_slot)];
    if (b == kMissingOccurrence || offset < b) b = offset;
  }
  for (size_t i = 0; i < best.size(); ++i) {
    const int64_t slot = first_slot + static_cast<int64_t>(i);
    m->history.push_back({m->anchor + Seconds(slot * m->cadence_seconds), best[i], 0});
  }
}

void summarise_model(LandingModel* m) {
  std::vector<int64_t> all;
  std::array<std::vector<int64_t>, 7> by_day;
  for (HistoricalOccurrence& h : m->history) {
    h.weekday = m->weekday_of(h.at);
    all.push_back(h.outcome);
    by_day[static_cast<size_t>(h.weekday)].push_back(h.outcome);
  }
  m->pooled = summarise(all);
  int scheduled_days = 0;
  bool enough = true;
  for (size_t d = 0; d < 7; ++d) {
    m->weekdays[d] = summarise(by_day[d]);
    if (m->weekdays[d].occurrences == 0) continue;
    ++scheduled_days;
    enough = enough && m->weekdays[d].landings >= kMinWeekdayLandings;
  }
  m->by_weekday = enough && scheduled_days >= 2;
  m->short_history = m->pooled.landings < kShortHistoryLandings;
}

}  // namespace

const Cron* own_schedule(const Node& node) {
  if (node.kind == NodeKind::source) return node.stream || !node.schedule ? nullptr : &*node.schedule;
  return node.trigger ? &*node.trigger : nullptr;
}

int LandingModel::weekday_of(Instant at) const {
  return readyby::weekday_of(date::floor<date::days>(zone->to_local(at)));
}

std::vector<int64_t> LandingModel::outcomes_for(int weekday) const {
  const bool own_day = by_weekday && weekdays[static_cast<size_t>(weekday)].occurrences > 0;
  std::vector<int64_t> out;
  for (const HistoricalOccurrence& h : history) {
    if (!own_day || h.weekday == weekday) out.push_back(h.outcome);
  }
  if (out.empty()) out.push_back(kMissingOccurrence);
  return out;
}

LandingModels fit_landing_models(const Plan& plan, const History& history, Instant fit_until, Instant window_start) {
  LandingModels out;
  out.by_node.assign(plan.nodes.size(), -1);
  for (size_t n = 0; n < plan.nodes.size() && n < history.size(); ++n) {
    if (!history[n]) continue;
    std::vector<const StoredLanding*> rows = rows_before(*history[n], fit_until);
    if (rows.empty()) continue;
    const Node& node = plan.nodes[n];
    LandingModel m;
    m.node = static_cast<int>(n);
    m.zone = node.zone;
    if (const Cron* cron = own_schedule(node)) {
      m.basis = OffsetBasis::schedule;
      fit_scheduled(plan, node, *cron, rows, &m);
    } else {
      m.basis = OffsetBasis::data_end;
      fit_slots(rows, &m);
    }
    for (const StoredLanding* r : rows) {
      if (r->status == LandingStatus::ok && (!m.last_landing || r->landed_at > *m.last_landing)) {
        m.last_landing = r->landed_at;
      }
    }
    summarise_model(&m);
    m.stale = !m.last_landing || *m.last_landing < window_start - Seconds(kStaleSeconds);
    out.by_node[n] = static_cast<int>(out.models.size());
    out.models.push_back(std::move(m));
  }
  return out;
}

}  // namespace readyby
