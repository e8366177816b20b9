#pragma once
// The `margins` and `impact` reports (DESIGN §9).
//
// margins, text: one line per node with a margin, smallest first (ties in
// plan order): the margin, the binding run (model and local time) and how
// long before it must the node lands for that run; then the nodes that no ok
// run depends on. JSON: {"margins": [{"node", "margin_seconds", "binding":
// {"model", "at"}}]} in the same order, unbounded nodes last with
// "margin_seconds": null and "binding": null.
//
// impact, text: one line per node whose failure changes some run, ranked as
// impact() ranks them, with the runs failed and degraded per model and the
// single points of failure marked; then the single points of failure again
// in one list, and how many nodes change nothing. JSON: {"impact": [{"node",
// "failed_runs", "degraded_runs", "models": [{"model", "fail", "degrade"}]}]}
// for every node, in rank order.

#include <ostream>
#include <vector>

#include "engine/check.h"
#include "engine/impact.h"
#include "engine/margins.h"
#include "plan/plan.h"

namespace readyby {

/// The margins in report order: bounded ones by margin (then plan order),
/// then the unbounded ones in plan order.
std::vector<Margin> margins_in_report_order(std::vector<Margin> margins);

void write_margins_text(std::ostream& out, const Plan& plan, const Evaluation& ev, const std::vector<Margin>& margins);
void write_margins_json(std::ostream& out, const Plan& plan, const std::vector<Margin>& margins);

void write_impact_text(std::ostream& out, const Plan& plan, const Evaluation& ev, const std::vector<NodeImpact>& impact);
void write_impact_json(std::ostream& out, const Plan& plan, const std::vector<NodeImpact>& impact);

}  // namespace readyby
