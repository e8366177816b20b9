#include "history/nightly.h"

#include <algorithm>
#include <map>

#include "time/cron.h"
#include "time/zone.h"

namespace readyby {

namespace {

int64_t max_feature_age(const Plan& plan) {
  int64_t age = 0;
  for (const Node& n : plan.nodes) age = std::max(age, n.max_age.seconds);
  return age;
}

int64_t max_data_lag(const Plan& plan) {
  int64_t lag = 0;
  for (const Node& n : plan.nodes) lag = std::max(lag, n.data_lag.seconds);
  return lag;
}

LocalDays local_date(const Zone& zone, Instant t) { return date::floor<date::days>(zone.to_local(t)); }

// The window's first date: `window` days ending with `date`, but not before
// the day after the latest first data_through among monitored nodes.
LocalDays window_start(const Plan& plan, const std::vector<std::optional<Instant>>& first, LocalDays date,
                       int window) {
  LocalDays from = date - date::days(window - 1);
  for (const std::optional<Instant>& f : first) {
    if (f) from = std::max(from, local_date(*plan.zone, *f) + date::days(1));
  }
  return std::min(from, date);
}

std::vector<OnTimeRate> on_time_rates(const Plan& plan, const Evaluation& ev) {
  std::map<std::pair<int, std::string>, OnTimeRate> groups;
  for (const RunResult& run : ev.runs) {
    const Model& model = plan.models[static_cast<size_t>(run.model)];
    OnTimeRate& g = groups[{run.model, local_run_time(run.at, *model.zone)}];
    g.model = run.model;
    ++g.days;
    if (run.status != RunStatus::fail) ++g.on_time;
    if (run.status == RunStatus::degraded) ++g.degraded;
  }
  std::vector<OnTimeRate> out;
  for (auto& [key, g] : groups) {
    g.at_local = key.second;
    g.rate = static_cast<double>(g.on_time) / g.days;
    g.interval = *wilson_interval(g.on_time, g.days);
    out.push_back(g);
  }
  return out;
}

std::optional<WeakestLink> weakest_link(const Plan& plan, const Evaluation& ev) {
  std::vector<int> count(plan.nodes.size(), 0);
  int failing = 0;
  for (const RunResult& run : ev.runs) {
    if (run.status != RunStatus::fail) continue;
    ++failing;
    std::vector<int> fronts;
    for (const FeatureResult& f : run.features) {
      if (f.optional || f.status == FeatureStatus::ok) continue;
      int front = ev.chain(f).front();
      if (std::find(fronts.begin(), fronts.end(), front) == fronts.end()) fronts.push_back(front);
    }
    for (int n : fronts) ++count[static_cast<size_t>(n)];
  }
  if (failing == 0) return std::nullopt;
  WeakestLink w;
  w.total_failing_runs = failing;
  for (size_t n = 0; n < count.size(); ++n) {
    if (count[n] > w.failing_runs) w.failing_runs = count[n], w.node = static_cast<int>(n);
  }
  return w;
}

// Per node: the smallest slack among ok features whose chain starts at the
// node, in the latest run that has such a feature.
std::vector<std::optional<int64_t>> current_slack(const Plan& plan, const Evaluation& ev) {
  std::vector<std::optional<int64_t>> slack(plan.nodes.size());
  std::vector<size_t> found_in(plan.nodes.size(), SIZE_MAX);
  for (size_t r = ev.runs.size(); r-- > 0;) {
    for (const FeatureResult& f : ev.runs[r].features) {
      if (f.status != FeatureStatus::ok) continue;
      const size_t front = static_cast<size_t>(ev.chain(f).front());
      if (found_in[front] != SIZE_MAX && found_in[front] != r) continue;
      found_in[front] = r;
      slack[front] = slack[front] ? std::min(*slack[front], f.slack_seconds) : f.slack_seconds;
    }
  }
  return slack;
}

// The instant a node's next delivery after `after` was due by its declared
// timing: its schedule's (or cron trigger's) next occurrence plus lands_after
// and run_time; nullopt when it has no schedule of its own or none follows.
std::optional<Instant> next_due(const Plan& plan, const Node& node, Instant after) {
  const std::optional<Cron>& cron = node.schedule ? node.schedule : node.trigger;
  if (!cron || !node.zone) return std::nullopt;
  std::optional<Instant> next = next_occurrence(*cron, *node.zone, plan.calendar(node.calendar), after + Seconds(1));
  if (!next) return std::nullopt;
  return *next + Seconds(node.lands_after.seconds) + Seconds(node.run_time.seconds);
}

void find_silent(const Plan& plan, const History& history, NightlyReport* report) {
  report->last_landed.assign(plan.nodes.size(), std::nullopt);
  const Instant quiet_from = report->as_of - Seconds(int64_t{kSilentDays} * kSecondsPerDay);
  for (size_t n = 0; n < plan.nodes.size() && n < history.size(); ++n) {
    if (!history[n]) continue;
    std::optional<Instant>& last = report->last_landed[n];
    for (const StoredLanding& l : *history[n]) {
      if (l.landed_at <= report->as_of && (!last || l.landed_at > *last)) last = l.landed_at;
    }
    if (last && *last > quiet_from) continue;
    const Node& node = plan.nodes[n];
    const bool scheduled = node.schedule || node.trigger;
    if (scheduled) {
      std::optional<Instant> due = next_due(plan, node, last ? *last : quiet_from);
      if (!due || *due > report->as_of) continue;
    }
    report->silent.push_back({static_cast<int>(n), last});
  }
}

}  // namespace

std::string local_run_time(Instant t, const Zone& zone) {
  LocalTime local = zone.to_local(t);
  auto since_midnight = local - date::floor<date::days>(local);
  int64_t minutes = std::chrono::duration_cast<std::chrono::minutes>(since_midnight).count();
  char buffer[8];
  std::snprintf(buffer, sizeof buffer, "%02d:%02d", static_cast<int>(minutes / 60), static_cast<int>(minutes % 60));
  return buffer;
}

bool NightlyReport::ok() const {
  return std::none_of(today.begin(), today.end(),
                      [&](size_t i) { return evaluation.runs[i].status == RunStatus::fail; });
}

std::vector<ChainLanding> NightlyReport::chain_landings(const FeatureResult& f) const {
  std::vector<ChainLanding> out;
  for (int n : evaluation.chain(f)) {
    out.push_back({n, evaluation.ready(n, f.needs_data_through), monitored[static_cast<size_t>(n)]});
  }
  return out;
}

Instant history_needed_since(const Plan& plan, LocalDays date, int window) {
  LocalDays from = date - date::days(window - 1);
  // Two days of margin, and room to see the last kSilentDays days before
  // the first date: a landing then may hold data from a day earlier.
  const int64_t margin = std::max<int64_t>(2, kSilentDays + 1) * kSecondsPerDay;
  return plan.zone->from_local(LocalTime(from.time_since_epoch())) - Seconds(margin) -
         Seconds(max_feature_age(plan)) - Seconds(max_data_lag(plan));
}

NightlyReport evaluate_nightly(const Plan& plan, const History& history,
                               const std::vector<std::optional<Instant>>& first_data_through, LocalDays date,
                               int window) {
  NightlyReport report;
  report.date = date;
  report.window = window;
  report.window_from = window_start(plan, first_data_through, date, window);
  report.monitored.assign(plan.nodes.size(), false);
  ObservedDeliveries observed(plan.nodes.size());
  for (size_t n = 0; n < plan.nodes.size() && n < history.size(); ++n) {
    if (!history[n]) continue;
    report.monitored[n] = true;
    std::vector<Delivery>& deliveries = observed[n].emplace();
    for (const StoredLanding& l : *history[n]) {
      if (l.status == LandingStatus::ok) deliveries.push_back({l.landed_at, l.data_through});
    }
  }
  for (size_t n = 0; n < plan.nodes.size(); ++n) {
    if (plan.nodes[n].kind == NodeKind::source && !report.monitored[n]) report.unmonitored.push_back(static_cast<int>(n));
  }
  const int days = static_cast<int>((date - report.window_from).count()) + 1;
  report.evaluation = evaluate(plan, report.window_from, days, &observed);
  for (size_t i = 0; i < report.evaluation.runs.size(); ++i) {
    const RunResult& run = report.evaluation.runs[i];
    if (local_date(*plan.models[static_cast<size_t>(run.model)].zone, run.at) == date) report.today.push_back(i);
  }
  report.as_of = plan.zone->from_local(LocalTime((date + date::days(1)).time_since_epoch())) - Seconds(1);
  if (!report.today.empty()) {
    report.as_of = report.evaluation.runs[report.today.front()].at;
    for (size_t i : report.today) report.as_of = std::max(report.as_of, report.evaluation.runs[i].at);
  }
  find_silent(plan, history, &report);
  {
    PatternCollector collector(plan, report.evaluation, &report.monitored);
    collect_runs(report.evaluation, &collector);
    FixFinder finder(collector);
    for (size_t i : report.today) {
      const RunResult& run = report.evaluation.runs[i];
      if (run.status == RunStatus::ok) continue;
      NightlyReport::RunAdvice a;
      a.run = i;
      a.pattern = collector.single_run(run.model, run.at, run.status);
      a.fixes = finder.find(a.pattern);
      report.advice.push_back(std::move(a));
    }
  }
  report.on_time = on_time_rates(plan, report.evaluation);
  report.weakest_link = weakest_link(plan, report.evaluation);
  const std::vector<std::optional<int64_t>> slack = current_slack(plan, report.evaluation);
  const Instant window_from = plan.zone->from_local(LocalTime(report.window_from.time_since_epoch()));
  const Instant window_to = plan.zone->from_local(LocalTime((date + date::days(1)).time_since_epoch()));
  for (size_t n = 0; n < plan.nodes.size(); ++n) {
    if (plan.nodes[n].kind != NodeKind::source || !report.monitored[n]) continue;
    report.drift.push_back(source_drift(plan, static_cast<int>(n), *history[n], window_from, window_to, slack[n]));
  }
  return report;
}

}  // namespace readyby
