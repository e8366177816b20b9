#include "report/html/advice_adapter.h"

#include <algorithm>

#include "engine/blame.h"
#include "engine/fixes.h"
#include "engine/margins.h"
#include "engine/patterns.h"
#include "report/advice_text.h"

namespace readyby::html {

namespace {

// When a step starts: a derived step's start as the blame gives it; a cron
// source's scheduled occurrence (its landing less lands_after); a stream's
// data time.
std::optional<Instant> step_start(const Node& n, const BlameStep& s) {
  if (s.start) return s.start;
  if (!s.ready) return std::nullopt;
  return *s.ready - Seconds(n.kind == NodeKind::source ? n.lands_after.seconds : n.run_time.seconds);
}

ExplainedRun from_blame(const Plan& plan, const Evaluation& ev, size_t run_index, const Blame& b) {
  ExplainedRun e;
  e.run = run_index;
  e.feature = b.feature;
  e.needs_data_through = b.needs_data_through;
  e.deadline = b.run_at;
  for (const FeatureResult& f : ev.runs[run_index].features) {
    if (f.feature != b.feature) continue;
    e.status = f.status;
    if (f.status != FeatureStatus::never) e.slack_seconds = f.slack_seconds;
  }
  for (size_t i = 0; i < b.steps.size(); ++i) {
    const BlameStep& s = b.steps[i];
    TimelineStep step;
    step.node = s.node;
    step.landed = s.ready;
    step.start = step_start(plan.nodes[static_cast<size_t>(s.node)], s);
    step.latest = s.latest;
    step.stale_start = s.stale_start;
    step.at_fault = static_cast<int>(i) == b.cause;
    e.steps.push_back(step);
  }
  return e;
}

// Index into ev.runs of the run of `model` at `at`, from per-model lists.
class RunIndex {
 public:
  explicit RunIndex(const Plan& plan, const Evaluation& ev) : by_model_(plan.models.size()) {
    for (size_t i = 0; i < ev.runs.size(); ++i) by_model_[static_cast<size_t>(ev.runs[i].model)].push_back({ev.runs[i].at, i});
  }
  size_t of(int model, Instant at) const {
    const auto& list = by_model_[static_cast<size_t>(model)];
    auto it = std::lower_bound(list.begin(), list.end(), at,
                               [](const std::pair<Instant, size_t>& p, Instant t) { return p.first < t; });
    return it == list.end() ? 0 : it->second;
  }

 private:
  std::vector<std::vector<std::pair<Instant, size_t>>> by_model_;
};

PatternFacts from_pattern(const Plan& plan, const Evaluation& ev, const RunIndex& index, const Pattern& p,
                          const FixSearch& search) {
  PatternFacts f;
  f.model = p.model;
  f.status = p.status;
  f.description = describe_pattern(plan, p);
  for (Instant at : p.runs) f.runs.push_back(index.of(p.model, at));
  for (const PatternFeature& pf : p.features) f.features.push_back(pf.feature);
  f.worst = from_blame(plan, ev, index.of(p.model, p.worst_run), p.blame);
  f.fault_node = p.blame.cause_node();
  f.cause = describe_cause(plan, p.blame, plan.models[static_cast<size_t>(p.model)].zone);
  for (const Fix& fix : search.fixes) {
    f.fixes.push_back({describe_fix(plan, p, fix), describe_effect(plan, fix), fix.breaks_others()});
  }
  if (search.fixes.empty()) f.no_fix = describe_no_fix(plan, p, search);
  return f;
}

}  // namespace

ExplainedRun explain_for_timeline(const Plan& plan, const Evaluation& ev, size_t run_index, size_t feature_pos) {
  const RunResult& run = ev.runs[run_index];
  const FeatureResult& f = run.features[feature_pos];
  return from_blame(plan, ev, run_index, blame(plan, ev.engine(), f.feature, f.needs_data_through, run.at));
}

AdviceFacts gather_advice(const Plan& plan, const Evaluation& ev, bool with_margins) {
  AdviceFacts facts;
  PatternCollector collector(plan, ev);
  collect_runs(ev, &collector);
  const std::vector<Pattern> patterns = collector.patterns();
  FixFinder finder(collector);
  RunIndex index(plan, ev);
  for (const Pattern& p : patterns) facts.patterns.push_back(from_pattern(plan, ev, index, p, finder.find(p)));
  if (with_margins) {
    // The backward pass alone: exact by construction (engine/margins.h); the
    // re-evaluation checks that `readyby margins` adds cost a cone
    // re-evaluation per node, too slow for a page of a large plan.
    for (const Margin& m : margins(plan, ev, MarginOptions{MarginOptions::Check::none})) {
      NodeMargin nm;
      nm.margin_seconds = m.seconds;
      if (m.seconds) {
        nm.binding_model = m.binding_model;
        nm.binding_at = m.binding_at;
      }
      facts.margins.push_back(nm);
    }
  }
  return facts;
}

}  // namespace readyby::html
