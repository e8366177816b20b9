#include "forecast/backtest.h"

#include <algorithm>
#include <cmath>
#include <map>

#include "engine/check.h"

namespace readyby {

namespace {

constexpr int kDeciles = 10;

int decile(double p) { return std::clamp(static_cast<int>(std::floor(p * kDeciles + 1e-9)), 0, kDeciles - 1); }

int32_t plan_date(const Plan& plan, Instant t) {
  return static_cast<int32_t>(date::floor<date::days>(plan.zone->to_local(t)).time_since_epoch().count());
}

std::vector<SerialDependence> serial_dependence(const LandingModels& models) {
  std::vector<SerialDependence> out;
  for (const LandingModel& m : models.models) {
    SerialDependence s;
    s.node = m.node;
    std::vector<double> x, y;
    for (size_t k = 1; k < m.history.size(); ++k) {
      if (m.history[k - 1].outcome == kMissingOccurrence || m.history[k].outcome == kMissingOccurrence) continue;
      x.push_back(static_cast<double>(m.history[k - 1].outcome));
      y.push_back(static_cast<double>(m.history[k].outcome));
    }
    s.pairs = static_cast<int>(x.size());
    s.lag1 = pearson(x, y);
    out.push_back(s);
  }
  return out;
}

std::optional<PairDependence> strongest_pair(const Plan& plan, const LandingModels& models) {
  // Each node's first landed offset of each local date.
  std::vector<std::map<int32_t, double>> daily(models.models.size());
  for (size_t i = 0; i < models.models.size(); ++i) {
    for (const HistoricalOccurrence& h : models.models[i].history) {
      if (h.outcome == kMissingOccurrence) continue;
      daily[i].emplace(plan_date(plan, h.at), static_cast<double>(h.outcome));
    }
  }
  std::optional<PairDependence> best;
  for (size_t a = 0; a < daily.size(); ++a) {
    for (size_t b = a + 1; b < daily.size(); ++b) {
      std::vector<double> x, y;
      for (const auto& [day, offset] : daily[a]) {
        auto it = daily[b].find(day);
        if (it == daily[b].end()) continue;
        x.push_back(offset);
        y.push_back(it->second);
      }
      if (static_cast<int>(x.size()) < kMinPairedDays) continue;
      std::optional<double> r = pearson(x, y);
      if (!r || (best && std::abs(*r) <= std::abs(best->correlation))) continue;
      best = PairDependence{models.models[a].node, models.models[b].node, static_cast<int>(x.size()), *r};
    }
  }
  return best;
}

double brier(const std::vector<double>& forecasts, const std::vector<bool>& outcomes) {
  double sum = 0;
  for (size_t i = 0; i < forecasts.size(); ++i) {
    const double d = forecasts[i] - (outcomes[i] ? 1.0 : 0.0);
    sum += d * d;
  }
  return forecasts.empty() ? 0 : sum / static_cast<double>(forecasts.size());
}

}  // namespace

std::optional<double> pearson(const std::vector<double>& x, const std::vector<double>& y) {
  const size_t n = std::min(x.size(), y.size());
  if (n < 3) return std::nullopt;
  double mx = 0, my = 0;
  for (size_t i = 0; i < n; ++i) mx += x[i], my += y[i];
  mx /= static_cast<double>(n);
  my /= static_cast<double>(n);
  double sxy = 0, sxx = 0, syy = 0;
  for (size_t i = 0; i < n; ++i) {
    sxy += (x[i] - mx) * (y[i] - my);
    sxx += (x[i] - mx) * (x[i] - mx);
    syy += (y[i] - my) * (y[i] - my);
  }
  if (sxx <= 0 || syy <= 0) return std::nullopt;
  return sxy / std::sqrt(sxx * syy);
}

ScoreCard score(const std::vector<double>& forecasts, const std::vector<bool>& outcomes) {
  ScoreCard card;
  card.runs = static_cast<int>(forecasts.size());
  card.brier = brier(forecasts, outcomes);
  std::vector<int> on_time(kDeciles, 0);
  std::vector<double> sum(kDeciles, 0);
  for (int i = 0; i < kDeciles; ++i) {
    CalibrationBin bin;
    bin.low = i / 10.0;
    bin.high = (i + 1) / 10.0;
    card.calibration.push_back(bin);
  }
  for (size_t i = 0; i < forecasts.size(); ++i) {
    const int d = decile(forecasts[i]);
    ++card.calibration[static_cast<size_t>(d)].runs;
    sum[static_cast<size_t>(d)] += forecasts[i];
    on_time[static_cast<size_t>(d)] += outcomes[i] ? 1 : 0;
    card.mean_forecast += forecasts[i];
  }
  if (!forecasts.empty()) card.mean_forecast /= static_cast<double>(forecasts.size());
  for (size_t d = 0; d < kDeciles; ++d) {
    CalibrationBin& bin = card.calibration[d];
    if (bin.runs == 0) continue;
    bin.mean_forecast = sum[d] / bin.runs;
    bin.observed = static_cast<double>(on_time[d]) / bin.runs;
  }
  return card;
}

std::optional<LocalDays> last_history_date(const Plan& plan, const History& history) {
  std::optional<Instant> last;
  for (const auto& rows : history) {
    if (!rows) continue;
    for (const StoredLanding& r : *rows) {
      if (!last || r.landed_at > *last) last = r.landed_at;
    }
  }
  if (!last) return std::nullopt;
  return date::floor<date::days>(plan.zone->to_local(*last));
}

BacktestReport backtest(const Plan& plan, const History& history, LocalDays from, int days,
                        const ForecastOptions& options) {
  BacktestReport report;
  report.from = from;
  report.days = days;
  report.options = options;
  report.options.replicates = 0;
  const Instant start = window_start(plan, from);
  report.models = fit_landing_models(plan, history, start, start);

  // What nightly finds, and what check finds on the declared plan.
  ObservedDeliveries observed(plan.nodes.size());
  for (size_t n = 0; n < plan.nodes.size() && n < history.size(); ++n) {
    if (!history[n]) continue;
    std::vector<Delivery>& list = observed[n].emplace();
    for (const StoredLanding& l : *history[n]) {
      if (l.status == LandingStatus::ok) list.push_back({l.landed_at, l.data_through});
    }
  }
  std::map<std::pair<int, int64_t>, bool> observed_ok, declared_ok;
  for (const RunResult& r : evaluate(plan, from, days, &observed).runs) {
    observed_ok[{r.model, to_unix(r.at)}] = r.status == RunStatus::ok;
  }
  for (const RunResult& r : evaluate(plan, from, days).runs) declared_ok[{r.model, to_unix(r.at)}] = r.status == RunStatus::ok;

  std::vector<ForecastTarget> targets;
  for (size_t m = 0; m < plan.models.size(); ++m) targets.push_back(model_target(plan, static_cast<int>(m), from, days));
  std::vector<TargetForecast> independent = forecast_targets(plan, report.models, targets, report.options);
  ForecastOptions joint = report.options;
  joint.mode = DrawMode::whole_days;
  std::vector<TargetForecast> whole_days = forecast_targets(plan, report.models, targets, joint);

  std::vector<double> f, w, b;
  std::vector<bool> y;
  for (size_t m = 0; m < targets.size(); ++m) {
    ModelBacktest mb;
    mb.model = static_cast<int>(m);
    std::vector<double> mf, mw, mbase;
    std::vector<bool> my;
    for (size_t k = 0; k < targets[m].runs.size(); ++k) {
      BacktestRun run;
      run.model = static_cast<int>(m);
      run.at = targets[m].runs[k];
      run.forecast = independent[m].run_probability[k];
      run.whole_days = whole_days[m].run_probability[k];
      run.declared_ok = declared_ok.at({run.model, to_unix(run.at)});
      run.observed_ok = observed_ok.at({run.model, to_unix(run.at)});
      report.runs.push_back(run);
      mf.push_back(run.forecast);
      mw.push_back(run.whole_days);
      mbase.push_back(run.declared_ok ? 1.0 : 0.0);
      my.push_back(run.observed_ok);
      mb.observed_on_time += run.observed_ok;
      mb.declared_on_time += run.declared_ok;
      mb.mean_forecast += run.forecast;
    }
    if (my.empty()) continue;
    mb.runs = static_cast<int>(my.size());
    mb.mean_forecast /= mb.runs;
    mb.brier_forecast = brier(mf, my);
    mb.brier_baseline = brier(mbase, my);
    mb.brier_whole_days = brier(mw, my);
    report.by_model.push_back(mb);
    f.insert(f.end(), mf.begin(), mf.end());
    w.insert(w.end(), mw.begin(), mw.end());
    b.insert(b.end(), mbase.begin(), mbase.end());
    y.insert(y.end(), my.begin(), my.end());
  }
  report.forecast = score(f, y);
  report.baseline = score(b, y);
  report.whole_days = score(w, y);
  report.serial = serial_dependence(report.models);
  report.strongest_pair = strongest_pair(plan, report.models);
  return report;
}

}  // namespace readyby
