// Where a forecast's time goes: reading the history, fitting the landing
// models, compiling the draw engine, and one draw (single thread), on a plan
// and history database. Usage: forecast_bench PLAN DB FROM DAYS [DRAWS]
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <ctime>

#include "forecast/draw_engine.h"
#include "forecast/forecast.h"
#include "history/store.h"
#include "plan/plan_loader.h"
#include "time/zone.h"

using namespace readyby;

namespace {

double seconds_since(std::chrono::steady_clock::time_point t0) {
  return std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
}

// CPU seconds of this thread (the figures do not suffer from a busy machine).
double cpu_seconds() {
  timespec t;
  clock_gettime(CLOCK_THREAD_CPUTIME_ID, &t);
  return static_cast<double>(t.tv_sec) + static_cast<double>(t.tv_nsec) * 1e-9;
}

}  // namespace

int main(int argc, char** argv) {
  if (argc < 5) {
    std::fprintf(stderr, "usage: forecast_bench PLAN DB FROM DAYS [DRAWS]\n");
    return 2;
  }
  const int days = std::atoi(argv[4]);
  const int draws = argc > 5 ? std::atoi(argv[5]) : 20;
  auto t0 = std::chrono::steady_clock::now();
  PlanLoadResult loaded = load_plan_file(argv[1]);
  if (!loaded.plan) {
    std::fputs(loaded.rendered.c_str(), stderr);
    return 2;
  }
  const Plan& plan = *loaded.plan;
  std::printf("load plan: %.2f s\n", seconds_since(t0));
  t0 = std::chrono::steady_clock::now();
  std::string error;
  auto store = HistoryStore::open(argv[2], HistoryStore::Mode::existing, &error);
  if (!store) {
    std::fprintf(stderr, "%s\n", error.c_str());
    return 2;
  }
  std::optional<History> history = store->read(plan, from_unix(0), &error);
  if (!history) return 2;
  std::printf("read history: %.2f s\n", seconds_since(t0));
  const LocalDays from = *parse_date(argv[3]);
  t0 = std::chrono::steady_clock::now();
  const Instant start = window_start(plan, from);
  LandingModels models = fit_landing_models(plan, *history, start, start);
  std::printf("fit %zu landing models: %.2f s\n", models.models.size(), seconds_since(t0));
  t0 = std::chrono::steady_clock::now();
  std::vector<ForecastTarget> targets;
  for (size_t m = 0; m < plan.models.size(); ++m) {
    for (size_t s = 0; s < plan.models[m].runs.size(); ++s) {
      targets.push_back(run_spec_target(plan, static_cast<int>(m), static_cast<int>(s), from, days));
    }
  }
  DrawEngine engine(plan, models, targets);
  std::printf("compile: %.2f s (%zu runs, %zu drawn, %zu of those doomed, %zu drawn nodes)\n", seconds_since(t0),
              engine.run_count(), engine.drawn_runs().size(), engine.doomed_count(), engine.drawn_node_count());
  const OutcomeTables fitted = OutcomeTables::fitted(models);
  DrawEngine::ScratchPtr scratch = engine.make_scratch();
  DrawResult result;
  t0 = std::chrono::steady_clock::now();
  const double cpu0 = cpu_seconds();
  size_t on_time = 0;
  for (int d = 0; d < draws; ++d) {
    engine.run_draw(fitted, DrawMode::independent, stream_seed(1, 1, static_cast<uint64_t>(d)), scratch.get(), &result);
    for (uint8_t ok : result.ok) on_time += ok;
  }
  const double per_draw = seconds_since(t0) / draws;
  const double cpu_per_draw = (cpu_seconds() - cpu0) / draws;
  std::printf("one full draw: %.2f ms wall, %.2f ms CPU (%d draws, %zu drawn runs on time in all)\n",
              per_draw * 1000, cpu_per_draw * 1000, draws, on_time);
  const double cpu1 = cpu_seconds();
  for (int d = 0; d < draws; ++d) {
    engine.run_draw(fitted, DrawMode::independent, stream_seed(1, 1, static_cast<uint64_t>(d)), scratch.get(), &result,
                    false);
  }
  std::printf("one draw without doomed runs: %.2f ms CPU\n", (cpu_seconds() - cpu1) / draws * 1000);
  return 0;
}
