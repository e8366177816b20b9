#include <catch2/catch.hpp>

#include <sstream>

#include "engine/check.h"
#include "plan/plan_loader.h"
#include "report/check_json.h"
#include "report/check_text.h"
#include "report/failure_patterns.h"

using namespace readyby;

namespace {

// The fictional Larkspur Valley Medical Centre demo plan, checked over the
// four weeks around the US spring-forward change of 2026-03-08 (tz database:
// America/Chicago 02:00 CST -> 03:00 CDT; America/Phoenix keeps MST).
struct Demo {
  Plan plan;
  Evaluation ev;
  std::vector<FailurePattern> patterns;
};

const Demo& demo() {
  static const Demo* d = [] {
    PlanLoadResult r = load_plan_file(std::string(READYBY_SOURCE_DIR) + "/pipelines/larkspur.plan.yaml");
    auto* out = new Demo{std::move(*r.plan), {}, {}};
    out->ev = evaluate(out->plan, *parse_date("2026-02-22"), 28);
    out->patterns = failure_patterns(out->plan, out->ev);
    return out;
  }();
  return *d;
}

std::string node(const Plan& plan, int n) { return plan.nodes[static_cast<size_t>(n)].id; }

}  // namespace

TEST_CASE("demo: the known problems are found") {
  const Demo& d = demo();
  REQUIRE(d.patterns.size() == 3);

  // 1. Stale cron-triggered job. reference_lab delivers at 01:00 Phoenix
  // (MST, -07:00) + 30m. Before 03-08 that is 02:30 CST, before hie_merge's
  // fixed 03:00 start; from 03-08 it is 03:30 CDT, after it, so the 03:00
  // start reads old data and the new data waits a day: for the 07:00 run of
  // 03-09, outside_labs is ready 03-10 03:10 (03:00 + 10m), late by 20h10m.
  const FailurePattern& stale = d.patterns[0];
  CHECK(d.plan.models[static_cast<size_t>(stale.model)].id == "readmit_risk");
  CHECK(stale.when == FailurePattern::When::span);
  CHECK(stale.runs.size() == 10);
  CHECK(stale.description.find("fails every run from 2026-03-09 to 2026-03-20 (10 runs), starting after a "
                               "daylight-saving change in America/Chicago") == 0);
  CHECK(stale.description.find("America/Phoenix kept its clocks") != std::string::npos);
  REQUIRE(stale.fix);
  CHECK(node(d.plan, stale.fix->node) == "hie_merge");
  CHECK(stale.fix->move_start);
  CHECK(stale.fix->seconds == 30 * 60);  // 03:30 landing - 03:00 start
  CHECK(stale.start_later_seconds == 20 * 3600 + 10 * 60);
  CHECK(stale.stale_jobs == std::vector<int>{d.plan.find_node("hie_merge")});

  // 2. Monday failure. bed_board delivers weekdays at 07:00 + 20m. The 06:30
  // run with max_age 50h needs data through Saturday 04:30 on a Monday; the
  // first weekday delivery after that is Monday 07:00 -> 07:20, 50m late.
  const FailurePattern& monday = d.patterns[1];
  CHECK(monday.when == FailurePattern::When::weekday);
  CHECK(monday.weekday == 1);
  CHECK(monday.description == "fails every Monday (4 of 4 Monday runs)");
  REQUIRE(monday.fix);
  CHECK(node(d.plan, monday.fix->node) == "bed_board");
  CHECK(monday.land_earlier_seconds == 50 * 60);
  CHECK(monday.start_later_seconds == 50 * 60);

  // 3. Daylight-saving failure. census_snapshot starts at 02:30, which on
  // 03-08 falls in the gap and runs at 03:30 CDT (RFC 5545); + 1h15m = 04:45;
  // los_features + 2h = 06:45 > 06:30: late by 15m, on that date only.
  const FailurePattern& dst = d.patterns[2];
  CHECK(dst.when == FailurePattern::When::daylight_saving);
  CHECK(dst.description.find("fails on 2026-03-08, a daylight-saving change in America/Chicago") == 0);
  REQUIRE(dst.runs.size() == 1);
  REQUIRE(dst.fix);
  CHECK(node(d.plan, dst.fix->node) == "census_snapshot");
  CHECK(dst.fix->seconds == 15 * 60);
  CHECK(dst.fix->text.find("its 02:30 start falls in the daylight-saving gap") != std::string::npos);

  // 4. Findings: lookback beyond the claims feed's history, an unused feed.
  REQUIRE(d.ev.findings.size() == 2);
  CHECK(d.ev.findings[0].kind == "lookback");
  CHECK(node(d.plan, d.ev.findings[0].feature) == "prior_ed_visits_12m");
  CHECK(node(d.plan, d.ev.findings[0].source) == "claims_weekly");
  CHECK(d.ev.findings[1].kind == "unused");
  CHECK(node(d.plan, d.ev.findings[1].node) == "nurse_staffing");
  CHECK_FALSE(d.ev.ok());
}

