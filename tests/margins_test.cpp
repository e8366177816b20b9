#include <catch2/catch.hpp>

#include <random>

#include "engine/edit.h"
#include "engine/margins.h"
#include "plan/plan_loader.h"
#include "plan_fixture.h"
#include "random_plan.h"

using namespace readyby;
using readyby::testing::plan_from_text;

namespace {

// Runs ok in `base` that are not ok in `after` (same window, no runs edit).
std::vector<const RunResult*> newly_not_ok(const Evaluation& base, const Evaluation& after) {
  std::vector<const RunResult*> out;
  REQUIRE(base.runs.size() == after.runs.size());
  for (size_t r = 0; r < base.runs.size(); ++r) {
    if (base.runs[r].status == RunStatus::ok && after.runs[r].status != RunStatus::ok) out.push_back(&after.runs[r]);
  }
  return out;
}

}  // namespace

TEST_CASE("critical path method: the margin of each activity is its total float") {
  // The network of the critical-path test in freshness_test.cpp: solved
  // problem of the project-management chapter in Heizer & Render,
  // "Operations Management" (from memory): A(1) B(4,A) C(3,A) D(7,A) E(6,B)
  // F(2,C D) G(7,E F) H(9,D) I(4,G H), project length 22. Backward pass
  // (latest finish LF, latest start LS = LF - duration) against the forward
  // pass's earliest start ES: total float = LS - ES =
  // A 0, B 0, C 5, D 1, E 0, F 1, G 0, H 1, I 0 (critical path A-B-E-G-I).
  // Reduction as there: a stream source `start`, each activity an
  // inputs-triggered job with run_time = its duration in hours, the finish a
  // feature with max_age = 22h; a delay of an activity lengthens it.
  Plan plan = plan_from_text(R"(plan: cpm
timezone: Etc/UTC
sources:
  start:
    schedule: stream
jobs:
  A: {inputs: [start], run_time: PT1H}
  B: {inputs: [A], run_time: PT4H}
  C: {inputs: [A], run_time: PT3H}
  D: {inputs: [A], run_time: PT7H}
  E: {inputs: [B], run_time: PT6H}
  F: {inputs: [C, D], run_time: PT2H}
  G: {inputs: [E, F], run_time: PT7H}
  H: {inputs: [D], run_time: PT9H}
  I: {inputs: [G, H], run_time: PT4H}
features:
  finish: {inputs: [I], max_age: PT22H}
models:
  project:
    features: [finish]
    runs:
      - at: "0 0 * * *"
)");
  Evaluation ev = evaluate(plan, *parse_date("2026-05-01"), 1);
  REQUIRE(ev.runs.size() == 1);
  REQUIRE(ev.runs[0].status == RunStatus::ok);
  std::vector<Margin> m = margins(plan, ev, MarginOptions{MarginOptions::Check::full});
  struct Case {
    const char* activity;
    int total_float_hours;
  } cases[] = {{"start", 0}, {"A", 0}, {"B", 0}, {"C", 5}, {"D", 1}, {"E", 0},
               {"F", 1},     {"G", 0}, {"H", 1}, {"I", 0}, {"finish", 0}};
  for (const Case& c : cases) {
    INFO(c.activity);
    const Margin& margin = m[static_cast<size_t>(plan.find_node(c.activity))];
    REQUIRE(margin.seconds);
    CHECK(*margin.seconds == c.total_float_hours * 3600);
    CHECK(margin.binding_model == 0);
    CHECK(margin.binding_at == ev.runs[0].at);
    CHECK(margin.method == Margin::Method::cone_checked);
  }
}

