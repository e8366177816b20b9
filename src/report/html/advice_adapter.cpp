#include "report/html/advice_adapter.h"

#include <algorithm>
#include <climits>
#include <map>

#include "report/failure_patterns.h"

namespace readyby::html {

namespace {

// When a step starts: a cron source's scheduled occurrence (its landing less
// lands_after), a stream's data time, a job's or feature's start (its landing
// less run_time).
std::optional<Instant> step_start(const Node& n, std::optional<Instant> landed) {
  if (!landed) return std::nullopt;
  int64_t before = n.kind == NodeKind::source ? n.lands_after.seconds : n.run_time.seconds;
  return *landed - Seconds(before);
}

int64_t slack_or_min(const FeatureResult& f) { return f.status == FeatureStatus::never ? INT64_MIN : f.slack_seconds; }

std::string run_day(const Plan& plan, const RunResult& run) {
  return format_local(plan.models[static_cast<size_t>(run.model)].zone->to_local(run.at)).substr(0, 10);
}

// Degraded runs of one model, grouped by which optional features miss and
// where their chains start.
void degraded_patterns(const Plan& plan, const Evaluation& ev, int model, std::vector<PatternFacts>* out) {
  std::vector<std::string> order;
  std::map<std::string, std::vector<size_t>> groups;
  size_t model_runs = 0;
  for (size_t i = 0; i < ev.runs.size(); ++i) {
    const RunResult& run = ev.runs[i];
    if (run.model != model) continue;
    ++model_runs;
    if (run.status != RunStatus::degraded) continue;
    std::string signature;
    for (const FeatureResult& f : run.features) {
      if (f.status == FeatureStatus::ok) continue;
      signature += std::to_string(f.feature) + "<" + std::to_string(ev.chain(f).front()) + ";";
    }
    if (!groups.count(signature)) order.push_back(signature);
    groups[signature].push_back(i);
  }
  for (const std::string& signature : order) {
    const std::vector<size_t>& runs = groups[signature];
    PatternFacts p;
    p.model = model;
    p.status = RunStatus::degraded;
    p.runs = runs;
    size_t worst_run = runs.front(), worst_pos = 0;
    int64_t worst = INT64_MAX;
    for (size_t i : runs) {
      const RunResult& run = ev.runs[i];
      for (size_t k = 0; k < run.features.size(); ++k) {
        const FeatureResult& f = run.features[k];
        if (f.status == FeatureStatus::ok) continue;
        if (i == runs.front()) p.features.push_back(f.feature);
        if (slack_or_min(f) < worst) worst = slack_or_min(f), worst_run = i, worst_pos = k;
      }
    }
    std::string names;
    for (int f : p.features) names += (names.empty() ? "" : ", ") + plan.nodes[static_cast<size_t>(f)].id;
    std::string days;
    size_t shown = 0;
    std::string last_day;
    for (size_t i : runs) {
      std::string d = run_day(plan, ev.runs[i]);
      if (d == last_day) continue;
      last_day = d;
      if (shown++ == 6) {
        days += ", …";
        break;
      }
      days += (days.empty() ? "" : ", ") + d;
    }
    p.description = (runs.size() == model_runs ? "degraded on every run" : "degraded on " + days) +
                    " (optional " + names + " not fresh; " + std::to_string(runs.size()) + " of " +
                    std::to_string(model_runs) + " runs)";
    const RunResult& run = ev.runs[worst_run];
    std::optional<Fix> fix = fix_for(plan, ev, run, run.features[worst_pos]);
    if (fix) {
      p.fault_node = fix->node;
      p.fix = fix->text;
    }
    p.worst = explain_for_timeline(plan, ev, worst_run, worst_pos, p.fault_node);
    out->push_back(std::move(p));
  }
}

PatternFacts from_failure_pattern(const Plan& plan, const Evaluation& ev, const FailurePattern& f) {
  PatternFacts p;
  p.model = f.model;
  p.status = RunStatus::fail;
  p.description = f.description;
  p.runs = f.runs;
  p.features = f.failing_features;
  p.start_later_seconds = f.start_later_seconds;
  p.stale_jobs = f.stale_jobs;
  if (f.fix) {
    p.fault_node = f.fix->node;
    p.fix = f.fix->text;
  }
  // The worst failing feature of the worst run: the one whose chain is the critical chain.
  const RunResult& run = ev.runs[f.worst_run];
  size_t pos = 0;
  int64_t worst = INT64_MAX;
  for (size_t k = 0; k < run.features.size(); ++k) {
    const FeatureResult& fr = run.features[k];
    if (fr.optional || fr.status == FeatureStatus::ok) continue;
    if (slack_or_min(fr) < worst) worst = slack_or_min(fr), pos = k;
  }
  p.worst = explain_for_timeline(plan, ev, f.worst_run, pos, p.fault_node);
  return p;
}

void margins(const Plan& plan, const Evaluation& ev, const std::vector<bool>& mask, std::vector<NodeMargin>* out) {
  out->assign(plan.nodes.size(), NodeMargin{});
  for (const RunResult& run : ev.runs) {
    if (run.status != RunStatus::ok) continue;
    for (const FeatureResult& f : run.features) {
      if (!mask[static_cast<size_t>(f.feature)]) continue;
      for (const ChainStep& s : explain_chain(plan, ev, f, run.at)) {
        if (!mask[static_cast<size_t>(s.node)] || !s.ready || !s.latest) continue;
        int64_t headroom = (*s.latest - *s.ready).count();
        NodeMargin& m = (*out)[static_cast<size_t>(s.node)];
        if (!m.margin_seconds || headroom < *m.margin_seconds) {
          m.margin_seconds = headroom;
          m.binding_model = run.model;
          m.binding_at = run.at;
        }
      }
    }
  }
}

}  // namespace

ExplainedRun explain_for_timeline(const Plan& plan, const Evaluation& ev, size_t run_index, size_t feature_pos,
                                  int fault_node) {
  const RunResult& run = ev.runs[run_index];
  const FeatureResult& f = run.features[feature_pos];
  ExplainedRun e;
  e.run = run_index;
  e.feature = f.feature;
  e.needs_data_through = f.needs_data_through;
  e.deadline = run.at;
  e.status = f.status;
  if (f.status != FeatureStatus::never) e.slack_seconds = f.slack_seconds;
  for (const ChainStep& s : explain_chain(plan, ev, f, run.at)) {
    TimelineStep step;
    step.node = s.node;
    step.landed = s.ready;
    step.start = step_start(plan.nodes[static_cast<size_t>(s.node)], s.ready);
    step.latest = s.latest;
    step.stale_start = s.stale_start;
    step.at_fault = s.node == fault_node;
    e.steps.push_back(step);
  }
  return e;
}

AdviceFacts gather_advice(const Plan& plan, const Evaluation& ev, const std::vector<bool>* margins_for) {
  AdviceFacts facts;
  std::vector<FailurePattern> failing = failure_patterns(plan, ev);
  for (size_t m = 0; m < plan.models.size(); ++m) {
    for (const FailurePattern& f : failing) {
      if (f.model == static_cast<int>(m)) facts.patterns.push_back(from_failure_pattern(plan, ev, f));
    }
    degraded_patterns(plan, ev, static_cast<int>(m), &facts.patterns);
  }
  if (margins_for) margins(plan, ev, *margins_for, &facts.margins);
  return facts;
}

}  // namespace readyby::html
