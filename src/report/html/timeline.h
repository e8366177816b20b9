#pragma once
// A chain on a time axis: one row per step, from the source to the feature,
// each a bar from the step's start (a scheduled delivery, a job's start) to
// its landing; the needs-data-through line (dashed), the run's deadline
// (solid), a caret at each step's latest on-time landing, the slack or the
// lateness written at the deadline, the step at fault drawn as a block-red
// bar with "at fault" beside it, a stale fixed start as a hollow ring. The
// cause and the verified fixes (each with what its re-check found) are
// written under the figure, and the steps follow as a table. Times on
// the axis and in the table are local times of the model's zone.
//
// Each timeline is a <figure class="timeline"> with `data-model`, and
// `data-pattern` holding the pattern's description (absent for an explained
// run that belongs to no pattern).

#include <string>

#include "report/html/page_facts.h"

namespace readyby::html {

/// Appends the timeline of pattern `index` of page.advice.patterns.
void write_pattern_timeline(std::string& out, const PageFacts& page, size_t index);

/// Appends the timeline of an explained run that belongs to no pattern (the
/// model's tightest run), under `heading`.
void write_run_timeline(std::string& out, const PageFacts& page, const ExplainedRun& run, const std::string& heading);

}  // namespace readyby::html
