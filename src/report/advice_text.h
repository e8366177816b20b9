#pragma once
// Sentences for the advice facts of the engine (engine/patterns.h,
// engine/blame.h, engine/fixes.h), shared by every text writer (check,
// check --run, intake, nightly) and put beside the facts in JSON. Writers
// only: nothing here decides anything.
//
// Times are wall-clock readings in the model's zone. A time on the local date
// of the run it explains prints as "HH:MM"; any other time names its date
// ("2026-03-09 05:50"), so a time past midnight is never ambiguous.

#include <string>

#include "engine/fixes.h"
#include "engine/patterns.h"
#include "plan/plan.h"

namespace readyby {

/// "06:30" when `t` falls on local date `day` in `zone`, else "2026-03-09 06:30".
std::string clock_on(Instant t, const Zone* zone, LocalDays day);

/// One line naming a pattern: "fails every Monday (4 of 4 Monday runs)",
/// "fails every run from 2026-03-09 to 2026-03-27 (15 runs), starting after a
/// daylight-saving change in ...; it stops after ...", "is degraded on ...".
std::string describe_pattern(const Plan& plan, const Pattern& p);

/// The daylight-saving changes of one bound: "a daylight-saving change in
/// America/Chicago (clocks forward 1h 00m on 2026-03-08)"; changes of several
/// zones on one date with the same jump are named together.
std::string describe_changes(const std::vector<ZoneChange>& changes);

/// Why the blamed feature is late: the cause step and what it did, e.g.
/// "job 'hie_merge' starts at 03:00 ("0 3 * * *") before 'reference_lab'
/// lands at 03:30, so that start reads old data ...". Empty when on time.
std::string describe_cause(const Plan& plan, const Blame& b, const Zone* zone);

/// What a fix changes, in words and as the edit:
/// "'bed_board' would have to land by 06:30 instead of 07:20 (50m earlier)
/// [delay bed_board=-PT50M]" (the edit as edit_text of engine/edit.h writes it).
std::string describe_fix(const Plan& plan, const Pattern& p, const Fix& fix);

/// The re-check of a fix: "re-checked: all 4 runs of this pattern ok; no
/// other run changes" / "...; also turns 1 run of discharge_delay ok
/// (2026-03-08 06:30)" / "...; but turns 12 runs of m from ok to fail (first ...)".
std::string describe_effect(const Plan& plan, const Fix& fix);

/// Why no fix is shown: "no single edit clears every run of this pattern: ...".
std::string describe_no_fix(const Plan& plan, const Pattern& p, const FixSearch& search);

}  // namespace readyby
