#include <catch2/catch.hpp>

#include <set>
#include <sstream>

#include "engine/check.h"
#include "engine/fixes.h"
#include "engine/patterns.h"
#include "plan/plan_loader.h"
#include "plan_fixture.h"
#include "report/advice_text.h"
#include "report/check_json.h"
#include "report/check_text.h"

using namespace readyby;

namespace {

// The fictional Larkspur Valley Medical Centre demo plan, checked over the
// four weeks around the US spring-forward change of 2026-03-08 (tz database:
// America/Chicago 02:00 CST -> 03:00 CDT; America/Phoenix keeps MST).
struct Window {
  Plan plan;
  std::unique_ptr<Evaluation> ev;
  std::unique_ptr<PatternCollector> collector;
  std::vector<Pattern> patterns;
  std::unique_ptr<FixFinder> finder;
};

std::unique_ptr<Window> check_window(Plan plan, const char* from, int days) {
  auto w = std::make_unique<Window>();
  w->plan = std::move(plan);
  w->ev = std::make_unique<Evaluation>(evaluate_lazily(w->plan, *parse_date(from), days));
  w->collector = std::make_unique<PatternCollector>(w->plan, *w->ev);
  collect_runs(*w->ev, w->collector.get());
  w->patterns = w->collector->patterns();
  w->finder = std::make_unique<FixFinder>(*w->collector);
  return w;
}

Plan demo_plan() {
  PlanLoadResult r = load_plan_file(std::string(READYBY_SOURCE_DIR) + "/pipelines/larkspur.plan.yaml");
  REQUIRE(r.plan);
  return std::move(*r.plan);
}

const Window& demo() {
  static const std::unique_ptr<Window> w = check_window(demo_plan(), "2026-02-22", 28);
  return *w;
}

std::string node(const Plan& plan, int n) { return n < 0 ? "" : plan.nodes[static_cast<size_t>(n)].id; }
std::string local(const Plan& plan, int model, Instant t) {
  return format_local(plan.models[static_cast<size_t>(model)].zone->to_local(t));
}

// A partner feed in America/Los_Angeles (weekdays only) -> a job at a fixed
// London time -> a model in America/New_York (fictional example).
// tz database rules for 2026: the US changes on the second Sunday of March
// (2026-03-08, 02:00 local), the EU on the last Sunday of March (2026-03-29,
// 01:00 UTC). In winter 13:00 London is 08:00 New York; between the two
// changes it is 09:00, so the merge lands 09:20, after the 08:30 run; the feed
// (04:45 Los Angeles = 07:45 New York all month) is on time throughout.
const char* kCrossZone = R"(plan: cross-zone
title: Partner results across three zones (fictional example)
timezone: America/New_York
calendars:
  weekdays:
    skip_weekdays: [sat, sun]
sources:
  partner_feed:
    schedule: "0 3 * * *"
    timezone: America/Los_Angeles
    calendar: weekdays
    lands_after: PT1H45M
    data_lag: PT3H
jobs:
  partner_merge:
    inputs: [partner_feed]
    trigger: "0 13 * * *"
    timezone: Europe/London
    run_time: PT20M
features:
  partner_results:
    inputs: [partner_merge]
    max_age: PT12H
models:
  readmit:
    features: [partner_results]
    runs:
      - at: "30 8 * * *"
)";

}  // namespace

