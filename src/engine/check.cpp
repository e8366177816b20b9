#include "engine/check.h"

#include <algorithm>
#include <map>

namespace readyby {

const char* to_string(FeatureStatus s) {
  switch (s) {
    case FeatureStatus::ok: return "ok";
    case FeatureStatus::late: return "late";
    case FeatureStatus::never: return "never";
  }
  return "?";
}

const char* to_string(RunStatus s) {
  switch (s) {
    case RunStatus::ok: return "ok";
    case RunStatus::degraded: return "degraded";
    case RunStatus::fail: return "fail";
  }
  return "?";
}


std::vector<Instant> run_instants(const Plan& plan, const Model& model, LocalDays from, int days) {
  std::vector<Instant> out;
  const LocalDays end = from + date::days(days);
  for (const RunSpec& spec : model.runs) {
    const Calendar& calendar = plan.calendar(spec.calendar);
    Instant search = model.zone->from_local(LocalTime(from.time_since_epoch())) - Seconds(kSecondsPerDay);
    while (true) {
      std::optional<Instant> r = next_occurrence(spec.at, *model.zone, calendar, search);
      if (!r) break;
      LocalDays day = date::floor<date::days>(model.zone->to_local(*r));
      if (day >= end) break;
      if (day >= from) out.push_back(*r);
      search = *r + Seconds(1);
    }
  }
  std::sort(out.begin(), out.end());
  out.erase(std::unique(out.begin(), out.end()), out.end());
  return out;
}

std::vector<Finding> plan_findings(const Plan& plan, const Lineage& lineage) {
  std::vector<Finding> out;
  for (size_t f = 0; f < plan.nodes.size(); ++f) {
    const Node& feature = plan.nodes[f];
    if (feature.kind != NodeKind::feature || !feature.lookback) continue;
    for (int s : lineage.upstream(static_cast<int>(f))) {
      const Node& source = plan.nodes[static_cast<size_t>(s)];
      if (source.kind != NodeKind::source || !source.history) continue;
      if (feature.lookback->seconds <= source.history->seconds) continue;
      Finding finding;
      finding.kind = "lookback";
      finding.feature = static_cast<int>(f);
      finding.source = s;
      finding.message = "feature '" + feature.id + "' looks back " + format_duration(*feature.lookback) +
                        " but its upstream source '" + source.id + "' keeps only " +
                        format_duration(*source.history) + " of history";
      out.push_back(std::move(finding));
    }
  }
  std::vector<int> model_features;
  for (const Model& m : plan.models) model_features.insert(model_features.end(), m.features.begin(), m.features.end());
  std::vector<bool> used = lineage.upstream_mask(model_features);
  for (size_t n = 0; n < plan.nodes.size(); ++n) {
    if (used[n]) continue;
    const Node& node = plan.nodes[n];
    Finding finding;
    finding.kind = "unused";
    finding.node = static_cast<int>(n);
    finding.message = std::string(to_string(node.kind)) + " '" + node.id + "' feeds no model" +
                      (node.kind == NodeKind::feature ? " (no model lists it)" : "");
    out.push_back(std::move(finding));
  }
  return out;
}

namespace {

using PendingRun = Evaluation::PendingRun;

}  // namespace

// One run, every feature: needs_data_through, ready_at, slack, status.
RunResult evaluate_run(const Plan& plan, const FreshnessEngine& engine, int model_index, Instant at) {
  const Model& model = plan.models[static_cast<size_t>(model_index)];
  RunResult run;
  run.model = model_index;
  run.at = at;
  run.features.reserve(model.features.size());
  bool fail = false, degraded = false;
  for (int f : model.features) {
    const Node& feature = plan.nodes[static_cast<size_t>(f)];
    FeatureResult fr;
    fr.feature = f;
    fr.optional = feature.optional;
    fr.needs_data_through = at - Seconds(feature.max_age.seconds);
    fr.ready_at = engine.ready(f, fr.needs_data_through);
    if (!fr.ready_at) {
      fr.status = FeatureStatus::never;
    } else {
      fr.slack_seconds = (at - *fr.ready_at).count();
      fr.status = fr.slack_seconds >= 0 ? FeatureStatus::ok : FeatureStatus::late;
    }
    if (fr.status != FeatureStatus::ok) (feature.optional ? degraded : fail) = true;
    run.features.push_back(fr);
  }
  run.status = fail ? RunStatus::fail : degraded ? RunStatus::degraded : RunStatus::ok;
  return run;
}

std::pair<int64_t, int64_t> query_range(const Plan& plan, const std::vector<std::pair<int, Instant>>& runs) {
  int64_t w_lo = INT64_MAX, w_hi = INT64_MIN;
  for (const auto& [model, at] : runs) {
    for (int f : plan.models[static_cast<size_t>(model)].features) {
      int64_t w = to_unix(at) - plan.nodes[static_cast<size_t>(f)].max_age.seconds;
      w_lo = std::min(w_lo, w);
      w_hi = std::max(w_hi, w);
    }
  }
  if (w_lo > w_hi) w_lo = w_hi = 0;
  return {w_lo, w_hi + kLaterStartSearch};
}

namespace {

Evaluation evaluate_runs(const Plan& plan, std::vector<PendingRun> pending, const ObservedDeliveries* observed,
                         bool store) {
  Evaluation ev;
  ev.plan_ = &plan;
  std::sort(pending.begin(), pending.end(), [&](const PendingRun& a, const PendingRun& b) {
    if (a.at != b.at) return a.at < b.at;
    return plan.models[static_cast<size_t>(a.model)].id < plan.models[static_cast<size_t>(b.model)].id;
  });
  ev.lineage_ = std::make_unique<Lineage>(Lineage::of(plan));
  std::vector<int> model_features;
  for (const Model& m : plan.models) model_features.insert(model_features.end(), m.features.begin(), m.features.end());
  std::vector<bool> needed = ev.lineage_->upstream_mask(model_features);

  std::vector<std::pair<int, Instant>> instants;
  instants.reserve(pending.size());
  for (const PendingRun& p : pending) instants.emplace_back(p.model, p.at);
  auto [w_lo, w_hi] = query_range(plan, instants);
  ev.engine_ = std::make_unique<FreshnessEngine>(plan, *ev.lineage_, needed, from_unix(w_lo), from_unix(w_hi),
                                                 observed);
  if (store) ev.runs.reserve(pending.size());
  for (const PendingRun& p : pending) {
    if (!store && ev.failed_) break;  // a lazy evaluation only needs to know whether some run fails
    RunResult run = evaluate_run(plan, *ev.engine_, p.model, p.at);
    ev.failed_ = ev.failed_ || run.status == RunStatus::fail;
    if (store) ev.runs.push_back(std::move(run));
  }
  if (!store) ev.pending_ = std::move(pending);
  ev.findings = plan_findings(plan, *ev.lineage_);
  return ev;
}

std::vector<PendingRun> runs_in_window(const Plan& plan, LocalDays from, int days) {
  std::vector<PendingRun> pending;
  for (size_t m = 0; m < plan.models.size(); ++m) {
    for (Instant at : run_instants(plan, plan.models[m], from, days)) pending.push_back({static_cast<int>(m), at});
  }
  return pending;
}

}  // namespace

RunResult Evaluation::pending_run(size_t i) const {
  return evaluate_run(*plan_, *engine_, pending_[i].model, pending_[i].at);
}

RunResult Evaluation::run_at(int model, Instant at) const { return evaluate_run(*plan_, *engine_, model, at); }

Evaluation evaluate(const Plan& plan, LocalDays from, int days, const ObservedDeliveries* observed) {
  Evaluation ev = evaluate_runs(plan, runs_in_window(plan, from, days), observed, true);
  ev.from = from;
  ev.days = days;
  return ev;
}

Evaluation evaluate_lazily(const Plan& plan, LocalDays from, int days) {
  Evaluation ev = evaluate_runs(plan, runs_in_window(plan, from, days), nullptr, false);
  ev.from = from;
  ev.days = days;
  return ev;
}

Evaluation evaluate_single(const Plan& plan, int model, Instant at) {
  Evaluation ev = evaluate_runs(plan, {{model, at}}, nullptr, true);
  ev.from = date::floor<date::days>(plan.models[static_cast<size_t>(model)].zone->to_local(at));
  ev.days = 1;
  return ev;
}

}  // namespace readyby
