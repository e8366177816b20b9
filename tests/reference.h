#pragma once
// Deliberately simple reference implementations that the fast code is judged
// against. They follow the written rules literally (DESIGN §4, RFC 5545
// §3.3.5) and favour obviousness over speed: minute stepping, plain
// recursion. Shared by several test files; not part of the product.

#include <date/tz.h>

#include <algorithm>
#include <map>
#include <optional>
#include <tuple>
#include <vector>

#include "plan/plan.h"
#include "time/cron.h"

namespace readyby::reference {

/// First occurrence >= from: walk local dates from the day before `from`,
/// test the day rule literally, step through every local minute of the
/// schedule's hours, map each with date/tz's local_info by the RFC 5545 rule
/// (gap and overlap take the first offset), keep the earliest instant >= from;
/// once a day yields one, the next day is checked too.
inline std::optional<Instant> next_occurrence(const Cron& c, const std::string& zone_name, const Calendar& cal,
                                              Instant from) {
  const date::time_zone* tz = date::locate_zone(zone_name);
  auto local_from = tz->to_local(from);
  LocalDays day = date::floor<date::days>(LocalTime(local_from.time_since_epoch())) - date::days(1);
  std::optional<Instant> best;
  std::optional<LocalDays> found_day;
  for (int i = 0; i < 1470; ++i, day += date::days(1)) {
    if (found_day && day > *found_day + date::days(1)) break;
    date::year_month_day ymd{day};
    unsigned month = static_cast<unsigned>(ymd.month());
    unsigned dom = static_cast<unsigned>(ymd.day());
    int dow = static_cast<int>(date::weekday(day).c_encoding());
    bool month_ok = (c.months >> month) & 1;
    bool dom_ok = (c.days >> dom) & 1;
    bool dow_ok = (c.weekdays >> dow) & 1;
    bool day_ok = (c.days_star || c.weekdays_star) ? (dom_ok && dow_ok) : (dom_ok || dow_ok);
    if (!month_ok || !day_ok || cal.skips(day)) continue;
    for (int minute = 0; minute < 1440; ++minute) {
      if (!((c.hours >> (minute / 60)) & 1) || !((c.minutes >> (minute % 60)) & 1)) continue;
      LocalTime l = LocalTime(day.time_since_epoch()) + Seconds(minute * 60);
      date::local_info info = tz->get_info(l);
      Instant t = Instant((l - info.first.offset).time_since_epoch());
      if (t >= from && (!best || t < *best)) {
        best = t;
        if (!found_day) found_day = day;
      }
    }
  }
  if (best && *best > from + Seconds(kSearchHorizonSeconds)) return std::nullopt;
  return best;
}

/// E_n(w) and its chain by the recursion of DESIGN §4, one query at a time.
class Freshness {
 public:
  explicit Freshness(const Plan& plan) : plan_(plan) {}

  struct Result {
    std::optional<Instant> ready;
    std::vector<int> chain;
  };

  Result at(int n, Instant w) {
    const Node& node = plan_.nodes[static_cast<size_t>(n)];
    const Calendar& cal = plan_.calendar(node.calendar);
    if (node.fails) return {std::nullopt, {n}};  // DESIGN §9 `fail`: the node never lands
    if (node.kind == NodeKind::source) {
      if (node.stream) return {w + Seconds(node.lands_after.seconds), {n}};
      auto s = next(*node.schedule, node.zone->name(), cal, w + Seconds(node.data_lag.seconds));
      if (!s) return {std::nullopt, {n}};
      return {*s + Seconds(node.lands_after.seconds), {n}};
    }
    std::optional<Instant> m;
    std::vector<int> chain;
    bool never = false;
    for (int input : node.inputs) {
      Result r = at(input, w);
      if (!r.ready) {
        if (!never) chain = r.chain;  // the first input that is never
        never = true;
        continue;
      }
      if (never) continue;
      if (!m || *r.ready > *m) {  // strictly later: ties keep the first input
        m = r.ready;
        chain = r.chain;
      }
    }
    chain.push_back(n);
    if (never) return {std::nullopt, chain};
    if (node.trigger) {
      auto c = next(*node.trigger, node.zone->name(), cal, *m);
      if (!c) return {std::nullopt, chain};
      return {*c + Seconds(node.run_time.seconds), chain};
    }
    return {*m + Seconds(node.run_time.seconds), chain};
  }

 private:
  std::optional<Instant> next(const Cron& c, const std::string& zone, const Calendar& cal, Instant from) {
    auto key = std::make_tuple(&c, zone, &cal, to_unix(from));
    auto it = memo_.find(key);
    if (it != memo_.end()) return it->second;
    auto value = next_occurrence(c, zone, cal, from);
    memo_.emplace(key, value);
    return value;
  }

  const Plan& plan_;
  std::map<std::tuple<const Cron*, std::string, const Calendar*, int64_t>, std::optional<Instant>> memo_;
};

/// Run instants of a model with local date in [from, from + days): every
/// local minute of those dates (and the neighbouring ones), mapped by the
/// RFC 5545 rule, kept when the instant's local date is in the window.
inline std::vector<Instant> run_instants(const Plan& plan, const Model& model, LocalDays from, int days) {
  const date::time_zone* tz = date::locate_zone(model.zone->name());
  std::vector<Instant> out;
  for (const RunSpec& spec : model.runs) {
    const Calendar& cal = plan.calendar(spec.calendar);
    for (LocalDays day = from - date::days(1); day <= from + date::days(days); day += date::days(1)) {
      date::year_month_day ymd{day};
      int dow = static_cast<int>(date::weekday(day).c_encoding());
      const Cron& c = spec.at;
      bool dom_ok = (c.days >> static_cast<unsigned>(ymd.day())) & 1;
      bool dow_ok = (c.weekdays >> dow) & 1;
      bool day_ok = (c.days_star || c.weekdays_star) ? (dom_ok && dow_ok) : (dom_ok || dow_ok);
      if (!((c.months >> static_cast<unsigned>(ymd.month())) & 1) || !day_ok || cal.skips(day)) continue;
      for (int minute = 0; minute < 1440; ++minute) {
        if (!((c.hours >> (minute / 60)) & 1) || !((c.minutes >> (minute % 60)) & 1)) continue;
        LocalTime l = LocalTime(day.time_since_epoch()) + Seconds(minute * 60);
        Instant t = Instant((l - tz->get_info(l).first.offset).time_since_epoch());
        LocalDays local_day = date::floor<date::days>(LocalTime(tz->to_local(t).time_since_epoch()));
        if (local_day >= from && local_day < from + date::days(days)) out.push_back(t);
      }
    }
  }
  std::sort(out.begin(), out.end());
  out.erase(std::unique(out.begin(), out.end()), out.end());
  return out;
}

}  // namespace readyby::reference
