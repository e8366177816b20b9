#include <catch2/catch.hpp>

#include <random>
#include <sstream>

#include "engine/check.h"
#include "plan/plan_loader.h"
#include "reference.h"

using namespace readyby;

namespace {

// A random valid plan in YAML: several zones, calendars, cron sources (often
// in the hours a spring-forward gap removes), streams, cron-triggered jobs
// and features, optional features, per-node zones.
std::string random_plan(std::mt19937_64& rng, int index) {
  auto pick = [&](int n) { return static_cast<int>(rng() % static_cast<uint64_t>(n)); };
  const char* zones[] = {"America/Chicago", "Europe/London", "Australia/Sydney", "Australia/Lord_Howe",
                         "Asia/Kolkata", "America/New_York"};
  auto minutes = [&](int max) { return "PT" + std::to_string(pick(max + 1)) + "M"; };
  auto cron = [&]() {
    const char* hours[] = {"1", "2", "3", "0", "5", "*/4", "2,14", "23", "1-3"};
    const char* days[] = {"* * *", "* * *", "* * mon-fri", "* * 0", "1,15 * *", "* * 1"};
    int minute = pick(4) == 0 ? 0 : pick(60);
    return "\"" + std::to_string(minute) + " " + hours[pick(9)] + " " + days[pick(6)] + "\"";
  };
  std::ostringstream y;
  y << "plan: random-" << index << "\ntimezone: " << zones[pick(6)] << "\n";
  y << "calendars:\n  weekdays: {skip_weekdays: [sat, sun]}\n  no-sunday: {skip_weekdays: [sun]}\n"
    << "  holiday: {skip_dates: [2026-03-08, 2026-10-04, 2026-11-01]}\n";
  const char* calendars[] = {"weekdays", "no-sunday", "holiday"};
  std::vector<std::string> ids;
  int sources = 2 + pick(3);
  y << "sources:\n";
  for (int i = 0; i < sources; ++i) {
    std::string id = "s" + std::to_string(i);
    y << "  " << id << ":\n";
    if (pick(4) == 0) {
      y << "    schedule: stream\n    lands_after: " << minutes(90) << "\n";
    } else {
      y << "    schedule: " << cron() << "\n    lands_after: " << minutes(120) << "\n    data_lag: PT"
        << pick(27) << "H\n";
      if (pick(3) == 0) y << "    timezone: " << zones[pick(6)] << "\n";
      if (pick(3) == 0) y << "    calendar: " << calendars[pick(3)] << "\n";
    }
    ids.push_back(id);
  }
  auto derived = [&](const std::string& id, bool feature) {
    y << "  " << id << ":\n    inputs: [";
    int n = 1 + pick(3);
    for (int k = 0; k < n; ++k) y << (k ? ", " : "") << ids[static_cast<size_t>(pick(static_cast<int>(ids.size())))];
    y << "]\n    run_time: " << minutes(45) << "\n";
    if (pick(3) == 0) {
      y << "    trigger: " << cron() << "\n";
      if (pick(3) == 0) y << "    timezone: " << zones[pick(6)] << "\n";
      if (pick(4) == 0) y << "    calendar: " << calendars[pick(3)] << "\n";
    }
    if (feature) {
      y << "    max_age: PT" << (1 + pick(30)) << "H\n";
      if (pick(4) == 0) y << "    optional: true\n";
    }
  };
  int jobs = 1 + pick(4);
  y << "jobs:\n";
  for (int i = 0; i < jobs; ++i) {
    std::string id = "j" + std::to_string(i);
    derived(id, false);
    ids.push_back(id);
  }
  int features = 2 + pick(3);
  std::vector<std::string> feature_ids;
  y << "features:\n";
  for (int i = 0; i < features; ++i) {
    std::string id = "f" + std::to_string(i);
    derived(id, true);
    ids.push_back(id);
    feature_ids.push_back(id);
  }
  y << "models:\n";
  const char* runs[] = {"0 6 * * *", "30 2 * * *", "0 */6 * * *", "15 7 * * mon-fri", "45 1 * * *"};
  for (int m = 0; m < 1 + pick(2); ++m) {
    y << "  m" << m << ":\n";
    if (pick(3) == 0) y << "    timezone: " << zones[pick(6)] << "\n";
    y << "    features: [";
    for (size_t k = 0; k < feature_ids.size(); ++k) y << (k ? ", " : "") << feature_ids[k];
    y << "]\n    runs:\n";
    for (int r = 0; r < 1 + pick(2); ++r) {
      y << "      - at: \"" << runs[pick(5)] << "\"\n";
      if (pick(4) == 0) y << "        calendar: " << calendars[pick(3)] << "\n";
    }
  }
  return y.str();
}

}  // namespace

TEST_CASE("the engine agrees with the literal recursion on random plans across daylight-saving changes") {
  std::mt19937_64 rng(20260308);
  // Windows that contain 2026 transitions: US spring/fall, EU spring/fall,
  // Australian autumn/spring.
  const char* windows[] = {"2026-03-07", "2026-10-31", "2026-03-28", "2026-10-24", "2026-04-04", "2026-10-03"};
  int plans = 0, compared_runs = 0, compared_features = 0;
  for (int i = 0; i < 300; ++i) {
    std::string text = random_plan(rng, i);
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
