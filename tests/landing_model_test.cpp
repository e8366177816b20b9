#include <catch2/catch.hpp>

#include <string>
#include <vector>

#include "forecast/landing_model.h"
#include "plan_fixture.h"
#include "time/zone.h"

using namespace readyby;

namespace {

const char kPlan[] = R"(plan: landing-models
title: Landing model fits (fictional)
timezone: Etc/UTC
calendars:
  weekdays: {skip_weekdays: [sat, sun]}
sources:
  daily:
    schedule: "0 1 * * *"
    lands_after: PT30M
    data_lag: PT1H
  office:
    schedule: "0 7 * * *"
    calendar: weekdays
    lands_after: PT20M
  events:
    schedule: stream
    lands_after: PT5M
jobs:
  snapshot:
    inputs: [events]
    trigger: "30 2 * * *"
    run_time: PT1H
features:
  f:
    inputs: [daily, office, snapshot]
    max_age: PT30H
models:
  m:
    features: [f]
    runs:
      - at: "0 8 * * *"
)";

Instant day(int d, int hour = 0, int minute = 0) {
  // 2026-01-05 is a Monday.
  return *parse_rfc3339("2026-01-05T00:00:00Z") + Seconds(d * kSecondsPerDay + hour * 3600 + minute * 60);
}

StoredLanding row(Instant landed, Instant through, std::optional<Instant> scheduled = std::nullopt,
                  LandingStatus status = LandingStatus::ok) {
  return {landed, through, scheduled, status};
}

History empty_history(const Plan& plan) { return History(plan.nodes.size()); }

std::vector<StoredLanding>& rows_of(const Plan& plan, History& h, const char* node) {
  return h[static_cast<size_t>(plan.find_node(node))].emplace();
}

}  // namespace

TEST_CASE("landing model: offsets from the scheduled occurrence, missing occurrences, coverage lag") {
  Plan plan = readyby::testing::plan_from_text(kPlan);
  History h = empty_history(plan);
  std::vector<StoredLanding>& rows = rows_of(plan, h, "daily");
  // Ten days of the 01:00 source. Day 3 has no row (missing); day 5 has only a
  // failed row (missing); day 7 has two ok rows (the earlier counts); days 0-4
  // log scheduled_at, the others leave it to be inferred from landed_at.
  const int offsets_min[] = {20, 25, 30, -1, 35, -1, 40, 22, 50, 45};
  for (int d = 0; d < 10; ++d) {
    std::optional<Instant> scheduled = d < 5 ? std::optional<Instant>(day(d, 1)) : std::nullopt;
    if (d == 5) rows.push_back(row(day(d, 1, 30), day(d), scheduled, LandingStatus::failed));
    if (offsets_min[d] < 0) continue;
    rows.push_back(row(day(d, 1, offsets_min[d]), day(d), scheduled));
    if (d == 7) rows.push_back(row(day(d, 3, 0), day(d), scheduled));
  }
  LandingModels models = fit_landing_models(plan, h, day(30), day(10));
  const LandingModel* m = models.of(plan.find_node("daily"));
  REQUIRE(m);
  CHECK(models.models.size() == 1);
  CHECK(m->basis == OffsetBasis::schedule);
  CHECK(m->data_lag_seconds == 3600);  // 01:00 occurrences deliver data through midnight
  REQUIRE(m->history.size() == 10);
  CHECK(m->history.front().at == day(0, 1));
  CHECK(m->history.back().at == day(9, 1));
  CHECK(m->history[3].outcome == kMissingOccurrence);
  CHECK(m->history[5].outcome == kMissingOccurrence);
  CHECK(m->history[7].outcome == 22 * 60);
  CHECK(m->pooled.occurrences == 10);
  CHECK(m->pooled.landings == 8);
  CHECK(m->pooled.missing_rate == Approx(0.2));
  // Offsets in minutes sorted: 20 22 25 30 35 40 45 50. Hyndman & Fan
  // definition 7: p50 at h = 3.5 -> 32.5 min; p90 at h = 6.3 -> 45 + 0.3 * 5 = 46.5 min.
  CHECK(m->pooled.p50_offset_seconds == 1950);
  CHECK(m->pooled.p90_offset_seconds == 2790);
  CHECK_FALSE(m->by_weekday);
  CHECK(m->short_history);
  CHECK(m->stale == false);
  CHECK(models.of(plan.find_node("office")) == nullptr);
}

