#include "report/html/page_facts.h"

#include <algorithm>
#include <climits>
#include <cstdint>
#include <set>

#include "history/drift.h"
#include "history/stats.h"

namespace readyby::html {

namespace {

LocalDays local_day(const Zone& zone, Instant t) { return date::floor<date::days>(zone.to_local(t)); }
Instant day_start(const Zone& zone, LocalDays day) { return zone.from_local(LocalTime(day.time_since_epoch())); }

int rank(RunStatus s) { return s == RunStatus::ok ? 0 : s == RunStatus::degraded ? 1 : 2; }

// Per node: the worst status of the runs whose not-fresh feature's chain
// passes through it, and how many such chains there are.
struct NodeRisk {
  std::vector<RunStatus> status;
  std::vector<size_t> late_chains;
};

NodeRisk node_risk(const Plan& plan, const Evaluation& ev) {
  NodeRisk risk{std::vector<RunStatus>(plan.nodes.size(), RunStatus::ok), std::vector<size_t>(plan.nodes.size(), 0)};
  // Walked feature by feature in order of w: neighbouring lookups then touch
  // the same profiles (several times faster on large plans than run order).
  struct Late {
    int feature;
    int64_t w;
    bool optional;
  };
  std::vector<Late> late;
  for (const RunResult& run : ev.runs) {
    for (const FeatureResult& f : run.features) {
      if (f.status != FeatureStatus::ok) late.push_back({f.feature, to_unix(f.needs_data_through), f.optional});
    }
  }
  std::sort(late.begin(), late.end(), [](const Late& a, const Late& b) {
    return a.feature != b.feature ? a.feature < b.feature : a.w < b.w;
  });
  for (const Late& l : late) {
    RunStatus s = l.optional ? RunStatus::degraded : RunStatus::fail;
    for (int n : ev.engine().chain(l.feature, from_unix(l.w))) {
      size_t i = static_cast<size_t>(n);
      if (rank(s) > rank(risk.status[i])) risk.status[i] = s;
      risk.late_chains[i]++;
    }
  }
  return risk;
}

std::vector<std::string> clock_changes(const std::set<const Zone*>& zones, const Zone& model_zone, LocalDays day) {
  std::vector<std::string> out;
  Instant a = day_start(model_zone, day), b = day_start(model_zone, day + date::days(1));
  for (const Zone* z : zones) {
    for (Instant t : z->transitions_in(a - Seconds(1), b - Seconds(1))) {
      int64_t before = z->offset_at(t - Seconds(1)).count(), after = z->offset_at(t).count();
      out.push_back(std::string("clocks ") + (after > before ? "forward " : "back ") +
                    human_duration(after > before ? after - before : before - after) + " in " + z->name());
    }
  }
  return out;
}

ConeFacts cone_of(const Plan& plan, const std::vector<bool>& mask, const std::vector<int>& order,
                  const NodeRisk& risk, const std::vector<NodeMargin>& margins) {
  ConeFacts cone;
  std::vector<int> position(plan.nodes.size(), -1);
  for (int n : order) {
    if (!mask[static_cast<size_t>(n)]) continue;
    position[static_cast<size_t>(n)] = static_cast<int>(cone.nodes.size());
    ConeNode c;
    c.node = n;
    c.status = risk.status[static_cast<size_t>(n)];
    c.late_chains = risk.late_chains[static_cast<size_t>(n)];
    if (!margins.empty()) c.margin = margins[static_cast<size_t>(n)];
    cone.nodes.push_back(c);
    const Node& node = plan.nodes[static_cast<size_t>(n)];
    (node.kind == NodeKind::source ? cone.sources : node.kind == NodeKind::job ? cone.jobs : cone.features)++;
    cone.status_count[rank(c.status)]++;
  }
  for (const ConeNode& c : cone.nodes) {
    for (int input : plan.nodes[static_cast<size_t>(c.node)].inputs) {
      cone.edges.emplace_back(position[static_cast<size_t>(input)], position[static_cast<size_t>(c.node)]);
    }
  }
  cone.summarised = cone.nodes.size() > kMaxDrawnCone;
  return cone;
}

void model_days(const Plan& plan, const Evaluation& ev, const Model& model, int m, const ConeFacts& cone,
                ModelFacts* facts) {
  std::set<const Zone*> zones = {model.zone};
  std::vector<int> calendar_sources;
  for (const ConeNode& c : cone.nodes) {
    const Node& n = plan.nodes[static_cast<size_t>(c.node)];
    zones.insert(n.zone);
    if (n.kind == NodeKind::source && n.calendar >= 0) calendar_sources.push_back(c.node);
  }
  for (int d = 0; d < ev.days; ++d) {
    DayFacts day;
    day.day = ev.from + date::days(d);
    day.clock_changes = clock_changes(zones, *model.zone, day.day);
    for (const RunSpec& spec : model.runs) {
      if (spec.calendar < 0 || !plan.calendar(spec.calendar).skips(day.day)) continue;
      const std::string& name = plan.calendar(spec.calendar).name;
      if (std::find(day.runs_skipped.begin(), day.runs_skipped.end(), name) == day.runs_skipped.end()) {
        day.runs_skipped.push_back(name);
      }
    }
    Instant noon = day_start(*model.zone, day.day) + Seconds(12 * 3600);
    for (int s : calendar_sources) {
      const Node& n = plan.nodes[static_cast<size_t>(s)];
      if (plan.calendar(n.calendar).skips(local_day(*n.zone, noon))) day.feeds_off.push_back(s);
    }
    facts->days.push_back(std::move(day));
  }
  for (size_t i = 0; i < ev.runs.size(); ++i) {
    const RunResult& run = ev.runs[i];
    if (run.model != m) continue;
    (run.status == RunStatus::ok ? facts->ok : run.status == RunStatus::degraded ? facts->degraded : facts->failed)++;
    auto offset = (local_day(*model.zone, run.at) - ev.from).count();
    if (offset >= 0 && offset < ev.days) facts->days[static_cast<size_t>(offset)].runs.push_back(i);
    for (const FeatureResult& f : run.features) {
      if (f.optional || f.status == FeatureStatus::never) continue;
      if (!facts->tightest_slack_seconds || f.slack_seconds < *facts->tightest_slack_seconds) {
        facts->tightest_slack_seconds = f.slack_seconds;
        facts->tightest_run = i;
      }
    }
  }
}

}  // namespace

PageFacts gather_page_facts(const Plan& plan, const Evaluation& ev) {
  PageFacts page;
  page.plan = &plan;
  page.evaluation = &ev;
  std::vector<std::vector<bool>> masks;
  for (const Model& model : plan.models) masks.push_back(ev.lineage_->upstream_mask(model.features));
  page.advice = gather_advice(plan, ev, true);
  NodeRisk risk = node_risk(plan, ev);
  std::vector<int> order = ev.lineage_->topological_order();
  for (size_t m = 0; m < plan.models.size(); ++m) {
    const Model& model = plan.models[m];
    ModelFacts facts;
    facts.model = static_cast<int>(m);
    facts.cone = cone_of(plan, masks[m], order, risk, page.advice.margins);
    model_days(plan, ev, model, static_cast<int>(m), facts.cone, &facts);
    for (size_t p = 0; p < page.advice.patterns.size(); ++p) {
      if (page.advice.patterns[p].model == static_cast<int>(m)) facts.patterns.push_back(p);
    }
    if (facts.patterns.empty() && facts.tightest_run) {
      const RunResult& run = ev.runs[*facts.tightest_run];
      for (size_t k = 0; k < run.features.size(); ++k) {
        const FeatureResult& f = run.features[k];
        if (!f.optional && f.status != FeatureStatus::never && f.slack_seconds == *facts.tightest_slack_seconds) {
          facts.explained = explain_for_timeline(plan, ev, *facts.tightest_run, k);
          break;
        }
      }
    }
    page.models.push_back(std::move(facts));
  }
  return page;
}

HistoryFacts gather_history_facts(const Plan& plan, const NightlyReport& nightly, const History& history) {
  HistoryFacts h;
  h.date = nightly.date;
  h.window_from = nightly.window_from;
  h.window = nightly.window;
  h.day_ok = nightly.ok();
  h.day_runs = nightly.today.size();
  for (size_t i : nightly.today) h.day_failed += nightly.evaluation.runs[i].status == RunStatus::fail;
  h.on_time = nightly.on_time;
  h.unmonitored = nightly.unmonitored;
  h.weakest_link = nightly.weakest_link;
  const Instant from = day_start(*plan.zone, nightly.window_from);
  const Instant to = day_start(*plan.zone, nightly.date + date::days(1));
  for (const SourceDrift& drift : nightly.drift) {
    SourceChart chart;
    chart.source = drift.source;
    chart.drift = drift;
    chart.from = from;
    chart.to = to;
    const std::optional<std::vector<StoredLanding>>& rows = history[static_cast<size_t>(drift.source)];
    for (const StoredLanding& landing : rows ? *rows : std::vector<StoredLanding>{}) {
      if (landing.landed_at < from || landing.landed_at >= to) continue;
      if (landing.status != LandingStatus::ok) {
        ++chart.failed;
        continue;
      }
      if (std::optional<int64_t> offset = landing_offset(plan, drift.source, landing)) {
        chart.points.push_back({landing.landed_at, *offset});
      }
    }
    if (drift.trend_seconds_per_week && !chart.points.empty()) {
      // Sen's intercept: the median of y - slope * x (x measured from `from`).
      double per_second = *drift.trend_seconds_per_week / (7.0 * kSecondsPerDay);
      std::vector<double> residuals;
      for (const OffsetPoint& p : chart.points) {
        residuals.push_back(static_cast<double>(p.offset_seconds) - per_second * static_cast<double>((p.landed_at - from).count()));
      }
      chart.trend_at_from_seconds = percentile(residuals, 0.5);
    }
    h.sources.push_back(std::move(chart));
  }
  return h;
}

}  // namespace readyby::html
