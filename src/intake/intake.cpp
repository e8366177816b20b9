#include "intake/intake.h"

#include "engine/check.h"

namespace readyby {

IntakeReport screen_intake(const Proposal& proposal, const Plan& plan, int model, LocalDays from, int days,
                           ReuseReport reuse, const Vocabulary& vocabulary) {
  IntakeReport out;
  out.proposal = &proposal;
  out.plan = &plan;
  out.model = model;
  out.from = from;
  out.days = days;
  Evaluation ev = evaluate(plan, from, days);
  out.timing = summarise_timing(plan, model, ev);
  out.reuse = std::move(reuse);
  std::vector<Instant> runs = run_instants(plan, plan.models[static_cast<size_t>(model)], from, days);
  out.feasibility = assess_feasibility(plan, model, runs, out.reuse, vocabulary);
  out.recommendation = recommend_intake(out.timing, out.reuse, out.feasibility);
  return out;
}

}  // namespace readyby
