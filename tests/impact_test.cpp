#include <catch2/catch.hpp>

#include <map>
#include <random>

#include "engine/edit.h"
#include "engine/impact.h"
#include "plan/plan_loader.h"
#include "plan_fixture.h"
#include "random_plan.h"

using namespace readyby;
using readyby::testing::plan_from_text;

TEST_CASE("impact: runs failed and degraded per model, ranked, single points of failure") {
  Plan plan = plan_from_text(R"(plan: impact
timezone: Etc/UTC
sources:
  shared: {schedule: stream}
  side: {schedule: stream}
  spare: {schedule: stream}
jobs:
  clean: {inputs: [shared]}
features:
  a: {inputs: [clean], max_age: PT1H}
  b: {inputs: [shared], max_age: PT1H}
  c: {inputs: [side], max_age: PT1H, optional: true}
models:
  one:
    features: [a, c]
    runs:
      - at: "0 6 * * *"
  two:
    features: [b]
    runs:
      - at: "0 7 * * *"
      - at: "0 19 * * *"
)");
  Evaluation ev = evaluate(plan, *parse_date("2026-05-01"), 2);
  std::vector<NodeImpact> result = impact(plan, ev);
  REQUIRE(result.size() == plan.nodes.size());
  struct Case {
    const char* node;
    int failed, degraded;
    bool spof;
    std::vector<std::tuple<const char*, int, int>> models;
  } cases[] = {
      {"shared", 6, 0, true, {{"one", 2, 0}, {"two", 4, 0}}},
      {"b", 4, 0, false, {{"two", 4, 0}}},
      {"clean", 2, 0, false, {{"one", 2, 0}}},
      {"a", 2, 0, false, {{"one", 2, 0}}},
      {"side", 0, 2, false, {{"one", 0, 2}}},
      {"c", 0, 2, false, {{"one", 0, 2}}},
      {"spare", 0, 0, false, {}},
  };
  // Ranked: most failed, then most degraded, then plan order.
  for (size_t k = 0; k < std::size(cases); ++k) {
    const Case& c = cases[k];
    INFO(c.node);
    const NodeImpact& got = result[k];
    CHECK(plan.nodes[static_cast<size_t>(got.node)].id == c.node);
    CHECK(got.failed_runs == c.failed);
    CHECK(got.degraded_runs == c.degraded);
    CHECK(got.single_point_of_failure() == c.spof);
    REQUIRE(got.models.size() == c.models.size());
    for (size_t j = 0; j < c.models.size(); ++j) {
      CHECK(plan.models[static_cast<size_t>(got.models[j].model)].id == std::get<0>(c.models[j]));
      CHECK(got.models[j].fail == std::get<1>(c.models[j]));
      CHECK(got.models[j].degrade == std::get<2>(c.models[j]));
    }
  }
}

TEST_CASE("impact equals re-evaluation with the node failed, on random plans") {
  std::mt19937_64 rng(20260311);
  const char* windows[] = {"2026-03-07", "2026-10-31", "2026-03-28", "2026-10-24", "2026-04-04", "2026-10-03"};
  int plans = 0, nodes = 0, changed = 0;
  for (int i = 0; i < 360; ++i) {
    std::string text = readyby::testing::random_plan(rng, i);
    PlanLoadResult loaded = load_plan_text(text, "random.yaml");
    if (!loaded.plan) continue;
    // Older data suffices: most runs are ok, so there is something to lose.
    Plan plan = std::move(*loaded.plan);
    for (Node& n : plan.nodes) {
      if (n.kind == NodeKind::feature) n.max_age.seconds += 3 * 86400;
    }
    INFO(text);
    Evaluation base = evaluate(plan, *parse_date(windows[i % 6]), 4);
    for (const NodeImpact& got : impact(plan, base)) {
      INFO("node " << plan.nodes[static_cast<size_t>(got.node)].id);
      std::vector<Edit> fail = {Edit::fail(got.node)};
      Plan edited = apply_edits(plan, fail);
      Evaluation after = reevaluate(base, edited, fail);
      std::map<int, std::pair<int, int>> expected;  // model -> (fail, degrade)
      for (size_t r = 0; r < base.runs.size(); ++r) {
        RunStatus was = base.runs[r].status, now = after.runs[r].status;
        if (was != RunStatus::fail && now == RunStatus::fail) ++expected[base.runs[r].model].first;
        if (was == RunStatus::ok && now == RunStatus::degraded) ++expected[base.runs[r].model].second;
      }
      std::map<int, std::pair<int, int>> reported;
      int failed = 0, degraded = 0;
      for (const ModelImpact& m : got.models) {
        reported[m.model] = {m.fail, m.degrade};
        failed += m.fail;
        degraded += m.degrade;
      }
      CHECK(reported == expected);
      CHECK(got.failed_runs == failed);
      CHECK(got.degraded_runs == degraded);
      changed += failed + degraded > 0 ? 1 : 0;
      ++nodes;
    }
    ++plans;
  }
  CHECK(plans >= 300);
  CHECK(nodes > 1000);
  CHECK(changed > 500);
}
