#pragma once
// The `check --format json` document (DESIGN §5). Keys and their order:
// plan, timezone, from, days, ok, runs[] (model, at, status, features[]
// (feature, optional, needs_data_through, ready_at, slack_seconds, status,
// chain)), findings[] (kind, then feature/source or node, message). Times are
// RFC 3339 with the offset of the model's zone at that instant; ready_at and
// slack_seconds are null for "never". Written as a stream: memory does not
// grow with the number of runs.

#include <ostream>

#include "engine/check.h"
#include "plan/plan.h"

namespace readyby {

void write_check_json(std::ostream& out, const Plan& plan, const Evaluation& ev);

}  // namespace readyby