TEST_CASE("demo: the known problems are found, each with its cause") {
  const Window& d = demo();
  REQUIRE(d.patterns.size() == 3);

  // 1. Stale cron-triggered job. reference_lab delivers at 01:00 Phoenix
  // (MST, -07:00) + 30m. Before 03-08 that is 02:30 CST, before hie_merge's
  // fixed 03:00 start; from 03-08 it is 03:30 CDT, after it, so the 03:00
  // start reads old data and the new data waits a day.
  const Pattern& stale = d.patterns[0];
  CHECK(d.plan.models[static_cast<size_t>(stale.model)].id == "readmit_risk");
  CHECK(stale.kind == PatternKind::span);
  CHECK(stale.status == RunStatus::fail);
  CHECK(stale.runs.size() == 10);
  REQUIRE(stale.starts_after.size() == 1);
  CHECK(stale.starts_after[0].zone->name() == "America/Chicago");
  CHECK(stale.ends_with.empty());
  CHECK(stale.to_window_end);
  CHECK(describe_pattern(d.plan, stale) ==
        "fails every run from 2026-03-09 to 2026-03-20 (10 runs), starting after a daylight-saving change in "
        "America/Chicago (clocks forward 1h 00m on 2026-03-08) while America/Phoenix kept its clocks; still failing at "
        "the end of the window");
  CHECK(node(d.plan, stale.blame.cause_node()) == "hie_merge");
  CHECK(stale.blame.kind == CauseKind::stale_start);

  // 2. Monday failure. bed_board delivers weekdays at 07:00 + 20m; a Monday
  // 06:30 run with max_age 50h needs data through Saturday 04:30: Monday 07:20.
  const Pattern& monday = d.patterns[1];
  CHECK(monday.kind == PatternKind::weekday);
  CHECK(monday.weekday == 1);
  CHECK(describe_pattern(d.plan, monday) == "fails every Monday (4 of 4 Monday runs)");
  CHECK(node(d.plan, monday.blame.cause_node()) == "bed_board");
  CHECK(monday.blame.kind == CauseKind::late_delivery);
  REQUIRE(monday.features.size() == 1);
  CHECK(monday.features[0].worst_late_seconds == 50 * 60);

  // 3. Daylight-saving day. census_snapshot's 02:30 start falls in the gap on
  // 03-08 and runs at 03:30 CDT (RFC 5545): 04:45, then los_features 06:45.
  const Pattern& dst = d.patterns[2];
  CHECK(dst.kind == PatternKind::daylight_saving);
  CHECK(describe_pattern(d.plan, dst).find("fails on 2026-03-08, a daylight-saving change in America/Chicago") == 0);
  CHECK(node(d.plan, dst.blame.cause_node()) == "census_snapshot");
  CHECK(dst.blame.kind == CauseKind::late_start);
}

TEST_CASE("demo: every fix is an edit, verified, minimal, with its effect") {
  const Window& d = demo();
  struct Expected {
    size_t pattern;
    FixKind kind;
    const char* node;      // "" for start_later
    int64_t seconds;
    const char* edit;
    const char* effect;
  } cases[] = {
      // hie_merge must start after 03:30: "0 3" -> "30 3"; 29 minutes is still before the landing.
      {0, FixKind::move_start, "hie_merge", 1800, "schedule hie_merge=30 3 * * *",
       "re-checked: all 10 runs of this pattern ok; no other run changes"},
      {0, FixKind::land_earlier, "reference_lab", 1800, "delay reference_lab=-PT30M",
       "re-checked: all 10 runs of this pattern ok; no other run changes"},
      // lands_after is only 20m: the delivery itself moves, 07:00 -> 06:10.
      {1, FixKind::land_earlier, "bed_board", 3000, "schedule bed_board=10 6 * * *",
       "re-checked: all 4 runs of this pattern ok; no other run changes"},
      // Starting at 07:20 also clears the daylight-saving day (census ready 06:45).
      {1, FixKind::start_later, "", 3000, "runs discharge_delay=20 7 * * *",
       "re-checked: all 4 runs of this pattern ok; also turns 1 run of discharge_delay from fail to ok (2026-03-08 "
       "06:30)"},
      // 02:15 is in the gap too and runs at 03:15 CDT: 04:30, then 06:30.
      {2, FixKind::move_start, "census_snapshot", 900, "schedule census_snapshot=15 2 * * *",
       "re-checked: the run of this pattern ok; no other run changes"},
      {2, FixKind::land_earlier, "census_snapshot", 900, "delay census_snapshot=-PT15M",
       "re-checked: the run of this pattern ok; no other run changes"},
      {2, FixKind::start_later, "", 900, "runs discharge_delay=45 6 * * *",
       "re-checked: the run of this pattern ok; no other run changes"},
  };
  for (const Expected& e : cases) {
    INFO("pattern " << e.pattern << " edit " << e.edit);
    FixSearch search = d.finder->find(d.patterns[e.pattern]);
    const Fix* found = nullptr;
    for (const Fix& f : search.fixes) {
      if (edit_text(d.plan, f.edit) == e.edit) found = &f;
    }
    REQUIRE(found);
    CHECK(found->kind == e.kind);
    CHECK(node(d.plan, found->node) == e.node);
    CHECK(found->seconds == e.seconds);
    CHECK(describe_effect(d.plan, *found) == e.effect);
  }
  // The first fix offered is the cause's own.
  CHECK(edit_text(d.plan, d.finder->find(d.patterns[0]).fixes.front().edit) == "schedule hie_merge=30 3 * * *");
  CHECK(edit_text(d.plan, d.finder->find(d.patterns[1]).fixes.front().edit) == "schedule bed_board=10 6 * * *");
}

