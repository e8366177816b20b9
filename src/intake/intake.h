#pragma once
// An intake screening: the one report an architect signs for a proposed
// model — will its data be there in time (timing), has an established score
// already covered it (reuse), can those scores run on this data plan
// (feasibility), and what to do (recommendation). Pure computation over a
// loaded plan, a loaded proposal and the catalogue match; the command does the
// loading and the report writers (report/intake_report.h) the rendering.

#include "catalog/proposal.h"
#include "catalog/reuse.h"
#include "catalog/vocabulary.h"
#include "intake/feasibility.h"
#include "intake/intake_forecast.h"
#include "intake/recommendation.h"
#include "intake/timing.h"
#include "plan/plan.h"

namespace readyby {

struct IntakeReport {
  const Proposal* proposal = nullptr;   // must outlive the report
  const Plan* plan = nullptr;           // must outlive the report
  int model = -1;                       // index into plan->models
  LocalDays from;
  int days = 0;
  TimingSummary timing;
  ReuseReport reuse;                    // its entries must outlive the report
  Feasibility feasibility;
  IntakeRecommendation recommendation;
  std::optional<IntakeForecast> forecast;  // given a landing history (intake --db); see intake_forecast.h

  /// Exit status by DESIGN §5: 1 when some run of the model fails, else 0.
  bool timing_fails() const { return timing.failed > 0; }
};

/// Screens `proposal`, whose model is `model` of `plan`, over the local dates
/// [from, from + days) of the model's zone, given its catalogue match `reuse`.
IntakeReport screen_intake(const Proposal& proposal, const Plan& plan, int model, LocalDays from, int days,
                           ReuseReport reuse, const Vocabulary& vocabulary);

}  // namespace readyby
