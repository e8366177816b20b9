#pragma once
// A model's calendar of the window: weeks as rows, Monday to Sunday as
// columns, one cell per run inside its local day, each cell marked by shape,
// word (or, when a day holds more than kLabelledRuns runs, the day's counts
// in words) and colour. Days with a clock change carry a dashed frame and the
// change written in the corner; days whose runs a calendar skips are hatched
// and say so; feeds that do not deliver that day are named. The failing and
// degraded patterns are listed beside it, each linked to its timeline, and
// the calendar's numbers follow as a table.
//
// The calendar is an <svg class="calendar"> with `data-model` (the model id);
// every run cell in it is a group `g.run` with `data-status` (ok | degraded |
// fail), holding a <title> with the run's local time, status and its first
// not-fresh features, and the status mark (a <use> of the page's symbols).

#include <string>

#include "report/html/page_facts.h"

namespace readyby::html {

/// Runs per day up to which each run is written with its time and status word.
inline constexpr size_t kLabelledRuns = 3;

/// Appends the calendar figure, the pattern list and the table of `model` to `out`.
void write_calendar(std::string& out, const PageFacts& page, const ModelFacts& model);

/// The id of the timeline of pattern `index` (of AdviceFacts::patterns), for links.
std::string pattern_anchor(const Plan& plan, const PageFacts& page, size_t index);

}  // namespace readyby::html
