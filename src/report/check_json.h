#pragma once
// The `check --format json` document (DESIGN §5). Keys and their order:
// plan, timezone, from, days, ok, runs[] (model, at, status, features[]
// (feature, optional, needs_data_through, ready_at, slack_seconds, status,
// chain)), findings[] (kind, then feature/source or node, message), then
// patterns[] (added after DESIGN §5's keys, which do not change). Times are
// RFC 3339 with the offset of the model's zone at that instant; ready_at and
// slack_seconds are null for "never". Written as a stream: runs are written as
// they are computed and only the runs that are not ok are remembered.
//
// A pattern (engine/patterns.h, engine/fixes.h):
//   {model, status (fail | degraded), kind (every-run | weekday | span |
//    daylight-saving | dates), description (the text report's sentence),
//    runs[] (RFC 3339), dates[] (local dates of its runs), weekday (name or
//    null), [weekday_runs], span ({first, last, runs_in_span, weekdays[],
//    from_window_start, to_window_end} or null), daylight_saving_changes[]
//    ({zone, at, offset_before_seconds, offset_after_seconds, bound: start |
//    end | day}), steady_zones[], features[] ({feature, never,
//    worst_late_seconds}), worst_run, cause ({feature, node, kind
//    (late-delivery | stale-start | late-start | slow-step | never), text,
//    chain[] (steps as in `check --run --format json`)} or null), fixes[]
//    ({kind (land-earlier | move-start | start-later), node (null for
//    start-later), seconds, edit ({kind: delay | schedule | runs, node or
//    model, seconds (delay, negative: earlier) or cron, text}), [from_cron],
//    before, after, text, effect ({pattern_runs, pattern_runs_ok (always true:
//    a fix is shown only when it clears its pattern), runs_rechecked,
//    breaks_others, changed[] ({model, at, before, after}), text})}),
//    no_fix (null when a fix is found, else {reason (never | causes-apart |
//    none-found), text})}

#include <ostream>

#include "engine/check.h"
#include "engine/fixes.h"
#include "engine/patterns.h"
#include "plan/plan.h"

namespace readyby {

void write_check_json(std::ostream& out, const Plan& plan, const Evaluation& ev);

/// Pieces shared with the other JSON writers: a pattern object (above), the
/// `"fixes": [...], "no_fix": ...` keys of a fix search, and the steps of a
/// blame as a JSON array.
std::string pattern_json(const Plan& plan, const Pattern& p, const FixSearch& search);
std::string fix_keys_json(const Plan& plan, const Pattern& p, const FixSearch& search);
std::string blame_steps_json(const Plan& plan, const Blame& b, const Zone* zone);

}  // namespace readyby