TEST_CASE("landing model: per weekday only when every scheduled weekday has eight landings") {
  struct Case {
    const char* name;
    const char* node;
    int days;
    bool by_weekday;
  };
  const Case cases[] = {
      {"8 weeks of a daily feed: 8 landings every weekday", "daily", 56, true},
      {"one day short: Sunday has 7", "daily", 55, false},
      {"weekday-only feed, 8 weeks: Saturday and Sunday are not scheduled", "office", 56, true},
      {"weekday-only feed, 7 weeks", "office", 49, false},
  };
  Plan plan = readyby::testing::plan_from_text(kPlan);
  for (const Case& c : cases) {
    INFO(c.name);
    History h = empty_history(plan);
    std::vector<StoredLanding>& rows = rows_of(plan, h, c.node);
    const bool office = std::string(c.node) == "office";
    for (int d = 0; d < c.days; ++d) {
      if (office && d % 7 >= 5) continue;  // day 0 is a Monday
      const int hour = office ? 7 : 1;
      rows.push_back(row(day(d, hour, 10 + d % 13), day(d, hour)));
    }
    LandingModels models = fit_landing_models(plan, h, day(100), day(c.days));
    const LandingModel* m = models.of(plan.find_node(c.node));
    REQUIRE(m);
    CHECK(m->by_weekday == c.by_weekday);
    CHECK(m->pooled.missing_rate == 0);
    if (office) CHECK(m->weekdays[0].occurrences == 0);  // no Sunday model needed
  }
}

TEST_CASE("landing model: short and stale warnings, and fitting only on rows landed before a date") {
  struct Case {
    const char* name;
    int landings;
    int window_day;  // the forecast window starts at this day's midnight
    int fit_until_day;
    int expect_landings;
    bool is_short, stale;
  };
  const Case cases[] = {
      {"19 landings is short", 19, 19, 100, 19, true, false},
      {"20 landings is not", 20, 20, 100, 20, false, false},
      {"last landing 7 days 22.5 h before the window: stale", 20, 27, 100, 20, false, true},
      {"last landing 6 days and 22.5 h before the window: not stale", 20, 26, 100, 20, false, false},
      {"rows landed on or after fit_until are left out", 30, 20, 20, 20, false, false},
  };
  Plan plan = readyby::testing::plan_from_text(kPlan);
  for (const Case& c : cases) {
    INFO(c.name);
    History h = empty_history(plan);
    std::vector<StoredLanding>& rows = rows_of(plan, h, "daily");
    for (int d = 0; d < c.landings; ++d) rows.push_back(row(day(d, 1, 30), day(d)));
    LandingModels models = fit_landing_models(plan, h, day(c.fit_until_day), day(c.window_day));
    const LandingModel* m = models.of(plan.find_node("daily"));
    REQUIRE(m);
    CHECK(m->pooled.landings == c.expect_landings);
    CHECK(m->short_history == c.is_short);
    CHECK(m->stale == c.stale);
  }
}

TEST_CASE("landing model: a row landing after the next occurrence without scheduled_at serves that one") {
  Plan plan = readyby::testing::plan_from_text(kPlan);
  History h = empty_history(plan);
  std::vector<StoredLanding>& rows = rows_of(plan, h, "daily");
  rows.push_back(row(day(0, 1, 30), day(0)));
  rows.push_back(row(day(2, 1, 10), day(1)));  // day 1's data, landing after day 2's 01:00
  rows.push_back(row(day(2, 1, 40), day(2)));
  LandingModels models = fit_landing_models(plan, h, day(10), day(3));
  const LandingModel* m = models.of(plan.find_node("daily"));
  REQUIRE(m);
  REQUIRE(m->history.size() == 3);
  CHECK(m->history[1].outcome == kMissingOccurrence);
  CHECK(m->history[2].outcome == 10 * 60);  // the earliest of the two rows it serves
}

TEST_CASE("landing model: streams and logged cron jobs") {
  Plan plan = readyby::testing::plan_from_text(kPlan);
  History h = empty_history(plan);
  // The stream logs hourly batches 5-9 minutes after their data ends; the
  // batch ending at 05:00 is missing.
  std::vector<StoredLanding>& events = rows_of(plan, h, "events");
  for (int hour = 0; hour < 12; ++hour) {
    if (hour == 5) continue;
    events.push_back(row(day(0, hour, 5 + hour % 5), day(0, hour)));
  }
  // The 02:30 snapshot job logs completions 70-80 minutes after its start,
  // with data through its start.
  std::vector<StoredLanding>& snapshot = rows_of(plan, h, "snapshot");
  for (int d = 0; d < 5; ++d) snapshot.push_back(row(day(d, 2, 30) + Seconds((70 + 2 * d) * 60), day(d, 2, 30)));
  LandingModels models = fit_landing_models(plan, h, day(10), day(5));

  const LandingModel* stream = models.of(plan.find_node("events"));
  REQUIRE(stream);
  CHECK(stream->basis == OffsetBasis::data_end);
  CHECK(stream->cadence_seconds == 3600);
  CHECK(stream->anchor == day(0, 11));
  CHECK(stream->pooled.occurrences == 12);
  CHECK(stream->pooled.landings == 11);
  CHECK(stream->history[5].outcome == kMissingOccurrence);
  CHECK(stream->history[3].outcome == 8 * 60);

  const LandingModel* job = models.of(plan.find_node("snapshot"));
  REQUIRE(job);
  CHECK(job->basis == OffsetBasis::schedule);
  CHECK(job->data_lag_seconds == 0);
  CHECK(job->pooled.landings == 5);
  CHECK(job->pooled.p50_offset_seconds == 74 * 60);
}
