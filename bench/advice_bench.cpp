// The counterfactual commands' engines on a large plan: what-if (one delay,
// re-evaluating its downstream cone), margins (backward pass, then each
// margin checked by re-evaluating its binding run, or with `full` its whole
// downstream cone at M and M+1m) and impact, phase by phase.
// Usage: advice_bench PLAN FROM DAYS [NODE,... [full|what-if]]
// (NODE: the nodes to delay for what-if, default the first node; `what-if`
// stops after them).
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <ctime>
#include <string>

#include "engine/edit.h"
#include "engine/impact.h"
#include "engine/margins.h"
#include "plan/plan_loader.h"

using namespace readyby;

namespace {

// Process CPU seconds: on a shared machine wall time mostly measures the
// neighbours, so each phase reports both.
double cpu_now() { return static_cast<double>(std::clock()) / CLOCKS_PER_SEC; }

struct Stopwatch {
  std::chrono::steady_clock::time_point wall = std::chrono::steady_clock::now();
  double cpu = cpu_now();
};

std::string since(const Stopwatch& t) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.2f s CPU, %.2f s wall", cpu_now() - t.cpu,
                std::chrono::duration<double>(std::chrono::steady_clock::now() - t.wall).count());
  return buf;
}

}  // namespace

int main(int argc, char** argv) {
  if (argc < 4) {
    std::fprintf(stderr, "usage: advice_bench PLAN FROM DAYS [NODE,... [full|what-if]]\n");
    return 2;
  }
  Stopwatch t0;
  PlanLoadResult loaded = load_plan_file(argv[1]);
  if (!loaded.plan) {
    std::fputs(loaded.rendered.c_str(), stderr);
    return 2;
  }
  const Plan& plan = *loaded.plan;
  std::printf("load: %s (%zu nodes, %zu models)\n", since(t0).c_str(), plan.nodes.size(), plan.models.size());
  t0 = Stopwatch();
  Evaluation base = evaluate(plan, *parse_date(argv[2]), std::atoi(argv[3]));
  size_t ok = 0;
  for (const RunResult& r : base.runs) ok += r.status == RunStatus::ok ? 1 : 0;
  std::printf("evaluate: %s (%zu runs, %zu ok; %zu profile pieces)\n", since(t0).c_str(), base.runs.size(), ok,
              base.engine().piece_count());

  // what-if: one delay per listed node, each re-evaluated on its own.
  std::string nodes = argc > 4 ? argv[4] : plan.nodes.front().id;
  for (size_t start = 0; start <= nodes.size();) {
    size_t comma = nodes.find(',', start);
    std::string id = nodes.substr(start, comma == std::string::npos ? std::string::npos : comma - start);
    start = comma == std::string::npos ? nodes.size() + 1 : comma + 1;
    int node = plan.find_node(id);
    if (node < 0) {
      std::fprintf(stderr, "no node %s\n", id.c_str());
      return 2;
    }
    t0 = Stopwatch();
    std::vector<Edit> edits = {Edit::delay(node, 30 * 60)};
    Plan edited = apply_edits(plan, edits);
    std::string copy = since(t0);
    Evaluation after = reevaluate(base, edited, edits);
    std::vector<StatusChange> changes = status_changes(base, after);
    std::printf("what-if delay %s=PT30M: %s (plan copy %s; %zu profiles rebuilt, %zu runs change)\n", id.c_str(),
                since(t0).c_str(), copy.c_str(), after.engine().own_profile_count(), changes.size());
  }
  if (argc > 5 && std::string(argv[5]) == "what-if") return 0;

  auto run_margins = [&](const char* what, MarginOptions::Check check, const std::vector<Margin>* pass) {
    Stopwatch t;
    std::vector<Margin> result = margins(plan, base, MarginOptions{check});
    size_t bounded = 0, reevaluations = 0, bisections = 0, differ = 0;
    for (size_t n = 0; n < result.size(); ++n) {
      bounded += result[n].seconds ? 1 : 0;
      reevaluations += static_cast<size_t>(result[n].reevaluations);
      bisections += result[n].method == Margin::Method::bisection ? 1 : 0;
      differ += pass && result[n].seconds != (*pass)[n].seconds ? 1 : 0;
    }
    std::printf("margins, %s: %s (%zu of %zu nodes bounded; %zu cone re-evaluations, %zu bisections, %zu differ "
                "from the backward pass)\n",
                what, since(t).c_str(), bounded, result.size(), reevaluations, bisections, differ);
    return result;
  };
  std::vector<Margin> pass = run_margins("backward pass only", MarginOptions::Check::none, nullptr);
  run_margins("as the command runs (binding runs re-evaluated)", MarginOptions::Check::binding_run, &pass);
  if (argc > 5 && std::string(argv[5]) == "full") {
    run_margins("every cone re-evaluated at M and M+1m", MarginOptions::Check::full, &pass);
  }

  t0 = Stopwatch();
  std::vector<NodeImpact> result = impact(plan, base);
  size_t spof = 0;
  for (const NodeImpact& i : result) spof += i.single_point_of_failure() ? 1 : 0;
  std::printf("impact: %s (%zu single points of failure)\n", since(t0).c_str(), spof);
  return 0;
}
