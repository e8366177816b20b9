#pragma once
// The `what-if` report: what the edits of DESIGN §9 change, run by run.
//
// Text, for a person: the edits, then per model the runs whose status
// changes, grouped by transition (e.g. "ok -> fail: 3 runs") with their local
// times, then the before -> after counts of every model.
//
// JSON: one object {"edits": [EDIT...], "after": CHECK, "changed": [CHANGE...]}
// where EDIT is edit_json below, CHECK is the complete `check --format json`
// document of the edited plan (DESIGN §5, write_check_json) and CHANGE is
// {"model", "at" (RFC 3339, model zone), "before", "after"} in run order.

#include <ostream>
#include <string>
#include <vector>

#include "engine/check.h"
#include "engine/edit.h"
#include "plan/plan.h"

namespace readyby {

/// One edit as a JSON object: {"edit": KIND, "target": ID, then "seconds"
/// (delay, max_age) or "cron" (schedule, runs; null for schedule=inputs),
/// "text": the command-line form}.
std::string edit_json(const Plan& plan, const Edit& edit);

struct WhatIfResult {
  const Plan* plan = nullptr;          // the plan as written
  const Plan* edited = nullptr;        // with the edits applied
  std::vector<Edit> edits;
  const Evaluation* before = nullptr;  // runs stored
  const Evaluation* after = nullptr;   // runs stored
  std::vector<StatusChange> changes;
};

void write_what_if_text(std::ostream& out, const WhatIfResult& r);
void write_what_if_json(std::ostream& out, const WhatIfResult& r);

}  // namespace readyby
