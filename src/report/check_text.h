#pragma once
// The `check` text report, for a person deciding what to fix: per model a
// summary (runs ok / degraded / failed, tightest slack of required and of
// optional features), the runs that fail or are degraded grouped into
// patterns with the chain, the cause and the verified fixes (with what else
// each changes), then the plan-wide findings. The runs stream through a
// PatternCollector: a lazy evaluation is computed run by run and only the
// runs that are not ok are remembered. And the step-by-step explanation of
// one run.

#include <ostream>

#include "engine/check.h"
#include "engine/explain.h"
#include "plan/plan.h"

namespace readyby {

struct TextStyle {
  bool colour = false;  // ANSI colours (only on a terminal, never with NO_COLOR)
};

void write_check_text(std::ostream& out, const Plan& plan, const Evaluation& ev, TextStyle style);

/// Explains one run feature by feature: needed data-through, the chain with
/// each step's landing, the latest landing that keeps the run on time, each
/// step's lateness on its own account and from waiting for its input, the
/// cause; a note when the instant is not a scheduled run (with the nearest
/// scheduled runs); and the run's verified fixes.
void write_run_explanation_text(std::ostream& out, const Plan& plan, const RunExplanation& x, TextStyle style);
/// The same as JSON: the run object of `check --format json` plus
/// `scheduled`, `previous_run`, `next_run` (null when scheduled); each feature
/// with "steps" (node, kind, ready_at, latest, slack_seconds, [stale_start,
/// input_ready_at, start, start_by, gap_nominal], deadline_before_data,
/// own_late_seconds, waited_seconds, cause) and "cause" ({node, kind, text} or
/// null); and "fixes" (as in a pattern of `check --format json`, null when
/// the run is ok).
void write_run_explanation_json(std::ostream& out, const Plan& plan, const RunExplanation& x);

/// "2026-03-08 06:00 -05:00": a wall-clock reading in `zone` with its offset.
std::string local_with_offset(Instant t, const Zone* zone);

}  // namespace readyby
