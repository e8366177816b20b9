#include <catch2/catch.hpp>

#include "plan_fixture.h"

#include <sstream>

#include "engine/check.h"
#include "plan/plan_loader.h"
#include "report/check_json.h"

using namespace readyby;

namespace {

Plan load(const std::string& text) {
  return readyby::testing::plan_from_text(text);
}

std::string rfc(std::optional<Instant> t, const Plan& plan) {
  return t ? format_rfc3339(*t, plan.zone) : "never";
}

std::string chain_of(const Plan& plan, const Evaluation& ev, const FeatureResult& f) {
  std::string out;
  for (int n : ev.chain(f)) out += (out.empty() ? "" : ",") + plan.nodes[static_cast<size_t>(n)].id;
  return out;
}

// The example plan of DESIGN §3/§5.
const char kWardPlan[] = R"(plan: ward-aki
title: Ward example (fictional)
timezone: America/Chicago
sources:
  lab_batch:
    schedule: "30 2 * * *"
    lands_after: PT40M
    data_lag: PT2H30M
jobs:
  labs_clean:
    inputs: [lab_batch]
    run_time: PT15M
features:
  creat_delta:
    inputs: [labs_clean]
    max_age: PT8H
models:
  ward_risk:
    features: [creat_delta]
    runs:
      - at: "0 6 * * *"
)";

}  // namespace

TEST_CASE("the DESIGN §5 JSON example") {
  Plan plan = load(kWardPlan);
  Evaluation ev = evaluate(plan, *parse_date("2026-03-06"), 4);
  REQUIRE(ev.runs.size() == 4);
  // Run 2026-03-08 06:00 CDT (11:00Z). needs_data_through = run - 8h =
  // 03:00Z = 2026-03-07 21:00 CST. lab_batch: first occurrence >= w + 2h30m
  // (05:30Z = 23:30 CST) is 02:30 on 03-08, a time in the spring-forward gap,
  // read at the offset before the gap (RFC 5545): 08:30Z = 03:30 CDT.
  // Lands +40m = 04:10 CDT; labs_clean +15m = 04:25 CDT; slack = 06:00 -
  // 04:25 = 1h35m = 5700 s.
  const RunResult& run = ev.runs[2];
  CHECK(format_rfc3339(run.at, plan.zone) == "2026-03-08T06:00:00-05:00");
  const FeatureResult& f = run.features[0];
  CHECK(format_rfc3339(f.needs_data_through, plan.zone) == "2026-03-07T21:00:00-06:00");
  CHECK(rfc(f.ready_at, plan) == "2026-03-08T04:25:00-05:00");
  CHECK(f.slack_seconds == 5700);
  CHECK(f.status == FeatureStatus::ok);
  CHECK(chain_of(plan, ev, f) == "lab_batch,labs_clean,creat_delta");
  std::ostringstream json;
  write_check_json(json, plan, ev);
  CHECK(json.str().find(
            R"({"feature": "creat_delta", "optional": false, "needs_data_through": "2026-03-07T21:00:00-06:00", )"
            R"("ready_at": "2026-03-08T04:25:00-05:00", "slack_seconds": 5700, "status": "ok", )"
            R"("chain": ["lab_batch", "labs_clean", "creat_delta"]})") != std::string::npos);
  CHECK(json.str().starts_with(R"({"plan": "ward-aki", "timezone": "America/Chicago", "from": "2026-03-06", "days": 4,)"));
  CHECK(ev.ok());
}

