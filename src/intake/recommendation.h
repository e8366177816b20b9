#pragma once
// The intake decision: build, reuse, or fix the data plan first — from the
// timing of the proposed model, the catalogue match and whether the
// candidates can run on this plan. Pure computation: no I/O.
//
// The table, first row that applies:
//
//   1. reuse-and-validate   a candidate *covers* the proposal and is computable
//                           `on-time` (every input in the plan, fresh at every
//                           run). The first such in reuse rank order (in-house
//                           models rank first). The proposed model's own timing
//                           does not block this: the score does not wait on
//                           the late features, and the reasons say so.
//   2. fix-data-plan-first  some run of the proposed model fails. Names the
//                           cheapest fix (intake/timing.h) of the pattern that
//                           fails the most runs, and lists the others.
//   3. close-gaps-or-build  a candidate covers with gaps (or none of its inputs
//                           available), or only partly covers: the gaps to
//                           close (missing, late, rarely structured elements)
//                           or the criteria it misses, against the cost of a
//                           new model. The candidate shown is the best: covers
//                           before partly, then on-time / gaps / no, then
//                           fewest gaps, then rank.
//   4. build                nothing covers or partly covers and every run holds
//                           (or only optional features miss). The summary says
//                           exactly what was found — nothing in the catalogue,
//                           and whether the vocabulary recognised the outcome —
//                           and that the literature is searched before building;
//                           its timing clause names degraded runs (it never
//                           calls them "in time").

#include <optional>
#include <string>
#include <vector>

#include "catalog/reuse.h"
#include "intake/feasibility.h"
#include "intake/timing.h"

namespace readyby {

enum class Decision { reuse_and_validate, fix_data_plan_first, close_gaps_or_build, build };
/// "reuse-and-validate" | "fix-data-plan-first" | "close-gaps-or-build" | "build".
const char* to_string(Decision d);

struct IntakeRecommendation {
  Decision decision = Decision::build;
  std::string summary;                  // one sentence: the decision and its main reason
  std::vector<std::string> reasons;     // sentences for people, most important first
  std::string candidate;                // entry id the decision rests on (rows 1 and 3); empty otherwise
  std::optional<TimingFix> cheapest_fix;  // row 2: the fix named in the summary
};

/// Applies the table above. `feasibility.candidates` must come from
/// `reuse` (assess_feasibility); `reuse.searched` and the resolution are
/// quoted in the reasons.
IntakeRecommendation recommend_intake(const TimingSummary& timing, const ReuseReport& reuse,
                                      const Feasibility& feasibility);

}  // namespace readyby
