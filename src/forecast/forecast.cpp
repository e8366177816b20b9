#include "forecast/forecast.h"

#include <algorithm>
#include <atomic>
#include <cmath>
#include <map>
#include <thread>

#include "engine/check.h"
#include "forecast/random.h"

namespace readyby {

namespace {

constexpr uint64_t kDrawStream = 1, kResampleStream = 2, kReplicateDrawStream = 3;
constexpr int kDrawsPerUnit = 8;

// What one thread has counted.
struct Tally {
  std::vector<int64_t> drawn_ok;                      // per drawn run: draws on time
  std::vector<int64_t> ok_sum, ok_squares;            // per target, over draws: runs on time, and its square
  std::vector<int64_t> late;                          // per target: (draw, run) pairs not on time
  std::vector<std::map<int, int64_t>> late_by_node;   // per target, live runs over every draw
  std::vector<std::map<int, int64_t>> doomed_by_node; // per target, doomed runs over the attribution draws
  std::vector<std::vector<int64_t>> rep_sum, rep_squares;  // per replicate, per target

  Tally(size_t drawn_runs, size_t targets, size_t replicates)
      : drawn_ok(drawn_runs, 0), ok_sum(targets, 0), ok_squares(targets, 0), late(targets, 0),
        late_by_node(targets), doomed_by_node(targets), rep_sum(replicates, std::vector<int64_t>(targets, 0)),
        rep_squares(replicates, std::vector<int64_t>(targets, 0)) {}

  void add(const Tally& o) {
    for (size_t i = 0; i < drawn_ok.size(); ++i) drawn_ok[i] += o.drawn_ok[i];
    for (size_t t = 0; t < ok_sum.size(); ++t) {
      ok_sum[t] += o.ok_sum[t];
      ok_squares[t] += o.ok_squares[t];
      late[t] += o.late[t];
      for (const auto& [node, n] : o.late_by_node[t]) late_by_node[t][node] += n;
      for (const auto& [node, n] : o.doomed_by_node[t]) doomed_by_node[t][node] += n;
    }
    for (size_t b = 0; b < rep_sum.size(); ++b) {
      for (size_t t = 0; t < ok_sum.size(); ++t) {
        rep_sum[b][t] += o.rep_sum[b][t];
        rep_squares[b][t] += o.rep_squares[b][t];
      }
    }
  }
};

// Runs on time per target in one draw: the fixed ones plus the drawn ones.
void count_on_time(const DrawEngine& engine, const std::vector<int64_t>& fixed_on_time, const DrawResult& r,
                   std::vector<int64_t>* per_target) {
  *per_target = fixed_on_time;
  const std::vector<uint32_t>& drawn = engine.drawn_runs();
  for (size_t i = 0; i < drawn.size(); ++i) (*per_target)[engine.target_of(drawn[i])] += r.ok[i];
}

struct Job {
  const DrawEngine& engine;
  const OutcomeTables& fitted;
  const ForecastOptions& options;
  std::vector<int64_t> fixed_on_time;  // per target
  int main_units = 0, units = 0;
  std::atomic<int> next{0};