TEST_CASE("each rule of DESIGN §4 on a small plan") {
  Plan plan = load(R"(plan: rules
timezone: Etc/UTC
calendars:
  weekdays:
    skip_weekdays: [sat, sun]
sources:
  nightly:
    schedule: "0 2 * * *"
    lands_after: PT30M
    data_lag: PT1H
  feed:
    schedule: stream
    lands_after: PT10M
  feed2:
    schedule: stream
    lands_after: PT10M
  weekday_feed:
    schedule: "0 7 * * *"
    calendar: weekdays
    lands_after: PT30M
  london:
    schedule: "0 1 * * *"
    timezone: Europe/London
jobs:
  merge:
    inputs: [nightly, feed]
    run_time: PT5M
  tie:
    inputs: [feed2, feed]
  fixed:
    inputs: [nightly]
    trigger: "0 3 * * *"
    run_time: PT20M
features:
  f_merge:
    inputs: [merge]
    max_age: PT1H
  f_fixed:
    inputs: [fixed]
    max_age: PT2H
  f_weekday:
    inputs: [weekday_feed]
    max_age: PT26H
  f_london:
    inputs: [london]
    max_age: PT1H
  f_tie:
    inputs: [tie]
    max_age: PT0S
models:
  m:
    features: [f_merge, f_fixed, f_weekday, f_london, f_tie]
    runs:
      - at: "0 6 * * *"
)");
  Evaluation ev = evaluate(plan, *parse_date("2026-03-02"), 1);  // 2026-03-02 is a Monday
  REQUIRE(ev.runs.size() == 1);
  const RunResult& run = ev.runs[0];  // 2026-03-02T06:00Z
  auto find = [&](const char* id) -> const FeatureResult& {
    for (const FeatureResult& f : run.features)
      if (plan.nodes[static_cast<size_t>(f.feature)].id == id) return f;
    FAIL(id);
    return run.features[0];
  };
  // Cron source: w = 05:00; s = first 02:00 at or after w + 1h (06:00) is
  // 03-03 02:00; E = 02:30 on 03-03. Stream: E = 05:00 + 10m. merge takes the
  // max (nightly, 03-03 02:30) + 5m = 02:35 → late by 20h35m.
  const FeatureResult& merge = find("f_merge");
  CHECK(rfc(merge.ready_at, plan) == "2026-03-03T02:35:00+00:00");
  CHECK(merge.slack_seconds == -(20 * 3600 + 35 * 60));
  CHECK(merge.status == FeatureStatus::late);
  CHECK(chain_of(plan, ev, merge) == "nightly,merge,f_merge");
  // Cron trigger: w = 04:00; nightly E = (next 02:00 >= 05:00 → 03-03 02:00)
  // + 30m = 03-03 02:30; fixed starts at the first 03:00 >= that: 03-03
  // 03:00, + 20m = 03:20.
  CHECK(rfc(find("f_fixed").ready_at, plan) == "2026-03-03T03:20:00+00:00");
  CHECK(chain_of(plan, ev, find("f_fixed")) == "nightly,fixed,f_fixed");
  // Calendar: w = Sunday 04:00; weekday_feed's first 07:00 not on a weekend is
  // Monday 07:00, + 30m = 07:30 → late by 1h30m (the Monday problem).
  CHECK(rfc(find("f_weekday").ready_at, plan) == "2026-03-02T07:30:00+00:00");
  CHECK(find("f_weekday").slack_seconds == -5400);
  // Per-node zone: 01:00 London (GMT in March before the 29th) = 01:00Z;
  // w = 05:00 → next is 03-03 01:00Z.
  CHECK(rfc(find("f_london").ready_at, plan) == "2026-03-03T01:00:00+00:00");
  // Ties: both inputs land at w + 10m; the first in `inputs` order decides.
  CHECK(rfc(find("f_tie").ready_at, plan) == "2026-03-02T06:10:00+00:00");
  CHECK(chain_of(plan, ev, find("f_tie")) == "feed2,tie,f_tie");
  CHECK(run.status == RunStatus::fail);
}

TEST_CASE("optional features degrade a run, and never is reported with nulls") {
  Plan plan = load(R"(plan: never
timezone: Etc/UTC
calendars:
  no-2032:
    skip_dates: [2036-03-01]
sources:
  leap:
    schedule: "0 0 29 2 *"
    calendar: no-2032
  feed:
    schedule: stream
features:
  f_leap:
    inputs: [leap]
    max_age: PT1H
    optional: true
  f_feed:
    inputs: [feed]
    max_age: PT1H
models:
  m:
    features: [f_feed, f_leap]
    runs:
      - at: "0 6 * * *"
)");
  // The loader refuses a schedule that is silent for more than 1,462 days
  // (plan_loader_test), so the skipped date that makes it silent is set
  // here, after loading: the engine must still report such a gap as never.
  plan.calendars[0].skip_dates = {*parse_date("2032-02-29")};
  // From 2028-03-01 the next 29 February is 2032-02-29 (skipped), then
  // 2036-02-29: more than 1,462 days away, so f_leap is never.
  Evaluation ev = evaluate(plan, *parse_date("2028-03-01"), 1);
  REQUIRE(ev.runs.size() == 1);
  CHECK(ev.runs[0].features[1].status == FeatureStatus::never);
  CHECK_FALSE(ev.runs[0].features[1].ready_at);
  CHECK(ev.runs[0].status == RunStatus::degraded);
  CHECK(ev.ok());
  std::ostringstream json;
  write_check_json(json, plan, ev);
  CHECK(json.str().find(R"("ready_at": null, "slack_seconds": null, "status": "never", "chain": ["leap", "f_leap"])") !=
        std::string::npos);
  // Before 2028-02-29 the delivery exists: E = 2028-02-29T00:00Z.
  Evaluation before = evaluate(plan, *parse_date("2028-02-01"), 1);
  CHECK(rfc(before.runs[0].features[1].ready_at, plan) == "2028-02-29T00:00:00+00:00");
}

