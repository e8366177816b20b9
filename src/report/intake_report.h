#pragma once
// Writers for `readyby intake`: text for people, Markdown to paste into a
// review ticket, JSON for tools. They render an IntakeReport; every decision
// is made in intake/*.h. Every format carries the cautions of DESIGN §8.
//
// JSON keys (stable; more may be added): proposal, title, plan, model,
// timezone, from, days, timing {verdict (on-time | at-risk | infeasible),
// runs, ok, degraded, failed, tightest_slack_seconds (null when no run),
// tightest_at, tightest_optional_slack_seconds (null when no optional feature
// became ready), degraded_features[], patterns[] {description, status (fail |
// degraded), runs, failing_features[], chain[], fix, start_later, cheapest,
// cause, no_fix}}, reuse (the
// `reuse --format json` object), feasibility[] {id, name, coverage, in_house,
// rank, computable (on-time | gaps | no), inputs[] {element, label, recency,
// structured, feature (null when none), model_feature, allowed_age, status
// (on-time | late | missing | unstructured), runs, late_runs, late_when,
// worst_late_seconds, never}, missing[], late[], unstructured[]},
// recommendation {decision (reuse-and-validate | fix-data-plan-first |
// close-gaps-or-build | build), summary, candidate, cheapest_fix, reasons[]},
// cautions[], forecast (null without --db). A fix is {kind (land-earlier |
// move-start | start-later), node, seconds, text, edit, effect,
// breaks_others}; every fix shown was re-checked and clears every run of its
// pattern. Times are RFC 3339 in the model's zone.

#include <string>

#include "intake/intake.h"

namespace readyby {

std::string intake_json(const IntakeReport& report);

/// The forecast section of each format (report/intake_forecast.cpp): empty
/// (JSON: `null`) when the report has no forecast. JSON keys: draws, seed,
/// model {runs, probability, interval, most_often_late}, candidates[] {id,
/// name, inputs_forecast, inputs_total, runs, probability, interval,
/// most_often_late}, unmonitored[], warnings[], notes[].
std::string intake_forecast_text(const IntakeReport& report);
std::string intake_forecast_markdown(const IntakeReport& report);
std::string intake_forecast_json(const IntakeReport& report);
std::string intake_text(const IntakeReport& report);
std::string intake_markdown(const IntakeReport& report);

}  // namespace readyby