TEST_CASE("demo: in autumn the stale read ends with the fall-back change") {
  // tz database: America/Chicago returns to CST (-06:00) on 2026-11-01;
  // from then on the Phoenix delivery (01:00 MST + 30m) lands at 02:30 CST,
  // before hie_merge's 03:00 start again.
  std::unique_ptr<Window> w = check_window(demo_plan(), "2026-10-25", 14);
  REQUIRE_FALSE(w->patterns.empty());
  const Pattern& stale = w->patterns[0];
  CHECK(stale.kind == PatternKind::span);
  CHECK(describe_pattern(w->plan, stale) ==
        "fails every run from 2026-10-26 to 2026-10-30 (5 runs), from the start of the window; it stops after a "
        "daylight-saving change in America/Chicago (clocks back 1h 00m on 2026-11-01) while America/Phoenix kept its "
        "clocks");
}

TEST_CASE("cross-zone: a span between two zones' daylight-saving changes is one pattern, and its fix clears it") {
  std::unique_ptr<Window> w = check_window(testing::plan_from_text(kCrossZone), "2026-03-01", 35);
  const Plan& plan = w->plan;
  // Weekend runs fail all month (the feed skips weekends): their own patterns.
  // The weekday runs from 2026-03-09 to 2026-03-27 fail because of the clocks.
  const Pattern* span = nullptr;
  for (const Pattern& p : w->patterns) {
    if (p.kind == PatternKind::span) {
      CHECK_FALSE(span);  // one span only
      span = &p;
    }
  }
  REQUIRE(span);
  CHECK(span->runs.size() == 15);
  CHECK(local(plan, 0, span->runs.front()) == "2026-03-09 08:30");
  CHECK(local(plan, 0, span->runs.back()) == "2026-03-27 08:30");
  CHECK(span->span_weekdays == std::vector<int>{1, 2, 3, 4, 5});
  // Both changes are named: the US one that starts it (both US zones change
  // that day), the EU one that ends it.
  std::set<std::string> start_zones, end_zones;
  for (const ZoneChange& c : span->starts_after) start_zones.insert(c.zone->name());
  for (const ZoneChange& c : span->ends_with) end_zones.insert(c.zone->name());
  CHECK(start_zones == std::set<std::string>{"America/Los_Angeles", "America/New_York"});
  CHECK(end_zones == std::set<std::string>{"Europe/London"});
  CHECK(format_rfc3339(span->ends_with[0].at, nullptr) == "2026-03-29T01:00:00Z");
  CHECK(describe_pattern(plan, *span) ==
        "fails every Monday to Friday run from 2026-03-09 to 2026-03-27 (15 runs), starting after the "
        "daylight-saving changes in America/New_York and America/Los_Angeles (clocks forward 1h 00m on 2026-03-08) "
        "while Europe/London kept its clocks; it stops after a daylight-saving change in Europe/London (clocks "
        "forward 1h 00m on 2026-03-29)");
  // The merge, not the feed, is at fault: its London start is 09:00 New York.
  CHECK(node(plan, span->blame.cause_node()) == "partner_merge");
  CHECK(span->blame.kind == CauseKind::late_start);
  CHECK(span->blame.steps[0].own_late_seconds == 0);
  // Fixes: starting the runs 50m later changes nothing else; moving the
  // merge 50m earlier clears the span but breaks the winter and spring runs,
  // where 12:10 London is before the feed lands. No fix makes the feed land
  // "earlier" by a fixed amount, which cannot help while the merge starts late.
  FixSearch search = w->finder->find(*span);
  REQUIRE(search.fixes.size() == 2);
  CHECK(edit_text(plan, search.fixes[0].edit) == "runs readmit=20 9 * * *");
  CHECK_FALSE(search.fixes[0].breaks_others());
  CHECK(edit_text(plan, search.fixes[1].edit) == "schedule partner_merge=10 12 * * *");
  CHECK(search.fixes[1].breaks_others());
  for (const Fix& f : search.fixes) CHECK(f.node != plan.find_node("partner_feed"));
}