TEST_CASE("findings: lookback beyond history, unused nodes") {
  Plan plan = load(R"(plan: findings
timezone: Etc/UTC
sources:
  billing:
    schedule: "0 3 * * 0"
    history: P180D
  spare:
    schedule: stream
features:
  prior_visits:
    inputs: [billing]
    max_age: P8D
    lookback: P365D
  lonely:
    inputs: [spare]
    max_age: PT1H
models:
  m:
    features: [prior_visits]
    runs:
      - at: "0 6 * * *"
)");
  Evaluation ev = evaluate(plan, *parse_date("2026-03-02"), 1);
  REQUIRE(ev.findings.size() == 3);
  CHECK(ev.findings[0].kind == "lookback");
  CHECK(ev.findings[0].message ==
        "feature 'prior_visits' looks back P365D but its upstream source 'billing' keeps only P180D of history");
  CHECK(ev.findings[1].kind == "unused");
  CHECK(ev.findings[1].message == "source 'spare' feeds no model");
  CHECK(ev.findings[2].message == "feature 'lonely' feeds no model (no model lists it)");
}

TEST_CASE("critical path method: a textbook network reduced to a plan") {
  // Solved problem of the project-management chapter in Heizer & Render,
  // "Operations Management" (activity list A..I with predecessors; from
  // memory): A(1) B(4,A) C(3,A) D(7,A) E(6,B) F(2,C D) G(7,E F) H(9,D)
  // I(4,G H). Forward pass: A 0-1, B 1-5, C 1-4, D 1-8, E 5-11, F 8-10,
  // G 11-18, H 8-17, I 18-22: critical path A-B-E-G-I, 22 periods. With
  // F = 4: F 8-12, G 12-19, I 19-23, critical path A-D-F-G-I.
  // Reduction: the project start is a stream source (E = w), each activity an
  // inputs-triggered job whose run_time is its duration in hours; the finish
  // is a feature whose max_age is the book's duration, so the run has zero
  // slack exactly when the finish equals the book's.
  auto network = [](int f_hours) {
    return std::string(R"(plan: cpm
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
  F: {inputs: [C, D], run_time: PT)") +
           std::to_string(f_hours) + R"(H}
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
)";
  };
  Plan plan = load(network(2));
  Evaluation ev = evaluate(plan, *parse_date("2026-05-01"), 1);
  const FeatureResult& f = ev.runs[0].features[0];
  CHECK(f.slack_seconds == 0);  // finish = start + 22h
  CHECK(chain_of(plan, ev, f) == "start,A,B,E,G,I,finish");
  Plan longer = load(network(4));
  Evaluation ev2 = evaluate(longer, *parse_date("2026-05-01"), 1);
  const FeatureResult& f2 = ev2.runs[0].features[0];
  CHECK(f2.slack_seconds == -3600);  // finish = start + 23h
  CHECK(chain_of(longer, ev2, f2) == "start,A,D,F,G,I,finish");
}

TEST_CASE("runs of one model at the same instant are one run, ordered by instant then model") {
  Plan plan = load(R"(plan: runs
timezone: America/Chicago
sources:
  feed: {schedule: stream}
features:
  f: {inputs: [feed], max_age: PT1H}
models:
  b_model:
    features: [f]
    runs:
      - at: "0 6 * * *"
      - at: "0 6 * * 1"
  a_model:
    features: [f]
    runs:
      - at: "0 6 * * *"
)");
  Evaluation ev = evaluate(plan, *parse_date("2026-03-02"), 2);
  REQUIRE(ev.runs.size() == 4);
  CHECK(plan.models[static_cast<size_t>(ev.runs[0].model)].id == "a_model");
  CHECK(plan.models[static_cast<size_t>(ev.runs[1].model)].id == "b_model");
  CHECK(ev.runs[0].at == ev.runs[1].at);
  CHECK(ev.runs[2].at > ev.runs[1].at);
}
