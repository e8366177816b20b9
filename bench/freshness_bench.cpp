// Profiles versus per-run recursion: the two ways of evaluating E_n(w) that
// src/engine/freshness.h weighs. Loads a plan, evaluates every run of a window
// with the engine (profiles built once, lookups per run), then evaluates the
// same runs by the recursion of DESIGN §4 with a memo keyed on (node, w), and
// checks that both agree. Usage: freshness_bench PLAN FROM DAYS [MAX_RUNS]
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <unordered_map>

#include "engine/check.h"
#include "plan/plan_loader.h"

using namespace readyby;

namespace {

struct Recursion {
  const Plan& plan;
  std::unordered_map<uint64_t, std::optional<int64_t>> memo;
  size_t evaluations = 0;

  std::optional<int64_t> at(int n, int64_t w) {
    uint64_t key = (static_cast<uint64_t>(n) << 40) ^ static_cast<uint64_t>(w);
    auto it = memo.find(key);
    if (it != memo.end()) return it->second;
    ++evaluations;
    const Node& node = plan.nodes[static_cast<size_t>(n)];
    std::optional<int64_t> e;
    if (node.kind == NodeKind::source) {
      if (node.stream) {
        e = w + node.lands_after.seconds;
      } else {
        auto s = next_occurrence(*node.schedule, *node.zone, plan.calendar(node.calendar),
                                 from_unix(w + node.data_lag.seconds));
        if (s) e = to_unix(*s) + node.lands_after.seconds;
      }
    } else {
      int64_t m = INT64_MIN;
      bool never = false;
      for (int i : node.inputs) {
        auto v = at(i, w);
        if (!v) { never = true; break; }
        m = std::max(m, *v);
      }
      if (!never) {
        if (node.trigger) {
          auto c = next_occurrence(*node.trigger, *node.zone, plan.calendar(node.calendar), from_unix(m));
          if (c) e = to_unix(*c) + node.run_time.seconds;
        } else {
          e = m + node.run_time.seconds;
        }
      }
    }
    memo.emplace(key, e);
    return e;
  }
};

double seconds_since(std::chrono::steady_clock::time_point t0) {
  return std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
}

}  // namespace

int main(int argc, char** argv) {
  if (argc < 4) {
    std::fprintf(stderr, "usage: freshness_bench PLAN FROM DAYS [MAX_RUNS]\n");
    return 2;
  }
  PlanLoadResult loaded = load_plan_file(argv[1]);
  if (!loaded.plan) {
    std::fputs(loaded.rendered.c_str(), stderr);
    return 2;
  }
  const Plan& plan = *loaded.plan;
  size_t max_runs = argc > 4 ? static_cast<size_t>(std::atol(argv[4])) : SIZE_MAX;
  auto t0 = std::chrono::steady_clock::now();
  Evaluation ev = evaluate(plan, *parse_date(argv[2]), std::atoi(argv[3]));
  double profile_secs = seconds_since(t0);
  size_t features = 0;
  for (const RunResult& r : ev.runs) features += r.features.size();
  std::printf("profiles:  %zu runs, %zu feature lookups, %zu pieces, %.2f s\n", ev.runs.size(), features,
              ev.engine().piece_count(), profile_secs);

  Recursion rec{plan, {}, 0};
  size_t runs = std::min(max_runs, ev.runs.size());
  size_t mismatches = 0;
  t0 = std::chrono::steady_clock::now();
  for (size_t i = 0; i < runs; ++i) {
    for (const FeatureResult& f : ev.runs[i].features) {
      auto e = rec.at(f.feature, to_unix(f.needs_data_through));
      std::optional<int64_t> engine = f.ready_at ? std::optional<int64_t>(to_unix(*f.ready_at)) : std::nullopt;
      if (e != engine) ++mismatches;
    }
  }
  double recursion_secs = seconds_since(t0);
  std::printf("recursion: %zu runs, %zu node evaluations (memo), %.2f s%s; %zu mismatches\n", runs, rec.evaluations,
              recursion_secs, runs < ev.runs.size() ? " (a prefix of the runs)" : "", mismatches);
  return mismatches == 0 ? 0 : 1;
}
