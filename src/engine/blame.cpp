#include "engine/blame.h"

#include <algorithm>

namespace readyby {

const char* to_string(CauseKind k) {
  switch (k) {
    case CauseKind::none: return "none";
    case CauseKind::never: return "never";
    case CauseKind::late_delivery: return "late-delivery";
    case CauseKind::stale_start: return "stale-start";
    case CauseKind::late_start: return "late-start";
    case CauseKind::slow_step: return "slow-step";
  }
  return "?";
}

std::optional<LocalTime> gap_nominal(const Cron& cron, const Zone& zone, Instant c) {
  // A gap time read with the offset before the gap lands (gap length) after
  // its wall-clock reading: look back up to three hours for a matching
  // minute of the schedule that maps to the same instant.
  const LocalTime actual = zone.to_local(c);
  for (int back = 1; back <= 180; ++back) {
    const LocalTime l = actual - Seconds(back * 60);
    const auto day = date::floor<date::days>(l);
    const int minute_of_day = static_cast<int>((l - day).count() / 60);
    if (!((cron.hours >> (minute_of_day / 60)) & 1) || !((cron.minutes >> (minute_of_day % 60)) & 1)) continue;
    if (zone.from_local(l) == c) return l;
  }
  return std::nullopt;
}

namespace {

bool is_monitored(const std::vector<bool>* monitored, int node) {
  return monitored && static_cast<size_t>(node) < monitored->size() && (*monitored)[static_cast<size_t>(node)];
}

// Backward pass: the latest landing of each step that keeps the run on time.
void backward_pass(const Plan& plan, std::vector<BlameStep>* steps, Instant run_at,
                   const std::vector<bool>* monitored) {
  std::optional<Instant> latest = run_at;
  for (size_t i = steps->size(); i-- > 0;) {
    BlameStep& s = (*steps)[i];
    s.latest = latest;
    const Node& node = plan.nodes[static_cast<size_t>(s.node)];
    if (!latest || node.kind == NodeKind::source || is_monitored(monitored, s.node)) {
      latest.reset();
      continue;
    }
    const Instant start_by = *latest - Seconds(node.run_time.seconds);
    s.start_by = start_by;
    latest = node.trigger ? previous_occurrence(*node.trigger, *node.zone, plan.calendar(node.calendar), start_by)
                          : std::optional<Instant>(start_by);
  }
}

}  // namespace

Blame blame(const Plan& plan, const FreshnessEngine& engine, int feature, Instant w, Instant run_at,
            const std::vector<bool>* monitored) {
  Blame out;
  out.needs_data_through = w;
  out.run_at = run_at;
  out.feature = feature;
  const std::vector<int> chain = engine.chain(feature, w);
  out.steps.resize(chain.size());
  for (size_t i = 0; i < chain.size(); ++i) {
    BlameStep& s = out.steps[i];
    s.node = chain[i];
    s.ready = engine.ready(chain[i], w);
    const Node& node = plan.nodes[static_cast<size_t>(s.node)];
    s.recorded = is_monitored(monitored, s.node);
    if (i > 0 && !s.recorded) {
      s.input_ready = out.steps[i - 1].ready;
      if (s.ready) s.start = *s.ready - Seconds(node.run_time.seconds);
    }
  }
  backward_pass(plan, &out.steps, run_at, monitored);

  // Step facts: stale starts, gap shifts, own and waited lateness.
  for (size_t i = 0; i < out.steps.size(); ++i) {
    BlameStep& s = out.steps[i];
    const Node& node = plan.nodes[static_cast<size_t>(s.node)];
    const bool leaf = i == 0 || is_monitored(monitored, s.node);
    if (!is_monitored(monitored, s.node)) {
      if (node.trigger && s.start) {
        s.gap_nominal = gap_nominal(*node.trigger, *node.zone, *s.start);
        if (s.input_ready && s.start_by) {
          // A start that could have served the run, had its input been there.
          const Instant before = std::min(*s.input_ready - Seconds(1), *s.start_by);
          auto stale = previous_occurrence(*node.trigger, *node.zone, plan.calendar(node.calendar), before);
          if (stale && *stale >= w) s.stale_start = stale;
        }
      } else if (node.kind == NodeKind::source && node.schedule && s.ready) {
        s.gap_nominal = gap_nominal(*node.schedule, *node.zone, *s.ready - Seconds(node.lands_after.seconds));
      }
    }
    s.deadline_before_data = !s.latest || *s.latest < w;
    if (!s.ready || !s.latest || *s.ready <= *s.latest) continue;
    const int64_t late = (*s.ready - *s.latest).count();
    if (leaf) {
      if (!s.deadline_before_data) s.own_late_seconds = late;
      continue;
    }
    const BlameStep& input = out.steps[i - 1];
    const bool input_in_time_for_start = s.input_ready && s.start_by && *s.input_ready <= *s.start_by;
    if (input.deadline_before_data || (node.trigger && input_in_time_for_start)) {
      s.own_late_seconds = late;
    } else {
      s.waited_seconds = late;
    }
  }

  // The cause.
  const std::optional<Instant>& feature_ready = out.steps.back().ready;
  if (!feature_ready) {
    for (size_t i = 0; i < out.steps.size(); ++i) {
      if (!out.steps[i].ready) {
        out.cause = static_cast<int>(i);
        out.kind = CauseKind::never;
        break;
      }
    }
    return out;
  }
  if (*feature_ready <= run_at) return out;
  for (size_t i = out.steps.size(); i-- > 0;) {
    const BlameStep& s = out.steps[i];
    if (s.own_late_seconds <= 0) continue;
    out.cause = static_cast<int>(i);
    const Node& node = plan.nodes[static_cast<size_t>(s.node)];
    if (i == 0 || is_monitored(monitored, s.node)) out.kind = CauseKind::late_delivery;
    else if (node.trigger) out.kind = s.stale_start ? CauseKind::stale_start : CauseKind::late_start;
    else out.kind = CauseKind::slow_step;
    break;
  }
  return out;
}

}  // namespace readyby