  void run(Tally* tally) {
    DrawEngine::ScratchPtr scratch = engine.make_scratch();
    DrawResult result;
    std::vector<int64_t> on_time;
    const std::vector<uint32_t>& drawn = engine.drawn_runs();
    for (int unit = next++; unit < units; unit = next++) {
      if (unit < main_units) {
        const int first = unit * kDrawsPerUnit, last = std::min(options.draws, first + kDrawsPerUnit);
        for (int d = first; d < last; ++d) {
          engine.run_draw(fitted, options.mode, stream_seed(options.seed, kDrawStream, static_cast<uint64_t>(d)),
                          scratch.get(), &result, d < kAttributionDraws);
          count_on_time(engine, fixed_on_time, result, &on_time);
          for (size_t i = 0; i < drawn.size(); ++i) {
            tally->drawn_ok[i] += result.ok[i];
            if (!result.ok[i]) ++tally->late[engine.target_of(drawn[i])];
          }
          for (const auto& [i, node] : result.late_origins) {
            const size_t t = engine.target_of(drawn[static_cast<size_t>(i)]);
            ++(engine.doomed(static_cast<size_t>(i)) ? tally->doomed_by_node[t] : tally->late_by_node[t])[node];
          }
          for (size_t t = 0; t < on_time.size(); ++t) {
            tally->ok_sum[t] += on_time[t];
            tally->ok_squares[t] += on_time[t] * on_time[t];
          }
        }
        continue;
      }
      const uint64_t b = static_cast<uint64_t>(unit - main_units);
      std::mt19937_64 rng(stream_seed(options.seed, kResampleStream, b));
      const OutcomeTables tables = fitted.resampled(rng);
      for (int j = 0; j < options.replicate_draws(); ++j) {
        engine.run_draw(tables, options.mode,
                        stream_seed(options.seed, kReplicateDrawStream, (b << 32) | static_cast<uint64_t>(j)),
                        scratch.get(), &result, false);
        count_on_time(engine, fixed_on_time, result, &on_time);
        for (size_t t = 0; t < on_time.size(); ++t) {
          tally->rep_sum[b][t] += on_time[t];
          tally->rep_squares[b][t] += on_time[t] * on_time[t];
        }
      }
    }
  }
};

// Sample variance of a count from its sum and sum of squares over n draws.
double count_variance(double sum, double squares, double n) {
  if (n < 2) return 0;
  return std::max(0.0, (squares - sum * sum / n) / (n - 1));
}

ProportionInterval bootstrap_interval(double p, const Tally& tally, size_t t, double runs, double m) {
  std::vector<double> estimates;
  double mc_variance = 0;
  for (size_t b = 0; b < tally.rep_sum.size(); ++b) {
    estimates.push_back(static_cast<double>(tally.rep_sum[b][t]) / (m * runs));
    mc_variance += count_variance(static_cast<double>(tally.rep_sum[b][t]), static_cast<double>(tally.rep_squares[b][t]),
                                  m) /
                   (runs * runs) / m;
  }
  const double reps = static_cast<double>(estimates.size());
  mc_variance /= reps;
  double mean = 0;
  for (double e : estimates) mean += e;
  mean /= reps;
  double total = 0;
  for (double e : estimates) total += (e - mean) * (e - mean);
  total = reps > 1 ? total / (reps - 1) : 0;
  const double scale = total > 0 ? std::sqrt(std::max(0.0, total - mc_variance) / total) : 0;
  ProportionInterval out;
  out.low = std::clamp(p + scale * (*percentile(estimates, 0.025) - mean), 0.0, 1.0);
  out.high = std::clamp(p + scale * (*percentile(estimates, 0.975) - mean), 0.0, 1.0);
  out.low = std::min(out.low, p);
  out.high = std::max(out.high, p);
  return out;
}

TargetForecast summarise(const DrawEngine& engine, const Tally& tally, size_t t, const ForecastOptions& options) {
  TargetForecast f;
  const size_t first = engine.first_run(t);
  f.runs = engine.targets()[t].runs.size();
  const double draws = static_cast<double>(options.draws);
  int64_t late = tally.late[t];
  // Doomed runs' origins were counted in the attribution draws only: scale them to every draw.
  const double scale = draws / static_cast<double>(std::min(options.draws, kAttributionDraws));
  std::map<int, double> late_by_node;
  for (const auto& [node, n] : tally.late_by_node[t]) late_by_node[node] += static_cast<double>(n);
  for (const auto& [node, n] : tally.doomed_by_node[t]) late_by_node[node] += static_cast<double>(n) * scale;
  std::vector<int> drawn_position(engine.run_count(), -1);
  for (size_t i = 0; i < engine.drawn_runs().size(); ++i) drawn_position[engine.drawn_runs()[i]] = static_cast<int>(i);
  for (size_t run = first; run < first + f.runs; ++run) {
    if (!engine.fixed(run)) {
      f.run_probability.push_back(static_cast<double>(tally.drawn_ok[static_cast<size_t>(drawn_position[run])]) / draws);
      continue;
    }
    f.run_probability.push_back(engine.fixed_ok(run) ? 1.0 : 0.0);
    if (engine.fixed_ok(run)) continue;
    late += options.draws;
    for (int node : engine.fixed_origins(run)) late_by_node[node] += options.draws;
  }
  if (f.runs == 0) return f;
  const double runs = static_cast<double>(f.runs);
  f.probability = static_cast<double>(tally.ok_sum[t]) / (draws * runs);
  f.standard_error =
      std::sqrt(count_variance(static_cast<double>(tally.ok_sum[t]), static_cast<double>(tally.ok_squares[t]), draws) /
                draws) /
      runs;
  if (options.replicates > 0) {
    f.interval = bootstrap_interval(f.probability, tally, t, runs, static_cast<double>(options.replicate_draws()));
  }
  double most = 0;
  for (const auto& [node, n] : late_by_node) {  // ascending node index: ties keep the lower
    if (n > most) most = n, f.most_often_late = node;
  }
  if (most > 0) f.most_often_late_share = std::min(1.0, most / static_cast<double>(late));
  return f;
}

}  // namespace

int ForecastOptions::replicate_draws() const {
  if (draws_per_replicate > 0) return draws_per_replicate;
  return std::max(2, replicates > 0 ? draws / (2 * replicates) : 2);
}

std::vector<TargetForecast> forecast_targets(const Plan& plan, const LandingModels& models,
                                             std::vector<ForecastTarget> targets, const ForecastOptions& options) {
  const DrawEngine engine(plan, models, std::move(targets));
  const OutcomeTables fitted = OutcomeTables::fitted(models);
  const size_t n_targets = engine.targets().size();
  Job job{engine, fitted, options, std::vector<int64_t>(n_targets, 0)};
  for (size_t run = 0; run < engine.run_count(); ++run) {
    if (engine.fixed(run) && engine.fixed_ok(run)) ++job.fixed_on_time[engine.target_of(run)];
  }
  job.main_units = (options.draws + kDrawsPerUnit - 1) / kDrawsPerUnit;
  job.units = job.main_units + std::max(0, options.replicates);
  int threads = options.threads > 0 ? options.threads : static_cast<int>(std::thread::hardware_concurrency());
  threads = std::clamp(threads, 1, std::max(1, job.units));
  const size_t replicates = static_cast<size_t>(std::max(0, options.replicates));
  std::vector<Tally> tallies(static_cast<size_t>(threads), Tally(engine.drawn_runs().size(), n_targets, replicates));
  std::vector<std::thread> workers;
  for (int i = 1; i < threads; ++i) workers.emplace_back([&job, &tallies, i] { job.run(&tallies[static_cast<size_t>(i)]); });
  job.run(&tallies[0]);
  for (std::thread& w : workers) w.join();
  for (size_t i = 1; i < tallies.size(); ++i) tallies[0].add(tallies[i]);
  std::vector<TargetForecast> out;
  for (size_t t = 0; t < n_targets; ++t) out.push_back(summarise(engine, tallies[0], t, options));
  return out;
}

ForecastTarget run_spec_target(const Plan& plan, int model, int spec, LocalDays from, int days) {
  Model alone = plan.models[static_cast<size_t>(model)];
  alone.runs = {alone.runs[static_cast<size_t>(spec)]};
  ForecastTarget t = model_target(plan, model, from, days);
  t.runs = run_instants(plan, alone, from, days);
  return t;
}

ForecastTarget model_target(const Plan& plan, int model, LocalDays from, int days) {
  const Model& m = plan.models[static_cast<size_t>(model)];
  ForecastTarget t;
  for (int f : m.features) {
    const Node& feature = plan.nodes[static_cast<size_t>(f)];
    t.inputs.push_back({f, feature.max_age.seconds, feature.optional});
  }
  t.runs = run_instants(plan, m, from, days);
  return t;
}

std::vector<int> unmonitored_sources(const Plan& plan, const LandingModels& models, const std::vector<int>& features) {
  std::vector<bool> seen(plan.nodes.size(), false);
  std::vector<int> stack = features, out;
  while (!stack.empty()) {
    const int n = stack.back();
    stack.pop_back();
    if (seen[static_cast<size_t>(n)]) continue;
    seen[static_cast<size_t>(n)] = true;
    if (models.of(n)) continue;
    const Node& node = plan.nodes[static_cast<size_t>(n)];
    if (node.kind == NodeKind::source) out.push_back(n);
    stack.insert(stack.end(), node.inputs.begin(), node.inputs.end());
  }
  std::sort(out.begin(), out.end());
  return out;
}

Instant window_start(const Plan& plan, LocalDays from) {
  return plan.zone->from_local(LocalTime(from.time_since_epoch()));
}

ForecastReport forecast_plan(const Plan& plan, const History& history, LocalDays from, int days,
                             const ForecastOptions& options) {
  ForecastReport report;
  report.from = from;
  report.days = days;
  report.options = options;
  const Instant start = window_start(plan, from);
  report.models = fit_landing_models(plan, history, start, start);
  std::vector<ForecastTarget> targets;
  for (size_t m = 0; m < plan.models.size(); ++m) {
    for (size_t s = 0; s < plan.models[m].runs.size(); ++s) {
      targets.push_back(run_spec_target(plan, static_cast<int>(m), static_cast<int>(s), from, days));
      report.forecasts.push_back({static_cast<int>(m), static_cast<int>(s), targets.back().runs, {}});
    }
  }
  std::vector<TargetForecast> results = forecast_targets(plan, report.models, std::move(targets), options);
  for (size_t i = 0; i < results.size(); ++i) report.forecasts[i].forecast = std::move(results[i]);
  std::vector<int> features;
  for (const Model& m : plan.models) features.insert(features.end(), m.features.begin(), m.features.end());
  report.unmonitored = unmonitored_sources(plan, report.models, features);
  return report;
}

}  // namespace readyby
