#include "intake/timing.h"

#include <algorithm>

#include "engine/fixes.h"
#include "engine/patterns.h"
#include "report/advice_text.h"

namespace readyby {

const char* to_string(TimingVerdict v) {
  switch (v) {
    case TimingVerdict::on_time: return "on-time";
    case TimingVerdict::at_risk: return "at-risk";
    case TimingVerdict::infeasible: return "infeasible";
  }
  return "?";
}

const char* to_string(TimingFix::Kind k) {
  switch (k) {
    case TimingFix::Kind::land_earlier: return "land-earlier";
    case TimingFix::Kind::move_start: return "move-start";
    case TimingFix::Kind::start_later: return "start-later";
  }
  return "?";
}

namespace {

std::vector<std::string> node_ids(const Plan& plan, const std::vector<int>& nodes) {
  std::vector<std::string> out;
  for (int n : nodes) out.push_back(plan.nodes[static_cast<size_t>(n)].id);
  return out;
}

TimingFix timing_fix(const Plan& plan, const Pattern& p, const Fix& fix) {
  TimingFix out;
  out.kind = fix.kind == FixKind::land_earlier ? TimingFix::Kind::land_earlier
             : fix.kind == FixKind::move_start ? TimingFix::Kind::move_start
                                               : TimingFix::Kind::start_later;
  out.node = fix.node >= 0 ? plan.nodes[static_cast<size_t>(fix.node)].id : plan.models[static_cast<size_t>(p.model)].id;
  out.seconds = fix.seconds;
  out.text = describe_fix(plan, p, fix);
  out.effect = describe_effect(plan, fix);
  out.edit = edit_text(plan, fix.edit);
  out.breaks_others = fix.breaks_others();
  return out;
}

TimingPattern summarise_pattern(const Plan& plan, const Pattern& p, const FixSearch& search) {
  TimingPattern out;
  out.description = describe_pattern(plan, p);
  out.degraded = p.status == RunStatus::degraded;
  out.runs = p.runs.size();
  std::vector<int> features;
  for (const PatternFeature& f : p.features) features.push_back(f.feature);
  out.failing_features = node_ids(plan, features);
  std::vector<int> chain;
  for (const BlameStep& s : p.blame.steps) chain.push_back(s.node);
  out.chain = node_ids(plan, chain);
  out.cause = describe_cause(plan, p.blame, plan.models[static_cast<size_t>(p.model)].zone);
  for (const Fix& fix : search.fixes) {
    if (fix.kind == FixKind::start_later) {
      if (!out.later_start) out.later_start = timing_fix(plan, p, fix);
    } else if (!out.data_fix) {
      out.data_fix = timing_fix(plan, p, fix);
    }
  }
  if (search.fixes.empty()) out.no_fix = describe_no_fix(plan, p, search);
  if (out.data_fix && (!out.later_start || out.data_fix->seconds <= out.later_start->seconds)) {
    out.cheapest = out.data_fix;
  } else {
    out.cheapest = out.later_start;
  }
  return out;
}

}  // namespace

TimingSummary summarise_timing(const Plan& plan, int model, const Evaluation& ev) {
  TimingSummary out;
  out.model = plan.models[static_cast<size_t>(model)].id;
  PatternCollector collector(plan, ev);
  collect_runs(ev, &collector);
  const ModelSummary& s = collector.summaries()[static_cast<size_t>(model)];
  out.runs = s.runs;
  out.ok = s.ok;
  out.degraded = s.degraded;
  out.failed = s.failed;
  out.tightest_slack_seconds = s.tightest_required_seconds;
  out.tightest_at = s.tightest_required_at;
  out.tightest_optional_seconds = s.tightest_optional_seconds;
  out.degraded_features = node_ids(plan, s.degraded_features);
  out.verdict = out.ok == out.runs                     ? TimingVerdict::on_time
                : out.failed == out.runs && out.runs > 0 ? TimingVerdict::infeasible
                                                         : TimingVerdict::at_risk;
  FixFinder finder(collector);
  for (const Pattern& p : collector.patterns()) {
    if (p.model == model) out.patterns.push_back(summarise_pattern(plan, p, finder.find(p)));
  }
  std::stable_sort(out.patterns.begin(), out.patterns.end(), [](const TimingPattern& a, const TimingPattern& b) {
    if (a.degraded != b.degraded) return !a.degraded;
    return a.runs > b.runs;
  });
  return out;
}

}  // namespace readyby
