#include <catch2/catch.hpp>

#include <date/tz.h>

#include <random>

#include "time/zone.h"

using namespace readyby;

namespace {

Instant utc(const char* text) {
  auto t = parse_rfc3339(text);
  REQUIRE(t);
  return *t;
}

LocalTime local(const char* text) {
  auto t = parse_local_datetime(text);
  REQUIRE(t);
  return *t;
}

}  // namespace

TEST_CASE("local times map to instants by the RFC 5545 rules") {
  struct Case {
    const char* name;
    const char* zone;
    const char* local;
    const char* instant;
  };
  const Case cases[] = {
      // RFC 5545 §3.3.5: TZID=America/New_York:20071104T013000 is the first
      // occurrence, 01:30 EDT.
      {"overlap", "America/New_York", "2007-11-04T01:30", "2007-11-04T05:30:00Z"},
      // RFC 5545 §3.3.5: TZID=America/New_York:20070311T023000 does not
      // exist; it is read with the offset before the gap: 03:30 EDT.
      {"gap", "America/New_York", "2007-03-11T02:30", "2007-03-11T07:30:00Z"},
      // tz database (America/Chicago, US rules since 2007): 2026-03-08
      // 02:00 CST -> 03:00 CDT; 02:30 is read at -06:00.
      {"chicago gap", "America/Chicago", "2026-03-08T02:30", "2026-03-08T08:30:00Z"},
      {"chicago after gap", "America/Chicago", "2026-03-08T03:30", "2026-03-08T08:30:00Z"},
      // 2026-11-01 02:00 CDT -> 01:00 CST: 01:30 is first CDT (-05:00).
      {"chicago overlap", "America/Chicago", "2026-11-01T01:30", "2026-11-01T06:30:00Z"},
      // tz database (Europe/London, EU rules): 2026-03-29 01:00 GMT -> 02:00 BST.
      {"london gap", "Europe/London", "2026-03-29T01:30", "2026-03-29T01:30:00Z"},
      // 2026-10-25 02:00 BST -> 01:00 GMT: 01:30 first occurrence is BST.
      {"london overlap", "Europe/London", "2026-10-25T01:30", "2026-10-25T00:30:00Z"},
      // tz database (Australia/Sydney): 2026-04-05 03:00 AEDT -> 02:00 AEST;
      // 02:30 first occurrence is AEDT (+11:00).
      {"sydney overlap", "Australia/Sydney", "2026-04-05T02:30", "2026-04-04T15:30:00Z"},
      // 2026-10-04 02:00 AEST -> 03:00 AEDT: 02:30 read at +10:00.
      {"sydney gap", "Australia/Sydney", "2026-10-04T02:30", "2026-10-03T16:30:00Z"},
      // tz database (Australia/Lord_Howe): a 30-minute shift; 2026-10-04
      // 02:00 +10:30 -> 02:30 +11:00; 02:15 is read at +10:30.
      {"lord howe gap", "Australia/Lord_Howe", "2026-10-04T02:15", "2026-10-03T15:45:00Z"},
      // tz database (Asia/Kolkata): +05:30 all year, no daylight saving.
      {"kolkata", "Asia/Kolkata", "2026-03-08T02:30", "2026-03-07T21:00:00Z"},
  };
  for (const Case& c : cases) {
    INFO(c.name);
    const Zone* zone = Zone::find(c.zone);
    REQUIRE(zone);
    CHECK(format_rfc3339(zone->from_local(local(c.local)), nullptr) == c.instant);
  }
}

