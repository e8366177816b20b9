#include <catch2/catch.hpp>

#include "plan_fixture.h"

#include "history/drift.h"
#include "plan/plan_loader.h"
#include "time/zone.h"

using namespace readyby;

namespace {

const char kPlan[] = R"(plan: drift
title: Drift (fictional)
timezone: America/Chicago
sources:
  nightly_feed:
    schedule: "0 1 * * *"
    timezone: Etc/UTC
    lands_after: PT30M
  weekly_feed:
    schedule: "0 4 * * sun"
    lands_after: PT3H
  gap_feed:
    schedule: "30 2 * * *"
    lands_after: PT10M
  live_feed:
    schedule: stream
    lands_after: PT5M
features:
  f:
    inputs: [nightly_feed, weekly_feed, gap_feed, live_feed]
    max_age: PT12H
models:
  m:
    features: [f]
    runs:
      - at: "0 7 * * *"
)";

Plan load() {
  return readyby::testing::plan_from_text(kPlan);
}

Instant at(const char* s) { return *parse_rfc3339(s); }

}  // namespace

TEST_CASE("previous_occurrence: the latest occurrence at or before an instant") {
  Plan plan = load();
  struct Case {
    const char* node;
    const char* at;
    const char* expected;
  };
  const Case cases[] = {
      {"nightly_feed", "2026-03-02T00:59:59Z", "2026-03-01T01:00:00Z"},
      {"nightly_feed", "2026-03-02T01:00:00Z", "2026-03-02T01:00:00Z"},
      {"nightly_feed", "2026-03-02T23:00:00Z", "2026-03-02T01:00:00Z"},
      // Sunday 2026-03-01 04:00 CST; asked on Wednesday 03-04.
      {"weekly_feed", "2026-03-04T12:00:00-06:00", "2026-03-01T04:00:00-06:00"},
      // 02:30 on 2026-03-08 falls in the spring-forward gap: RFC 5545 reads it
      // with the offset before the gap, 03:30 CDT.
      {"gap_feed", "2026-03-08T04:00:00-05:00", "2026-03-08T03:30:00-05:00"},
      {"gap_feed", "2026-03-08T03:29:00-05:00", "2026-03-07T02:30:00-06:00"},
  };
  for (const Case& c : cases) {
    INFO(c.node << " at " << c.at);
    const Node& n = plan.nodes[static_cast<size_t>(plan.find_node(c.node))];
    std::optional<Instant> p = previous_occurrence(*n.schedule, *n.zone, plan.calendar(n.calendar), at(c.at));
    REQUIRE(p);
    CHECK(to_unix(*p) == to_unix(at(c.expected)));
  }
}

TEST_CASE("landing offset: logged scheduled_at, derived occurrence, stream") {
  Plan plan = load();
  const int nightly = plan.find_node("nightly_feed");
  StoredLanding l{at("2026-03-02T01:42:00Z"), at("2026-03-02T00:00:00Z"), std::nullopt, LandingStatus::ok};
  CHECK(*landing_offset(plan, nightly, l) == 42 * 60);
  l.scheduled_at = at("2026-03-01T01:00:00Z");  // a late delivery of yesterday's occurrence
  CHECK(*landing_offset(plan, nightly, l) == 24 * 3600 + 42 * 60);
  StoredLanding live{at("2026-03-02T10:07:00Z"), at("2026-03-02T10:00:00Z"), std::nullopt, LandingStatus::ok};
  CHECK(*landing_offset(plan, plan.find_node("live_feed"), live) == 7 * 60);
}

