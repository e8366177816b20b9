#pragma once
// Charts of the landing history (with --db): per monitored source, the
// landing offsets of the window as dots over time, the declared lands_after
// as a dashed line and the Theil–Sen trend as a solid line, with the drift
// figures in the caption and every landing in a table; and per model run
// time, the on-time rate as a disc on a 0–100% scale with its Wilson 95%
// interval as a bar, each with its figures written beside it.
//
// Source charts are <figure class="offsets"> with `data-source`; on-time
// rows are `g.ontime` with `data-model` and `data-at`.

#include <string>

#include "report/html/page_facts.h"

namespace readyby::html {

/// Appends the history section's figures (the section heading is the page's).
void write_history_charts(std::string& out, const Plan& plan, const HistoryFacts& history);

}  // namespace readyby::html
