#pragma once
// The `check` text report, for a person deciding what to fix: per model a
// summary (runs ok / degraded / failed, tightest slack), the failing runs
// grouped into patterns with the chain that made them late and the fix, then
// the plan-wide findings. And the step-by-step explanation of one run.

#include <ostream>

#include "engine/check.h"
#include "plan/plan.h"

namespace readyby {

struct TextStyle {
  bool colour = false;  // ANSI colours (only on a terminal, never with NO_COLOR)
};

void write_check_text(std::ostream& out, const Plan& plan, const Evaluation& ev, TextStyle style);

/// Explains run `ev.runs[0]` feature by feature: needed data-through, the
/// chain with each node's landing time, the latest landing that keeps the
/// run on time, and the slack at each step.
void write_run_explanation_text(std::ostream& out, const Plan& plan, const Evaluation& ev, TextStyle style);
/// The same as JSON: the run object of `check --format json`, each feature
/// with a "steps" array (node, kind, ready_at, latest, slack_seconds).
void write_run_explanation_json(std::ostream& out, const Plan& plan, const Evaluation& ev);

/// "2026-03-08 06:00 -05:00": a wall-clock reading in `zone` with its offset.
std::string local_with_offset(Instant t, const Zone* zone);

}  // namespace readyby