TEST_CASE("drift: percentiles, Theil–Sen trend and the drifting flag") {
  Plan plan = load();
  const int nightly = plan.find_node("nightly_feed");
  // One landing a week, 10, 20, 30, 40, 50 minutes after the 01:00 occurrence,
  // plus a failed delivery that must be ignored.
  auto weekly = [](std::vector<int> minutes) {
    std::vector<StoredLanding> out;
    for (size_t k = 0; k < minutes.size(); ++k) {
      Instant occurrence = at("2026-02-02T01:00:00Z") + Seconds(static_cast<int64_t>(k) * 7 * kSecondsPerDay);
      out.push_back({occurrence + Seconds(minutes[k] * 60), occurrence - Seconds(3600), std::nullopt,
                     LandingStatus::ok});
    }
    return out;
  };
  std::vector<StoredLanding> rows = weekly({10, 20, 30, 40, 50});
  rows.push_back({at("2026-02-10T09:00:00Z"), at("2026-02-10T00:00:00Z"), std::nullopt, LandingStatus::failed});
  const Instant from = at("2026-02-01T00:00:00Z"), to = at("2026-03-15T00:00:00Z");
  SourceDrift d = source_drift(plan, nightly, rows, from, to, std::nullopt);
  CHECK(d.deliveries == 5);
  CHECK(*d.p50_offset_seconds == 1800);
  CHECK(*d.p90_offset_seconds == 2760);  // h = 4 x 0.9 = 3.6: 40m + 0.6 x 10m = 46m
  CHECK(d.declared_seconds == 1800);
  // 600 s more per week of occurrences; x is the landing time, which also
  // moves by the offset, so the slope is 600 / (1 + 600/604800).
  CHECK(*d.trend_seconds_per_week == Approx(600.0 / (1 + 600.0 / 604800)));
  CHECK(d.drifting);
  CHECK(d.reason == "p90 landing offset 46m exceeds the declared lands_after 30m");

  // Within the declared time, but 1 minute later a week against a slack of
  // 200 s: 30 days of trend (~257 s) would use it up.
  std::vector<StoredLanding> slow = weekly({1, 2, 3, 4, 5});
  SourceDrift tight = source_drift(plan, nightly, slow, from, to, 200);
  CHECK(tight.drifting);
  CHECK(tight.reason == "at 1m later per week, landings will use up the current slack of 3m 20s within 30 days");
  SourceDrift roomy = source_drift(plan, nightly, slow, from, to, 300);
  CHECK_FALSE(roomy.drifting);
  // Outside the window: nothing.
  SourceDrift none = source_drift(plan, nightly, slow, to, to + Seconds(1), 300);
  CHECK(none.deliveries == 0);
  CHECK_FALSE(none.p50_offset_seconds);
  CHECK_FALSE(none.drifting);
}

TEST_CASE("drift: a p90 offset equal to lands_after is not drifting, one second more is") {
  Plan plan = load();
  const int nightly = plan.find_node("nightly_feed");  // lands_after PT30M
  // Five weekly landings; the p90 interpolates between the 4th and 5th
  // smallest offsets (h = 4 x 0.9 = 3.6).
  auto weekly = [](std::vector<int> seconds) {
    std::vector<StoredLanding> out;
    for (size_t k = 0; k < seconds.size(); ++k) {
      Instant occurrence = at("2026-02-02T01:00:00Z") + Seconds(static_cast<int64_t>(k) * 7 * kSecondsPerDay);
      out.push_back({occurrence + Seconds(seconds[k]), occurrence - Seconds(3600), std::nullopt, LandingStatus::ok});
    }
    return out;
  };
  const Instant from = at("2026-02-01T00:00:00Z"), to = at("2026-03-15T00:00:00Z");
  struct Case {
    std::vector<int> offsets;
    int64_t p90;
    bool drifting;
  };
  const Case cases[] = {
      {{1800, 1800, 1800, 1800, 1800}, 1800, false},  // exactly the declared time
      {{1200, 1500, 1700, 1800, 1800}, 1800, false},
      {{1800, 1800, 1800, 1800, 1802}, 1801, true},   // 1800 + 0.6 x 2 = 1801.2
      {{1801, 1801, 1801, 1801, 1801}, 1801, true},
  };
  for (const Case& c : cases) {
    INFO("offsets " << c.offsets[0] << " .. " << c.offsets[4]);
    SourceDrift d = source_drift(plan, nightly, weekly(c.offsets), from, to, std::nullopt);
    REQUIRE(d.p90_offset_seconds);
    CHECK(*d.p90_offset_seconds == c.p90);
    CHECK(d.declared_seconds == 1800);
    CHECK(d.drifting == c.drifting);
  }
}
