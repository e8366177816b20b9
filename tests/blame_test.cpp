#include <catch2/catch.hpp>

#include "engine/blame.h"
#include "engine/check.h"
#include "plan/plan_loader.h"
#include "plan_fixture.h"

using namespace readyby;

namespace {

const Plan& demo_plan() {
  static const Plan plan = [] {
    PlanLoadResult r = load_plan_file(std::string(READYBY_SOURCE_DIR) + "/pipelines/larkspur.plan.yaml");
    REQUIRE(r.plan);
    return std::move(*r.plan);
  }();
  return plan;
}

std::string rfc(const std::optional<Instant>& t, const Plan& plan) {
  return t ? format_rfc3339(*t, plan.zone) : "never";
}

// One feature of one run, blamed.
Blame blame_of(const Plan& plan, const char* model, const char* local, const char* feature) {
  const int m = plan.find_model(model);
  const Instant at = plan.models[static_cast<size_t>(m)].zone->from_local(*parse_local_datetime(local));
  Evaluation ev = evaluate_single(plan, m, at);
  const int f = plan.find_node(feature);
  const Instant w = at - Seconds(plan.nodes[static_cast<size_t>(f)].max_age.seconds);
  return blame(plan, ev.engine(), f, w, at);
}

}  // namespace

TEST_CASE("blame: each step's own lateness and the cause, on the demo plan") {
  const Plan& plan = demo_plan();
  struct Step {
    const char* node;
    int64_t own, waited;
    bool deadline_before_data;
  };
  struct Case {
    const char* name;
    const char* model;
    const char* at;
    const char* feature;
    const char* cause;
    CauseKind kind;
    std::vector<Step> steps;
  } cases[] = {
      // census_snapshot's 02:30 start falls in the 2026-03-08 gap (tz database:
      // America/Chicago 02:00 CST -> 03:00 CDT) and runs at 03:30 CDT, after
      // 03:15, the latest start that keeps the 06:30 run on time. The stream
      // adt_events landed 17:35 the day before: on time, not to blame (its
      // back-propagated deadline, the previous 02:30 start, is before its data).
      {"daylight-saving gap", "discharge_delay", "2026-03-08T06:30", "census_los", "census_snapshot",
       CauseKind::late_start,
       {{"adt_events", 0, 0, true}, {"census_snapshot", 900, 0, false}, {"los_features", 0, 900, false},
        {"census_los", 0, 900, false}}},
      // hie_merge starts at 03:00 CDT, before reference_lab lands at 03:30 CDT
      // (01:30 MST): that start reads old data; the next is 03-10 03:00 + 10m,
      // 20h 10m after the 07:00 run. The delivery is 30m after that start.
      {"stale start", "readmit_risk", "2026-03-09T07:00", "outside_labs", "hie_merge", CauseKind::stale_start,
       {{"reference_lab", 1800, 0, false}, {"hie_merge", 20 * 3600 + 600, 0, false},
        {"outside_labs", 0, 20 * 3600 + 600, false}}},
      // bed_board delivers Monday 07:00 + 20m; the 06:30 run needs it by 06:30.
      {"late delivery", "discharge_delay", "2026-02-23T06:30", "planned_discharges", "bed_board",
       CauseKind::late_delivery, {{"bed_board", 3000, 0, false}, {"planned_discharges", 0, 3000, false}}},
      {"on time", "discharge_delay", "2026-02-24T06:30", "planned_discharges", "", CauseKind::none,
       {{"bed_board", 0, 0, false}, {"planned_discharges", 0, 0, false}}},
  };
  for (const Case& c : cases) {
    INFO(c.name);
    Blame b = blame_of(plan, c.model, c.at, c.feature);
    CHECK(b.kind == c.kind);
    CHECK((b.cause < 0 ? std::string() : plan.nodes[static_cast<size_t>(b.cause_node())].id) == c.cause);
    REQUIRE(b.steps.size() == c.steps.size());
    for (size_t i = 0; i < c.steps.size(); ++i) {
      INFO("step " << c.steps[i].node);
      CHECK(plan.nodes[static_cast<size_t>(b.steps[i].node)].id == c.steps[i].node);
      CHECK(b.steps[i].own_late_seconds == c.steps[i].own);
      CHECK(b.steps[i].waited_seconds == c.steps[i].waited);
      CHECK(b.steps[i].deadline_before_data == c.steps[i].deadline_before_data);
    }
  }
}

TEST_CASE("blame: facts of the cause step") {
  const Plan& plan = demo_plan();
  Blame gap = blame_of(plan, "discharge_delay", "2026-03-08T06:30", "census_los");
  const BlameStep& snapshot = gap.steps[1];
  CHECK(rfc(snapshot.start, plan) == "2026-03-08T03:30:00-05:00");
  CHECK(rfc(snapshot.start_by, plan) == "2026-03-08T03:15:00-05:00");
  REQUIRE(snapshot.gap_nominal);
  CHECK(format_local(*snapshot.gap_nominal) == "2026-03-08 02:30");
  CHECK_FALSE(snapshot.stale_start);

  Blame stale = blame_of(plan, "readmit_risk", "2026-03-09T07:00", "outside_labs");
  const BlameStep& merge = stale.steps[1];
  CHECK(rfc(merge.stale_start, plan) == "2026-03-09T03:00:00-05:00");
  CHECK(rfc(merge.input_ready, plan) == "2026-03-09T03:30:00-05:00");
  CHECK(rfc(merge.start, plan) == "2026-03-10T03:00:00-05:00");
  CHECK(rfc(merge.start_by, plan) == "2026-03-09T06:50:00-05:00");
}

TEST_CASE("blame: a step whose run time alone misses the run is slow on its own account") {
  Plan plan = testing::plan_from_text(R"(plan: slow
timezone: Etc/UTC
sources:
  events: {schedule: stream, lands_after: PT5M}
jobs:
  rollup: {inputs: [events], run_time: PT3H}
features:
  recent: {inputs: [rollup], max_age: PT2H}
models:
  m:
    features: [recent]
    runs:
      - at: "0 6 * * *"
)");
  Blame b = blame_of(plan, "m", "2026-05-04T06:00", "recent");
  // w = 04:00: rollup lands 04:05 + 3h = 07:05, 1h 05m late; its input's
  // deadline (06:00 - 3h = 03:00) is before the data exists.
  CHECK(b.kind == CauseKind::slow_step);
  CHECK(plan.nodes[static_cast<size_t>(b.cause_node())].id == "rollup");
  CHECK(b.steps[0].own_late_seconds == 0);
  CHECK(b.steps[0].deadline_before_data);
  CHECK(b.steps[1].own_late_seconds == 3900);
}