TEST_CASE("demo: in autumn the stale read ends with the fall-back change") {
  // tz database: America/Chicago returns to CST (-06:00) on 2026-11-01;
  // from then on the Phoenix delivery (01:00 MST + 30m) lands at 02:30 CST,
  // before hie_merge's 03:00 start again.
  const Demo& d = demo();
  Evaluation ev = evaluate(d.plan, *parse_date("2026-10-25"), 14);
  std::vector<FailurePattern> patterns = failure_patterns(d.plan, ev);
  REQUIRE_FALSE(patterns.empty());
  const FailurePattern& stale = patterns[0];
  CHECK(stale.when == FailurePattern::When::span);
  CHECK(stale.description ==
        "fails every run from 2026-10-26 to 2026-10-30 (5 runs), from the start of the window; it stops after a "
        "daylight-saving change in America/Chicago (clocks back 1h 00m on 2026-11-01) while America/Phoenix kept its "
        "clocks");
}

TEST_CASE("demo: the text report names patterns, chains and fixes") {
  const Demo& d = demo();
  std::ostringstream text;
  write_check_text(text, d.plan, d.ev, TextStyle{false});
  const std::string s = text.str();
  CHECK(s.find("model discharge_delay (America/Chicago): 28 runs — 23 ok, 0 degraded, 5 failed; tightest slack -50m") !=
        std::string::npos);
  CHECK(s.find("chain: reference_lab → hie_merge → outside_labs") != std::string::npos);
  CHECK(s.find("fix: 'bed_board' lands at 2026-02-23 07:20; it would have to land by 2026-02-23 06:30 (50m earlier)") !=
        std::string::npos);
  CHECK(s.find("\033[") == std::string::npos);  // no colour unless asked
  std::ostringstream coloured;
  write_check_text(coloured, d.plan, d.ev, TextStyle{true});
  CHECK(coloured.str().find("\033[31;1m") != std::string::npos);
}

TEST_CASE("demo: a lazy evaluation writes the same JSON as a stored one") {
  const Demo& d = demo();
  Evaluation lazy = evaluate_lazily(d.plan, *parse_date("2026-02-22"), 28);
  CHECK(lazy.runs.empty());
  CHECK(lazy.pending_count() == d.ev.runs.size());
  CHECK(lazy.ok() == d.ev.ok());
  std::ostringstream a, b;
  write_check_json(a, d.plan, d.ev);
  write_check_json(b, d.plan, lazy);
  CHECK(a.str() == b.str());
}

TEST_CASE("demo: JSON keys and ordering follow DESIGN §5") {
  const Demo& d = demo();
  std::ostringstream json;
  write_check_json(json, d.plan, d.ev);
  const std::string s = json.str();
  CHECK(s.starts_with(R"({"plan": "larkspur", "timezone": "America/Chicago", "from": "2026-02-22", "days": 28,)"));
  CHECK(s.find("\"ok\": false") != std::string::npos);
  // Runs are ordered by instant, then model id: on 2026-02-23 the 06:30
  // discharge_delay run comes before the 07:00 readmit_risk run.
  size_t a = s.find(R"({"model": "discharge_delay", "at": "2026-02-23T06:30:00-06:00")");
  size_t b = s.find(R"({"model": "readmit_risk", "at": "2026-02-23T07:00:00-06:00")");
  REQUIRE(a != std::string::npos);
  REQUIRE(b != std::string::npos);
  CHECK(a < b);
  CHECK(s.find(R"({"kind": "lookback", "feature": "prior_ed_visits_12m", "source": "claims_weekly", "message": )") !=
        std::string::npos);
  // Offsets follow the model zone at each instant.
  CHECK(s.find(R"("at": "2026-03-09T07:00:00-05:00", "status": "fail")") != std::string::npos);
}

TEST_CASE("a later start is proposed in whole minutes") {
  // A feed that lands 30 s after the 06:00 run: the run would have to start
  // 30 s later, but run times are cron minutes, so the proposal is 1 minute.
  PlanLoadResult r = load_plan_text(R"(plan: minutes
title: Minute rounding (fictional example)
timezone: Etc/UTC
sources:
  feed:
    schedule: "0 5 * * *"
    lands_after: PT1H30S
features:
  f:
    inputs: [feed]
    max_age: PT12H
models:
  m:
    features: [f]
    runs:
      - at: "0 6 * * *"
)",
                                    "minutes.plan.yaml");
  INFO(r.rendered);
  REQUIRE(r.plan);
  const Plan& plan = *r.plan;
  Evaluation ev = evaluate(plan, *parse_date("2026-03-02"), 3);
  REQUIRE(ev.runs.size() == 3);
  for (const RunResult& run : ev.runs) {
    INFO(format_rfc3339(run.at, nullptr));
    REQUIRE(run.status == RunStatus::fail);
    REQUIRE(run.features.size() == 1);
    CHECK(run.features[0].slack_seconds == -30);
    std::optional<int64_t> later = later_start_needed(plan, ev, run);
    REQUIRE(later);
    CHECK(*later == 60);
  }
  std::vector<FailurePattern> patterns = failure_patterns(plan, ev);
  REQUIRE(patterns.size() == 1);
  REQUIRE(patterns[0].start_later_seconds);
  CHECK(*patterns[0].start_later_seconds == 60);
}
