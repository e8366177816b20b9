#pragma once
// The forecast from history (DESIGN §10): how often each model run will be on
// time, judged from how the feeds have really landed. Pure computation over a
// plan and recorded rows; the command reads them and report/forecast_report.h
// renders the result.
//
// Semantics.
// - Landing models are fitted on the rows landed before the window's first
//   instant (forecast/landing_model.h); nodes with no such row keep their
//   declared timing.
// - A draw (forecast/draw_engine.h) samples every occurrence of every
//   monitored node independently and evaluates every run with the §4
//   recursion under the nightly rule. A run is *on time* in a draw when its
//   status is ok; degraded runs are not on time (as nightly's on-time rate).
// - A target's *probability* is the share of (draw, run) pairs on time over
//   `draws` draws of the fitted models; each run's own share is kept too. The
//   Monte-Carlo standard error is the spread of the per-draw shares over
//   sqrt(draws).
// - The 95% *interval* comes from `replicates` bootstrap resamples of every
//   monitored node's history (each weekday group resampled on its own),
//   each forecast with `draws_per_replicate` draws. Those replicate forecasts
//   vary for two reasons — the history resample and their own few draws —
//   and only the first belongs in the interval, so the replicates' spread
//   around their mean is scaled by sqrt(V_boot / V), where V is their variance
//   and V_boot = max(0, V − the mean of their Monte-Carlo variances) (the law
//   of total variance), and placed around the probability: [p + k(q2.5 − m),
//   p + k(q97.5 − m)], with q the replicate quantiles (Hyndman & Fan
//   definition 7) and m their mean, clipped to [0, 1]. (The percentile
//   bootstrap: Efron and Tibshirani, An Introduction to the Bootstrap, 1993,
//   ch. 13 — from memory.)
// - *Most often late*: among (draw, run) pairs not on time, the node that
//   starts the chain of a deciding input (a non-optional late input when the
//   run fails, else an optional one), counted once per pair; ties go to the
//   lower node index. Its share is of the pairs not on time. A run that an
//   unmonitored late input fails in every draw needs no draw for its status;
//   the origins of its late inputs are counted in the first kAttributionDraws
//   draws and scaled to all of them (so the other draws rebuild only what the
//   remaining runs need).
//
// Reproducibility. Draw d of the fitted models uses the generator seeded
// stream_seed(seed, 1, d); replicate b resamples with stream_seed(seed, 2, b)
// and its draw j uses stream_seed(seed, 3, b * 2^32 + j) (random.h). Every
// count is an integer sum, so results are identical bit for bit whatever the
// number of threads and whichever thread runs which draw.

#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "forecast/draw_engine.h"
#include "forecast/landing_model.h"
#include "history/stats.h"
#include "history/history.h"
#include "plan/plan.h"

namespace readyby {

inline constexpr int kDefaultDraws = 2000;
inline constexpr int kBootstrapReplicates = 100;
/// Runs that fail in every draw because an unmonitored input is late
/// (DrawEngine::doomed) are evaluated in this many draws only, for the
/// attribution of their lateness; their counts are scaled to all draws.
inline constexpr int kAttributionDraws = 100;

struct ForecastOptions {
  int draws = kDefaultDraws;           // >= 1
  uint64_t seed = kDefaultForecastSeed;
  int replicates = kBootstrapReplicates;  // 0: no interval
  int draws_per_replicate = 0;         // 0: max(2, draws / (2 * replicates))
  int threads = 0;                     // 0: the hardware's concurrency
  DrawMode mode = DrawMode::independent;

  int replicate_draws() const;
};

struct TargetForecast {
  size_t runs = 0;
  double probability = 0;                      // share of (draw, run) pairs on time; 0 when no runs
  double standard_error = 0;                   // Monte Carlo
  std::optional<ProportionInterval> interval;  // 95%; nullopt when no replicates or no runs
  int most_often_late = -1;                    // node index; -1 when no run was ever late
  double most_often_late_share = 0;            // of the (draw, run) pairs not on time
  std::vector<double> run_probability;         // per run, in the target's `runs` order
};

/// Forecasts every target (see the semantics above). `models` must come from
/// fit_landing_models on the same plan.
std::vector<TargetForecast> forecast_targets(const Plan& plan, const LandingModels& models,
                                             std::vector<ForecastTarget> targets, const ForecastOptions& options);

/// A model's run spec as a target: its features (max_age, optional) at the
/// runs of `runs[spec]` alone with local dates in [from, from + days).
ForecastTarget run_spec_target(const Plan& plan, int model, int spec, LocalDays from, int days);
/// A model's runs (all its specs, one run per instant) as a target.
ForecastTarget model_target(const Plan& plan, int model, LocalDays from, int days);

/// Sources that `features` depend on (not looking past a monitored node)
/// with no landing model: they keep their declared timing in every draw.
/// Ascending node order.
std::vector<int> unmonitored_sources(const Plan& plan, const LandingModels& models, const std::vector<int>& features);

/// The first instant of local date `from` in the plan's zone.
Instant window_start(const Plan& plan, LocalDays from);

struct RunSpecForecast {
  int model = -1;       // plan model index
  int spec = -1;        // index into the model's runs
  std::vector<Instant> runs;  // its run instants, in TargetForecast::run_probability order
  TargetForecast forecast;
};

/// `readyby forecast`: every run spec of every model over [from, from + days).
struct ForecastReport {
  LocalDays from;
  int days = 0;
  ForecastOptions options;
  LandingModels models;                    // fitted on rows landed before the window
  std::vector<RunSpecForecast> forecasts;  // models in plan order, specs in order
  std::vector<int> unmonitored;            // sources some model depends on, with no landing model
};

ForecastReport forecast_plan(const Plan& plan, const History& history, LocalDays from, int days,
                             const ForecastOptions& options);

}  // namespace readyby
