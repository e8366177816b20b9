#include "intake/intake_forecast.h"

#include <algorithm>

#include "time/zone.h"

namespace readyby {

IntakeForecast forecast_intake(const Plan& plan, int model, LocalDays from, int days, const Feasibility& feasibility,
                               const History& history, const ForecastOptions& options) {
  IntakeForecast out;
  out.options = options;
  const Instant start = window_start(plan, from);
  out.models = fit_landing_models(plan, history, start, start);
  const Model& m = plan.models[static_cast<size_t>(model)];
  std::vector<ForecastTarget> targets = {model_target(plan, model, from, days)};
  std::vector<LocalDays> dates;
  for (Instant r : targets[0].runs) dates.push_back(date::floor<date::days>(m.zone->to_local(r)));
  out.daily = std::adjacent_find(dates.begin(), dates.end()) == dates.end();
  for (const CandidateCheck& c : feasibility.candidates) {
    ForecastTarget t;
    t.runs = feasibility.runs;
    for (const InputCheck& in : c.inputs) {
      if (in.available()) t.inputs.push_back({in.feature, in.allowed_age.seconds, false});
    }
    if (t.inputs.empty()) continue;
    out.candidates.push_back({c.entry, static_cast<int>(t.inputs.size()), static_cast<int>(c.inputs.size()), {}});
    targets.push_back(std::move(t));
  }
  std::vector<TargetForecast> results = forecast_targets(plan, out.models, std::move(targets), options);
  out.model = std::move(results[0]);
  for (size_t i = 0; i < out.candidates.size(); ++i) out.candidates[i].forecast = std::move(results[i + 1]);
  out.unmonitored = unmonitored_sources(plan, out.models, m.features);
  return out;
}

}  // namespace readyby
