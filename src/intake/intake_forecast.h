#pragma once
// The forecast part of an intake screening (given a landing history): on
// what share of its runs would the proposed model's inputs all be fresh, and
// on what share would each candidate score's inputs be — judged from how the
// feeds have really landed (forecast/forecast.h, DESIGN §10), not from their
// declared schedules. Pure computation; no I/O.
//
// - The model: its runs over the screening window with its own features
//   (max_age, optional), as `readyby forecast` computes them.
// - A candidate (every covering or partly covering entry that has at least
//   one input a plan feature provides): at the same runs, every available
//   input (intake/feasibility.h: its feature and allowed age) fresh; missing
//   inputs are left out and counted, since no history can say when data that
//   the plan lacks would land.

#include <optional>
#include <vector>

#include "forecast/forecast.h"
#include "intake/feasibility.h"

namespace readyby {

struct CandidateForecast {
  const Entry* entry = nullptr;   // as in the Feasibility it came from
  int inputs_forecast = 0;        // available inputs, all required fresh
  int inputs_total = 0;
  TargetForecast forecast;
};

struct IntakeForecast {
  ForecastOptions options;
  bool daily = true;              // the model runs at most once a local date: shares are "of days"
  TargetForecast model;
  std::vector<CandidateForecast> candidates;  // feasibility order
  LandingModels models;           // fitted on landings before the window
  std::vector<int> unmonitored;   // sources the model's features depend on, with no landing recorded
};

/// Forecasts model `model` of `plan` at `feasibility.runs` (its runs with
/// local dates in [from, from + days)) and every candidate of `feasibility`.
IntakeForecast forecast_intake(const Plan& plan, int model, LocalDays from, int days, const Feasibility& feasibility,
                               const History& history, const ForecastOptions& options);

}  // namespace readyby
