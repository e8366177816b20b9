#include "intake/timing.h"

#include <algorithm>

#include "report/failure_patterns.h"

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

TimingPattern summarise_pattern(const Plan& plan, const FailurePattern& p) {
  TimingPattern out;
  out.description = p.description;
  out.runs = p.runs.size();
  out.failing_features = node_ids(plan, p.failing_features);
  out.chain = node_ids(plan, p.critical_chain);
  if (p.fix && p.fix->seconds > 0) {
    TimingFix fix;
    fix.kind = p.fix->move_start ? TimingFix::Kind::move_start : TimingFix::Kind::land_earlier;
    fix.node = plan.nodes[static_cast<size_t>(p.fix->node)].id;
    fix.seconds = p.fix->seconds;
    fix.text = p.fix->text;
    out.data_fix = std::move(fix);
  }
  if (p.start_later_seconds) {
    const std::string& model = plan.models[static_cast<size_t>(p.model)].id;
    TimingFix later;
    later.kind = TimingFix::Kind::start_later;
    later.node = model;
    later.seconds = *p.start_later_seconds;
    later.text = "start the runs of '" + model + "' " + human_duration(later.seconds) + " later" +
                 (p.runs.size() > 1 ? " (enough for every run of this pattern)" : "");
    out.later_start = std::move(later);
  }
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
  for (const RunResult& run : ev.runs) {
    if (run.model != model) continue;
    ++out.runs;
    (run.status == RunStatus::ok ? out.ok : run.status == RunStatus::degraded ? out.degraded : out.failed)++;
    for (const FeatureResult& f : run.features) {
      const std::string& id = plan.nodes[static_cast<size_t>(f.feature)].id;
      if (f.optional && f.status != FeatureStatus::ok &&
          std::find(out.degraded_features.begin(), out.degraded_features.end(), id) == out.degraded_features.end()) {
        out.degraded_features.push_back(id);
      }
      if (f.optional || f.status == FeatureStatus::never) continue;
      if (!out.tightest_slack_seconds || f.slack_seconds < *out.tightest_slack_seconds) {
        out.tightest_slack_seconds = f.slack_seconds;
        out.tightest_at = run.at;
      }
    }
  }
  out.verdict = out.ok == out.runs                     ? TimingVerdict::on_time
                : out.failed == out.runs && out.runs > 0 ? TimingVerdict::infeasible
                                                         : TimingVerdict::at_risk;
  for (const FailurePattern& p : failure_patterns(plan, ev)) {
    if (p.model == model) out.patterns.push_back(summarise_pattern(plan, p));
  }
  std::stable_sort(out.patterns.begin(), out.patterns.end(),
                   [](const TimingPattern& a, const TimingPattern& b) { return a.runs > b.runs; });
  return out;
}

}  // namespace readyby
