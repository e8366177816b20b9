#pragma once
// The backtest (DESIGN §10): fit the landing models on the history before a
// date, forecast every model run from that date on, and score the forecasts
// against what `nightly` finds from the recorded landings — and the
// declared-schedule baseline the same way. Pure computation; no I/O.
//
// - Observed: every run in the window evaluated as nightly does (a node with
//   any recorded row uses only its ok rows; others keep declared timing).
//   A run is on time when its status is ok.
// - Forecast: each run's probability from forecast.h (independent draws).
// - Baseline: `check`'s verdict on the declared plan, as a probability of 1
//   (ok) or 0.
// - Brier score: the mean of (forecast − outcome)², outcome 1 for on time
//   (Brier, "Verification of forecasts expressed in terms of probability",
//   Monthly Weather Review 1950 — from memory). 0 is perfect; always saying
//   50% scores 0.25.
// - Calibration: runs grouped by forecast decile ([0, 0.1), ..., [0.9, 1]),
//   each with its count, mean forecast and observed on-time share.
//
// What independence costs (DESIGN §10 draws every occurrence independently):
// - whole_days: the same forecast with DrawMode::whole_days draws, which
//   keep every node's landings of one recorded day together (the correlation
//   between feeds within a day); its Brier score beside the independent one
//   says how much that correlation matters for this history.
// - serial: per monitored node, the lag-1 autocorrelation of its offsets
//   over consecutive landed occurrences of the fitting span (Pearson), which
//   independent draws ignore — a trend (drift) shows up here.
// - strongest_pair: the two monitored nodes whose same-day offsets (each
//   node's first landing of a local date, plan zone) correlate most (|r|,
//   at least kMinPairedDays common days).

#include <optional>
#include <vector>

#include "forecast/forecast.h"

namespace readyby {

inline constexpr int kMinPairedDays = 10;

struct CalibrationBin {
  double low = 0, high = 0;        // forecast range [low, high); the last bin includes 1
  int runs = 0;
  double mean_forecast = 0;        // 0 when no runs
  std::optional<double> observed;  // on-time share; nullopt when no runs
};

struct ScoreCard {
  int runs = 0;
  double brier = 0;
  double mean_forecast = 0;
  std::vector<CalibrationBin> calibration;  // ten deciles
};

struct BacktestRun {
  int model = -1;
  Instant at;
  double forecast = 0;      // independent draws
  double whole_days = 0;    // whole-day draws
  bool declared_ok = false; // check on the declared plan
  bool observed_ok = false; // nightly on the recorded landings
};

struct ModelBacktest {
  int model = -1;
  int runs = 0;
  int observed_on_time = 0;
  int declared_on_time = 0;
  double mean_forecast = 0;
  double brier_forecast = 0, brier_baseline = 0, brier_whole_days = 0;
};

struct SerialDependence {
  int node = -1;
  int pairs = 0;                 // consecutive landed occurrences
  std::optional<double> lag1;    // nullopt: fewer than 3 pairs or no variation
};

struct PairDependence {
  int a = -1, b = -1;            // node indices, a < b
  int days = 0;
  double correlation = 0;
};

struct BacktestReport {
  LocalDays from;
  int days = 0;
  ForecastOptions options;
  LandingModels models;                  // fitted on rows landed before `from`
  std::vector<BacktestRun> runs;         // models in plan order, then by instant
  ScoreCard forecast, baseline, whole_days;
  std::vector<ModelBacktest> by_model;   // plan order, models with runs only
  std::vector<SerialDependence> serial;  // monitored nodes, plan order
  std::optional<PairDependence> strongest_pair;
};

/// The last local date (plan zone) on which any row landed; nullopt when the
/// history is empty. The default end of a backtest window.
std::optional<LocalDays> last_history_date(const Plan& plan, const History& history);

/// Backtests the runs with local dates in [from, from + days). `history`
/// holds every recorded row (nullopt: never recorded). `options.replicates`
/// is ignored (no intervals are needed).
BacktestReport backtest(const Plan& plan, const History& history, LocalDays from, int days,
                        const ForecastOptions& options);

/// Scores forecasts against outcomes (Brier, calibration deciles).
ScoreCard score(const std::vector<double>& forecasts, const std::vector<bool>& outcomes);

/// Pearson's correlation of paired values; nullopt with fewer than 3 pairs
/// or when either side does not vary.
std::optional<double> pearson(const std::vector<double>& x, const std::vector<double>& y);

}  // namespace readyby