TEST_CASE("2026 daylight-saving transitions match the tz database rules") {
  struct Case {
    const char* zone;
    const char* transition;  // the instant the offset changes
    const char* before;      // offset just before
    const char* after;       // offset from then on
  };
  const Case cases[] = {
      // US rules (second Sunday of March, first Sunday of November, at 02:00 local).
      {"America/Chicago", "2026-03-08T08:00:00Z", "-06:00", "-05:00"},
      {"America/Chicago", "2026-11-01T07:00:00Z", "-05:00", "-06:00"},
      {"America/New_York", "2026-03-08T07:00:00Z", "-05:00", "-04:00"},
      {"America/New_York", "2026-11-01T06:00:00Z", "-04:00", "-05:00"},
      // EU rules (last Sunday of March and October, at 01:00 UTC).
      {"Europe/London", "2026-03-29T01:00:00Z", "+00:00", "+01:00"},
      {"Europe/London", "2026-10-25T01:00:00Z", "+01:00", "+00:00"},
      // Australian rules (first Sunday of April and October).
      {"Australia/Sydney", "2026-04-04T16:00:00Z", "+11:00", "+10:00"},
      {"Australia/Sydney", "2026-10-03T16:00:00Z", "+10:00", "+11:00"},
      // Lord Howe: 30-minute daylight saving, at 02:00 local.
      {"Australia/Lord_Howe", "2026-04-04T15:00:00Z", "+11:00", "+10:30"},
      {"Australia/Lord_Howe", "2026-10-03T15:30:00Z", "+10:30", "+11:00"},
  };
  for (const Case& c : cases) {
    INFO(c.zone << " " << c.transition);
    const Zone* zone = Zone::find(c.zone);
    REQUIRE(zone);
    Instant t = utc(c.transition);
    CHECK(format_rfc3339(t - Seconds(1), zone).substr(19) == c.before);
    CHECK(format_rfc3339(t, zone).substr(19) == c.after);
    auto found = zone->transitions_in(t - Seconds(86400), t + Seconds(86400));
    REQUIRE(found.size() == 1);
    CHECK(found[0] == t);
  }
  const Zone* kolkata = Zone::find("Asia/Kolkata");
  CHECK(kolkata->transitions_in(utc("2026-01-01T00:00:00Z"), utc("2027-01-01T00:00:00Z")).empty());
  CHECK(format_rfc3339(utc("2026-07-01T00:00:00Z"), kolkata) == "2026-07-01T05:30:00+05:30");
}

TEST_CASE("from_local agrees with the tz database on random local times") {
  // Independent reference: date/tz's own local_info, with the RFC 5545 choice
  // made here (gap and overlap both take the first offset).
  const char* zones[] = {"America/Chicago", "Europe/London", "Australia/Sydney", "Australia/Lord_Howe",
                         "Asia/Kolkata", "America/St_Johns", "Pacific/Chatham", "Pacific/Apia"};
  std::mt19937_64 rng(20261201);
  for (const char* name : zones) {
    const Zone* zone = Zone::find(name);
    const date::time_zone* tz = date::locate_zone(name);
    for (int i = 0; i < 3000; ++i) {
      int64_t base = 1735689600 + static_cast<int64_t>(rng() % (3 * 365 * 86400ULL));  // 2025..2027
      LocalTime l{Seconds(base - base % 60)};
      date::local_info info = tz->get_info(l);
      Instant expected = Instant((l - info.first.offset).time_since_epoch());
      INFO(name << " " << format_local(l));
      REQUIRE(zone->from_local(l) == expected);
      Instant t = from_unix(base);
      REQUIRE(zone->offset_at(t) == tz->get_info(t).offset);
    }
  }
}

TEST_CASE("unknown zones are not found") {
  CHECK(Zone::find("America/Chicgo") == nullptr);
  CHECK(Zone::find("Mars/Olympus") == nullptr);
  CHECK(Zone::find("Etc/UTC") != nullptr);
}

TEST_CASE("RFC 3339 timestamps parse and print") {
  // RFC 3339 §5.8 examples.
  CHECK(to_unix(*parse_rfc3339("1985-04-12T23:20:50.52Z")) == 482196050);
  CHECK(to_unix(*parse_rfc3339("1996-12-19T16:39:57-08:00")) == 851042397);
  CHECK(format_rfc3339(*parse_rfc3339("1996-12-19T16:39:57-08:00"), nullptr) == "1996-12-20T00:39:57Z");
  CHECK_FALSE(parse_rfc3339("1996-12-19T16:39:57"));     // offset is mandatory
  CHECK_FALSE(parse_rfc3339("1996-02-30T16:39:57Z"));    // no such date
  CHECK_FALSE(parse_rfc3339("1996-12-19T24:00:00Z"));
  CHECK(parse_date("2026-02-29") == std::nullopt);
  CHECK(format_date(*parse_date("2028-02-29")) == "2028-02-29");
}
