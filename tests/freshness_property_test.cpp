#include <catch2/catch.hpp>

#include <random>
#include <sstream>

#include "engine/check.h"
#include "plan/plan_loader.h"
#include "random_plan.h"
#include "reference.h"

using namespace readyby;
using readyby::testing::random_plan;


TEST_CASE("the engine agrees with the literal recursion on random plans across daylight-saving changes") {
  std::mt19937_64 rng(20260308);
  // Windows that contain 2026 transitions: US spring/fall, EU spring/fall,
  // Australian autumn/spring.
  const char* windows[] = {"2026-03-07", "2026-10-31", "2026-03-28", "2026-10-24", "2026-04-04", "2026-10-03"};
  int plans = 0, compared_runs = 0, compared_features = 0;
  for (int i = 0; i < 300; ++i) {
    std::string text = readyby::testing::random_plan(rng, i);
    PlanLoadResult loaded = load_plan_text(text, "random.yaml");
    INFO(text << loaded.rendered);
    if (!loaded.plan) {
      // A random cron can never fire under its calendar (e.g. Sundays under
      // no-sunday); such a plan is invalid and skipped.
      REQUIRE(loaded.rendered.find("never fires") != std::string::npos);
      continue;
    }
    const Plan& plan = *loaded.plan;
    LocalDays from = *parse_date(windows[i % 6]);
    Evaluation ev = evaluate(plan, from, 5);
    reference::Freshness ref(plan);
    // The runs themselves.
    std::vector<std::pair<Instant, std::string>> expected_runs;
    for (const Model& m : plan.models) {
      for (Instant t : reference::run_instants(plan, m, from, 5)) expected_runs.emplace_back(t, m.id);
    }
    std::sort(expected_runs.begin(), expected_runs.end());
    REQUIRE(ev.runs.size() == expected_runs.size());
    for (size_t r = 0; r < ev.runs.size(); ++r) {
      const RunResult& run = ev.runs[r];
      const Model& model = plan.models[static_cast<size_t>(run.model)];
      REQUIRE(run.at == expected_runs[r].first);
      REQUIRE(model.id == expected_runs[r].second);
      bool fail = false, degraded = false;
      for (const FeatureResult& f : run.features) {
        const Node& node = plan.nodes[static_cast<size_t>(f.feature)];
        Instant w = run.at - Seconds(node.max_age.seconds);
        reference::Freshness::Result expected = ref.at(f.feature, w);
        INFO("run " << format_rfc3339(run.at, nullptr) << " feature " << node.id);
        REQUIRE(f.needs_data_through == w);
        REQUIRE(f.ready_at == expected.ready);
        REQUIRE(ev.chain(f) == expected.chain);
        FeatureStatus status = !expected.ready ? FeatureStatus::never
                               : *expected.ready <= run.at ? FeatureStatus::ok
                                                            : FeatureStatus::late;
        REQUIRE(f.status == status);
        if (expected.ready) REQUIRE(f.slack_seconds == (run.at - *expected.ready).count());
        if (status != FeatureStatus::ok) (node.optional ? degraded : fail) = true;
        ++compared_features;
      }
      REQUIRE(run.status == (fail ? RunStatus::fail : degraded ? RunStatus::degraded : RunStatus::ok));
      ++compared_runs;
    }
    ++plans;
  }
  CHECK(plans >= 250);
  CHECK(compared_runs > 3000);
  CHECK(compared_features > 9000);
}