TEST_CASE("margins on the hand-made plan: binding runs, optional features and unused nodes") {
  Plan plan = plan_from_text(R"(plan: margins
timezone: America/Chicago
sources:
  feed:
    schedule: "30 2 * * *"
    lands_after: PT40M
  stream: {schedule: stream, lands_after: PT5M}
  spare: {schedule: "0 1 * * *"}
jobs:
  clean:
    inputs: [feed]
    trigger: "0 4 * * *"
    run_time: PT10M
features:
  early: {inputs: [clean], max_age: PT6H}
  extra: {inputs: [stream], max_age: PT1H, optional: true}
  lonely: {inputs: [spare], max_age: PT1H}
models:
  ward:
    features: [early, extra]
    runs:
      - at: "0 6 * * *"
)");
  Evaluation ev = evaluate(plan, *parse_date("2026-03-02"), 3);
  std::vector<Margin> m = margins(plan, ev);
  auto of = [&](const char* id) -> const Margin& { return m[static_cast<size_t>(plan.find_node(id))]; };
  // feed lands 03:10 for a 04:00 start: 50 minutes; a minute more misses the
  // start and waits a day.
  REQUIRE(of("feed").seconds);
  CHECK(*of("feed").seconds == 50 * 60);
  // clean finishes 04:10 for a 06:00 run.
  CHECK(*of("clean").seconds == 110 * 60);
  // The optional feature binds too: ok -> degraded counts. Needs data through
  // 05:00, the stream has it at 05:05 for a 06:00 run.
  CHECK(*of("stream").seconds == 55 * 60);
  CHECK(*of("extra").seconds == 55 * 60);
  // Nothing any model reads.
  CHECK_FALSE(of("spare").seconds);
  CHECK_FALSE(of("lonely").seconds);
  CHECK(of("spare").binding_model == -1);
  // The binding run is the first run of the window.
  CHECK(of("feed").binding_at == ev.runs[0].at);
}

TEST_CASE("margins hold under re-evaluation on random plans: margin keeps every ok run, a minute more does not") {
  std::mt19937_64 rng(20260310);
  const char* windows[] = {"2026-03-07", "2026-10-31", "2026-03-28", "2026-10-24", "2026-04-04", "2026-10-03"};
  int plans = 0, bounded = 0, unbounded = 0, by_bisection = 0;
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
    std::vector<Margin> result = margins(plan, base);
    for (const Margin& m : result) {
      const std::string& id = plan.nodes[static_cast<size_t>(m.node)].id;
      INFO("node " << id);
      if (m.method == Margin::Method::bisection) ++by_bisection;
      if (m.seconds) CHECK(m.method == Margin::Method::binding_run_checked);
      if (!m.seconds) {
        // Unbounded: even a week's delay changes no ok run.
        std::vector<Edit> week = {Edit::delay(m.node, 7 * 86400)};
        Plan edited = apply_edits(plan, week);
        CHECK(newly_not_ok(base, reevaluate(base, edited, week)).empty());
        ++unbounded;
        continue;
      }
      REQUIRE(*m.seconds % 60 == 0);
      INFO("margin " << *m.seconds);
      std::vector<Edit> at_margin = {Edit::delay(m.node, *m.seconds)};
      Plan edited = apply_edits(plan, at_margin);
      CHECK(newly_not_ok(base, reevaluate(base, edited, at_margin)).empty());
      std::vector<Edit> past = {Edit::delay(m.node, *m.seconds + 60)};
      Plan edited_past = apply_edits(plan, past);
      Evaluation after = reevaluate(base, edited_past, past);
      std::vector<const RunResult*> broken = newly_not_ok(base, after);
      REQUIRE_FALSE(broken.empty());
      // The binding run is one of them.
      bool binding_broken = false;
      for (const RunResult* r : broken) binding_broken = binding_broken || (r->model == m.binding_model && r->at == m.binding_at);
      CHECK(binding_broken);
      ++bounded;
    }
    ++plans;
  }
  CHECK(plans >= 300);
  CHECK(bounded > 500);
  CHECK(unbounded > 20);
  // The backward pass was right every time: no margin needed the fallback.
  CHECK(by_bisection == 0);
}
