#include "engine/explain.h"

namespace readyby {

RunExplanation explain_run(const Plan& plan, int model, Instant at, int days) {
  RunExplanation out;
  const Model& m = plan.models[static_cast<size_t>(model)];
  for (const RunSpec& spec : m.runs) {
    const Calendar& calendar = plan.calendar(spec.calendar);
    std::optional<Instant> before = previous_occurrence(spec.at, *m.zone, calendar, at - Seconds(1));
    std::optional<Instant> after = next_occurrence(spec.at, *m.zone, calendar, at + Seconds(1));
    if (before && (!out.previous_run || *before > *out.previous_run)) out.previous_run = before;
    if (after && (!out.next_run || *after < *out.next_run)) out.next_run = after;
  }
  out.scheduled = false;
  for (const RunSpec& spec : m.runs) {
    std::optional<Instant> next = next_occurrence(spec.at, *m.zone, plan.calendar(spec.calendar), at);
    if (next && *next == at) out.scheduled = true;
  }

  const LocalDays day = date::floor<date::days>(m.zone->to_local(at));
  out.window_from = day - date::days(days / 2);
  out.window_days = days;
  Evaluation ev = evaluate_lazily(plan, out.window_from, days);
  PatternCollector collector(plan, ev);
  collect_runs(ev, &collector);
  out.run = ev.run_at(model, at);
  for (const FeatureResult& f : out.run.features) {
    out.blames.push_back(blame(plan, ev.engine(), f.feature, f.needs_data_through, at));
  }
  if (out.run.status != RunStatus::ok) {
    out.pattern = collector.single_run(model, at, out.run.status);
    FixFinder finder(collector);
    out.fixes = finder.find(*out.pattern);
  }
  return out;
}

}  // namespace readyby
