#pragma once
// One run explained (`check --run`): every feature with its blame, whether
// the instant is a scheduled run of the model at all (and if not, the
// nearest scheduled runs either side), and — when the run is not ok — its
// verified fixes, with their effect on the other runs of a window around it.
// Pure computation; the writers render it.

#include <optional>
#include <vector>

#include "engine/blame.h"
#include "engine/check.h"
#include "engine/fixes.h"
#include "engine/patterns.h"
#include "plan/plan.h"

namespace readyby {

struct RunExplanation {
  RunResult run;
  /// False when `run.at` is not an occurrence of any of the model's runs[].at;
  /// then the nearest scheduled runs before and after it (nullopt: none
  /// within 1,462 days).
  bool scheduled = true;
  std::optional<Instant> previous_run, next_run;
  std::vector<Blame> blames;        ///< one per feature, in the model's order
  /// When the run is not ok: the run as a one-run pattern and its fixes.
  std::optional<Pattern> pattern;
  std::optional<FixSearch> fixes;
  /// The window whose runs were re-checked for the fixes' effects (local dates).
  LocalDays window_from;
  int window_days = 0;
};

/// Explains the run of `model` at `at`. The fixes' effects are checked over
/// `days` local dates centred on the run's date (days >= 1).
RunExplanation explain_run(const Plan& plan, int model, Instant at, int days);

}  // namespace readyby
