#pragma once
// Writers for `readyby forecast`: text for people, JSON for programs, for a
// forecast and for a backtest. They render ForecastReport and BacktestReport;
// every decision is made in forecast/*.h.
//
// Forecast JSON (one object): plan, from, days, draws, seed, replicates,
// draws_per_replicate, forecasts[] {model, at (the run spec's cron), calendar
// (null when none), runs, probability, interval [low, high] (null without
// runs), monte_carlo_se, most_often_late {node, share} (null when no run was
// ever late), lowest_run {at, probability} (null without runs)}, nodes[]
// {node, basis (schedule | data-end), occurrences, landings, missing_rate,
// p50_offset_seconds, p90_offset_seconds, by_weekday (null when pooled, else
// [{weekday, occurrences, landings, missing_rate, p50_offset_seconds,
// p90_offset_seconds}] for the scheduled weekdays), last_landing, warnings[]
// (short | stale)}, unmonitored[], warnings[], notes[]. Probabilities and
// shares have four decimals; times are RFC 3339 in the plan's zone.
//
// Backtest JSON: plan, backtest_from, to, days, draws, seed, runs, forecast,
// baseline and whole_days {brier, mean_forecast, calibration[] {from, to,
// runs, mean_forecast, observed_on_time (null when no runs)}}, by_model[]
// {model, runs, observed_on_time, declared_on_time, mean_forecast,
// brier_forecast, brier_baseline, brier_whole_days}, independence
// {brier_independent, brier_whole_days, serial[] {node, pairs, lag1},
// strongest_pair {a, b, days, correlation} or null}, nodes[] (as above),
// warnings[], notes[].

#include <ostream>
#include <string>
#include <vector>

#include "forecast/backtest.h"
#include "forecast/forecast.h"
#include "plan/plan.h"

namespace readyby {

void write_forecast_text(std::ostream& out, const Plan& plan, const ForecastReport& report);
void write_forecast_json(std::ostream& out, const Plan& plan, const ForecastReport& report);
void write_backtest_text(std::ostream& out, const Plan& plan, const BacktestReport& report);
void write_backtest_json(std::ostream& out, const Plan& plan, const BacktestReport& report);

/// The notes every forecast carries: independence of draws, what counts as
/// on time, and which sources keep their declared timing.
std::vector<std::string> forecast_notes(const Plan& plan, const std::vector<int>& unmonitored);
/// One sentence per short or stale landing model.
std::vector<std::string> landing_warnings(const Plan& plan, const LandingModels& models);
/// "about 97% (93–99%)": a probability as a whole percentage with its interval.
std::string percent_with_interval(double p, const std::optional<ProportionInterval>& interval);

}  // namespace readyby
