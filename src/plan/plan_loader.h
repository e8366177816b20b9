#pragma once
// Loading a data plan from YAML, with every error reported.
//
// The loader turns a plan file into a Plan (plan.h) or into diagnostics. It
// reports *every* problem it can find in one pass — syntax errors, duplicate
// and unknown keys, wrong types, missing required keys, invalid or repeated
// ids, dangling references, cycles, bad cron expressions, unknown zones and
// calendars, bad durations, schedules that never fire — each at the position
// of the offending key or value. It never computes schedules beyond checking
// that each one fires at least once.

#include <optional>
#include <string>
#include <vector>

#include "plan/plan.h"
#include "util/diagnostics.h"
#include "util/files.h"  // read_file, valid_id

namespace readyby {

struct PlanLoadResult {
  std::optional<Plan> plan;         // set iff `errors` is empty
  std::vector<Diagnostic> errors;   // sorted by position
  /// Problems that do not stop the plan from loading (a legacy zone name such
  /// as EST), sorted by position; a valid plan may have warnings.
  std::vector<Diagnostic> warnings;
  std::string rendered;             // errors and warnings with source lines and carets, for stderr
};

/// Loads the plan in `text`, naming it `path` in diagnostics.
PlanLoadResult load_plan_text(const std::string& text, const std::string& path);
/// Reads and loads the plan file at `path` (an unreadable file is one error).
PlanLoadResult load_plan_file(const std::string& path);

}  // namespace readyby
