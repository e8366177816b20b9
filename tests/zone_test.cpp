#include <catch2/catch.hpp>

#include <date/tz.h>

#include <random>

#include "time/posix_tz.h"
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

// Regression: the zone tables stopped at the last transition written out in
// the compiled tz files (2037), so Chicago had no daylight saving from 2038.
// The tz database's own rule after that is the POSIX TZ string at the end of
// each file (RFC 8536 §3.3). Expected dates: the US rule of the Energy Policy
// Act of 2005 §110 (second Sunday in March, first Sunday in November, at
// 02:00 local); the EU rule (Directive 2000/84/EC: last Sunday in March and
// in October, 01:00 UTC); Australia/Sydney (first Sunday in October to first
// Sunday in April, 02:00 standard / 03:00 daylight time; from memory).
TEST_CASE("zones follow the tz database's rules after 2037") {
  struct Case {
    const char* zone;
    const char* utc;      // an instant
    int offset_minutes;   // expected UTC offset then
  };
  const Case cases[] = {
      {"America/Chicago", "2040-07-02T12:00:00Z", -300},
      {"America/Chicago", "2040-01-15T12:00:00Z", -360},
      {"America/Chicago", "2040-03-11T07:59:59Z", -360},  // 01:59:59 CST, second Sunday of March 2040
      {"America/Chicago", "2040-03-11T08:00:00Z", -300},  // 02:00 CST -> 03:00 CDT
      {"America/Chicago", "2040-11-04T06:59:59Z", -300},  // 01:59:59 CDT, first Sunday of November 2040
      {"America/Chicago", "2040-11-04T07:00:00Z", -360},
      {"America/New_York", "2099-03-08T06:59:59Z", -300},
      {"America/New_York", "2099-03-08T07:00:00Z", -240},
      {"Europe/London", "2040-03-25T00:59:59Z", 0},
      {"Europe/London", "2040-03-25T01:00:00Z", 60},
      {"Europe/London", "2040-10-28T00:59:59Z", 60},
      {"Europe/London", "2040-10-28T01:00:00Z", 0},
      {"Europe/Berlin", "2045-03-26T01:00:00Z", 120},
      {"Australia/Sydney", "2040-03-31T15:59:59Z", 660},  // 02:59:59 AEDT, 1 April local
      {"Australia/Sydney", "2040-03-31T16:00:00Z", 600},
      {"Australia/Sydney", "2040-10-06T15:59:59Z", 600},  // 01:59:59 AEST, 7 October local
      {"Australia/Sydney", "2040-10-06T16:00:00Z", 660},
      {"America/Phoenix", "2040-07-02T12:00:00Z", -420},  // no daylight saving
  };
  for (const Case& c : cases) {
    INFO(c.zone << " at " << c.utc);
    const Zone* zone = Zone::find(c.zone);
    REQUIRE(zone);
    CHECK(zone->offset_at(*parse_rfc3339(c.utc)).count() == c.offset_minutes * 60);
  }
  // RFC 5545 §3.3.5 still holds in the extended years: 02:30 on the day of
  // the 2040 spring change in Chicago is 03:30 CDT.
  const Zone* chicago = Zone::find("America/Chicago");
  CHECK(format_rfc3339(chicago->from_local(*parse_local_datetime("2040-03-11T02:30")), chicago) ==
        "2040-03-11T03:30:00-05:00");
}

TEST_CASE("POSIX TZ strings parse as RFC 8536 describes") {
  struct Case {
    const char* text;
    bool valid;
    int64_t std_offset, dst_offset;
  };
  const Case cases[] = {
      {"CST6CDT,M3.2.0,M11.1.0", true, -21600, -18000},
      {"<-02>2<-01>,M3.5.0/-1,M10.5.0/0", true, -7200, -3600},   // America/Nuuk: negative transition time
      {"IST-1GMT0,M10.5.0,M3.5.0/1", true, 3600, 0},             // Europe/Dublin: "negative" daylight saving
      {"<+0330>-3:30", true, 12600, 12600},
      {"MST7", true, -25200, -25200},
      {"EST5EDT,M3.2.0/2,M11.1.0/2", true, -18000, -14400},
      {"AB5", false, 0, 0},                    // names have at least three letters
      {"EST5EDT", false, 0, 0},                // daylight time without a rule
      {"EST5EDT,M13.2.0,M11.1.0", false, 0, 0},
      {"EST5EDT,M3.6.0,M11.1.0", false, 0, 0},
      {"EST5EDT,M3.2.0/168,M11.1.0", false, 0, 0},
  };
  for (const Case& c : cases) {
    INFO(c.text);
    std::optional<PosixTzRule> rule = parse_posix_tz(c.text);
    REQUIRE(rule.has_value() == c.valid);
    if (!rule) continue;
    CHECK(rule->std_offset == c.std_offset);
    CHECK((rule->has_dst ? rule->dst_offset : rule->std_offset) == c.dst_offset);
  }
  // Julian forms: J60 is always 1 March; 59 (zero-based) is 1 March in a
  // common year and 29 February in a leap year.
  PosixTzRule j = *parse_posix_tz("XXX0YYY,J60/0,59/0");
  // (The end is read in daylight time, one hour ahead of UTC here.)
  CHECK(j.transitions(2040)[0].first == to_unix(*parse_rfc3339("2040-02-29T00:00:00Z")) - 3600);
  CHECK(j.transitions(2040)[1].first == to_unix(*parse_rfc3339("2040-03-01T00:00:00Z")));
  CHECK(j.transitions(2041)[0].first == to_unix(*parse_rfc3339("2041-03-01T00:00:00Z")) - 3600);
}

// Regression: a log with a leap second rejected the whole file. RFC 3339
// §5.6 allows time-second 60 (e.g. 1990-12-31T23:59:60Z, its §5.8 example).
TEST_CASE("RFC 3339 leap seconds read as the second before, and years 0001-9999 only") {
  CHECK(parse_rfc3339("1990-12-31T23:59:60Z") == parse_rfc3339("1990-12-31T23:59:59Z"));
  CHECK(parse_rfc3339("1990-12-31T15:59:60-08:00") == parse_rfc3339("1990-12-31T23:59:59Z"));
  CHECK_FALSE(parse_rfc3339("0000-01-01T00:00:00Z"));
  CHECK(format_rfc3339(*parse_rfc3339("0001-01-01T00:00:00Z"), nullptr) == "0001-01-01T00:00:00Z");
  CHECK(format_rfc3339(*parse_rfc3339("9999-12-31T23:59:59Z"), nullptr) == "9999-12-31T23:59:59Z");
  CHECK(unsupported_date(*parse_date("2180-12-31")).empty());
  CHECK(unsupported_date(*parse_date("2181-01-01")) ==
        "2181-01-01 is outside the supported dates 1900-01-01 to 2180-12-31 (the span of the time-zone tables)");
  CHECK_FALSE(unsupported_date(*parse_date("1899-12-31")).empty());
}