TEST_CASE("degraded runs get patterns, causes and fixes; the summary keeps optional slack apart") {
  Plan plan = testing::plan_from_text(R"(plan: degraded
timezone: Etc/UTC
sources:
  nightly: {schedule: "0 2 * * *", lands_after: PT30M}
  survey: {schedule: "0 5 * * *", lands_after: PT2H}
features:
  core: {inputs: [nightly], max_age: PT6H}
  extra: {inputs: [survey], max_age: PT2H, optional: true}
models:
  m:
    features: [core, extra]
    runs:
      - at: "0 6 * * *"
)");
  std::unique_ptr<Window> w = check_window(std::move(plan), "2026-05-04", 7);
  const ModelSummary& s = w->collector->summaries()[0];
  CHECK(s.degraded == 7);
  CHECK(s.failed == 0);
  // core: 02:30 for a 06:00 run; extra needs data through 04:00: 05:00 + 2h, late 1h.
  CHECK(s.tightest_required_seconds == 3 * 3600 + 30 * 60);
  CHECK(s.tightest_optional_seconds == -3600);
  REQUIRE(w->patterns.size() == 1);
  const Pattern& p = w->patterns[0];
  CHECK(p.status == RunStatus::degraded);
  CHECK(p.kind == PatternKind::every_run);
  CHECK(describe_pattern(w->plan, p) == "is degraded every run (7 of 7)");
  CHECK(node(w->plan, p.blame.cause_node()) == "survey");
  FixSearch search = w->finder->find(p);
  REQUIRE_FALSE(search.fixes.empty());
  CHECK(edit_text(w->plan, search.fixes[0].edit) == "delay survey=-PT1H");
}

TEST_CASE("demo: the text report names patterns, causes and verified fixes") {
  const Window& d = demo();
  std::ostringstream text;
  write_check_text(text, d.plan, *d.ev, TextStyle{false});
  const std::string s = text.str();
  CHECK(s.find("model discharge_delay (America/Chicago): 28 runs — 23 ok, 0 degraded, 5 failed; tightest slack -50m") !=
        std::string::npos);
  CHECK(s.find("model readmit_risk (America/Chicago): 20 runs — 10 ok, 0 degraded, 10 failed; tightest slack -20h 10m "
               "(2026-03-09 07:00); optional features: tightest slack 1d 0h (2026-02-24 07:00)") != std::string::npos);
  CHECK(s.find("chain: reference_lab → hie_merge → outside_labs") != std::string::npos);
  CHECK(s.find("fix: 'bed_board' would have to land by 06:30 instead of 07:20 (50m earlier) in the worst run, "
               "2026-02-23 06:30: deliver on \"10 6 * * *\" instead of \"0 7 * * *\" [schedule bed_board=10 6 * * *]") !=
        std::string::npos);
  CHECK(s.find("re-checked: all 4 runs of this pattern ok; no other run changes") != std::string::npos);
  CHECK(s.find("\033[") == std::string::npos);  // no colour unless asked
  std::ostringstream coloured;
  write_check_text(coloured, d.plan, *d.ev, TextStyle{true});
  CHECK(coloured.str().find("\033[31;1m") != std::string::npos);
}

TEST_CASE("times on another local date than the run name their date; a range is never empty") {
  const Zone* chicago = Zone::find("America/Chicago");
  const LocalDays day = *parse_date("2026-03-09");
  struct Case {
    const char* instant;
    const char* expected;
  } cases[] = {
      {"2026-03-09T10:50:00Z", "05:50"},             // CDT, same date
      {"2026-03-09T04:30:00Z", "2026-03-08 23:30"},  // the evening before
      {"2026-03-10T05:10:00Z", "2026-03-10 00:10"},  // just past midnight
  };
  for (const Case& c : cases) {
    INFO(c.instant);
    CHECK(clock_on(*parse_rfc3339(c.instant), chicago, day) == c.expected);
  }
  // No fix text of the demo holds a range "between X and Y".
  const Window& d = demo();
  for (const Pattern& p : d.patterns) {
    for (const Fix& f : d.finder->find(p).fixes) CHECK(describe_fix(d.plan, p, f).find("between") == std::string::npos);
  }
}

TEST_CASE("demo: a lazy evaluation writes the same JSON as a stored one") {
  const Window& d = demo();
  Evaluation stored = evaluate(d.plan, *parse_date("2026-02-22"), 28);
  CHECK(d.ev->runs.empty());
  CHECK(d.ev->pending_count() == stored.runs.size());
  std::ostringstream a, b;
  write_check_json(a, d.plan, stored);
  write_check_json(b, d.plan, *d.ev);
  CHECK(a.str() == b.str());
}

TEST_CASE("demo: JSON keys and ordering follow DESIGN §5, patterns come after them") {
  const Window& d = demo();
  std::ostringstream json;
  write_check_json(json, d.plan, *d.ev);
  const std::string s = json.str();
  CHECK(s.starts_with(R"({"plan": "larkspur", "timezone": "America/Chicago", "from": "2026-02-22", "days": 28,)"));
  CHECK(s.find("\"ok\": false") != std::string::npos);
  // Runs are ordered by instant, then model id.
  size_t a = s.find(R"({"model": "discharge_delay", "at": "2026-02-23T06:30:00-06:00")");
  size_t b = s.find(R"({"model": "readmit_risk", "at": "2026-02-23T07:00:00-06:00")");
  REQUIRE(a != std::string::npos);
  REQUIRE(b != std::string::npos);
  CHECK(a < b);
  CHECK(s.find(R"({"kind": "lookback", "feature": "prior_ed_visits_12m", "source": "claims_weekly", "message": )") !=
        std::string::npos);
  CHECK(s.find(R"("at": "2026-03-09T07:00:00-05:00", "status": "fail")") != std::string::npos);
  // patterns[] after findings[].
  const size_t findings = s.find("\"findings\": [");
  const size_t patterns = s.find("\"patterns\": [");
  REQUIRE(patterns != std::string::npos);
  CHECK(findings < patterns);
  CHECK(s.find(R"x({"model": "discharge_delay", "status": "fail", "kind": "weekday", "description": "fails every Monday (4 of 4 Monday runs)")x") != std::string::npos);
  CHECK(s.find(R"("edit": {"kind": "schedule", "node": "bed_board", "cron": "10 6 * * *", "text": "schedule bed_board=10 6 * * *"})") !=
        std::string::npos);
  CHECK(s.find(R"("effect": {"pattern_runs": 4, "pattern_runs_ok": true)") != std::string::npos);
  CHECK(s.find(R"({"zone": "America/Chicago", "at": "2026-03-08T03:00:00-05:00", "offset_before_seconds": -21600, "offset_after_seconds": -18000, "bound": "start"})") !=
        std::string::npos);
}
