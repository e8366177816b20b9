#include <catch2/catch.hpp>

#include "time/duration.h"

using namespace readyby;

TEST_CASE("durations parse to exact seconds") {
  struct Case {
    const char* text;
    int64_t seconds;
  };
  const Case cases[] = {
      // ISO 8601 / RFC 5545 §3.3.6 examples: "P15DT5H0M20S" (15 days, 5 hours
      // and 20 seconds) and "P7W" (7 weeks).
      {"P15DT5H0M20S", 15 * 86400 + 5 * 3600 + 20},
      {"P7W", 7 * 604800},
      {"PT0S", 0},
      {"PT40M", 2400},
      {"PT2H30M", 9000},
      {"P1D", 86400},
      {"P400D", 400 * 86400},
      {"PT36H", 36 * 3600},
      {"P1DT1S", 86401},
  };
  for (const Case& c : cases) {
    INFO(c.text);
    DurationParse d = parse_duration(c.text);
    REQUIRE(d.value);
    CHECK(d.value->seconds == c.seconds);
  }
}

TEST_CASE("bad durations are rejected with a reason and an offset") {
  struct Case {
    const char* text;
    const char* error;
    size_t offset;
  };
  const Case cases[] = {
      // ISO 8601 allows years and months (P3Y6M4DT12H30M5S is the standard's
      // example); readyby rejects them because their length varies.
      {"P3Y6M4DT12H30M5S",
       "years (Y) and months (M) are not allowed in a duration: their length varies; use days (D) or weeks (W)", 2},
      {"P1M", "years (Y) and months (M) are not allowed in a duration: their length varies; use days (D) or weeks (W)", 2},
      {"-PT1H", "negative durations are not allowed", 0},
      {"PT1.5H", "fractions are not allowed in a duration", 3},
      {"30M", "a duration must start with 'P' (ISO 8601), e.g. PT30M or P1D", 0},
      {"P", "a duration needs at least one part after 'P', e.g. PT0S", 1},
      {"PT", "expected hours, minutes or seconds after 'T'", 2},
      {"P1H", "'H' must come after 'T' (e.g. PT1H)", 2},
      {"PT5", "number without a unit (W, D, H, M or S)", 3},
      {"PT1M1H", "unit 'H' is out of order or repeated", 5},
      {"P1W2D", "weeks (W) cannot be combined with other units; use days (D)", 2},
      {"", "empty duration (expected e.g. PT30M or P1D)", 0},
  };
  for (const Case& c : cases) {
    INFO(c.text);
    DurationParse d = parse_duration(c.text);
    CHECK_FALSE(d.value);
    CHECK(d.error == c.error);
    CHECK(d.offset == c.offset);
  }
}

TEST_CASE("durations format back to the shortest form") {
  struct Case {
    int64_t seconds;
    const char* text;
  };
  const Case cases[] = {
      {0, "PT0S"},          {2400, "PT40M"},  {9000, "PT2H30M"}, {86400, "P1D"},
      {604800, "P1W"},      {14 * 86400, "P2W"}, {15 * 86400 + 5 * 3600 + 20, "P15DT5H20S"},
      {90061, "P1DT1H1M1S"}, {59, "PT59S"},
  };
  for (const Case& c : cases) {
    INFO(c.seconds);
    CHECK(format_duration(Duration{c.seconds}) == c.text);
    // Round trip: the formatted text parses back to the same length.
    CHECK(parse_duration(c.text).value->seconds == c.seconds);
  }
}

TEST_CASE("human durations read well in reports") {
  CHECK(human_duration(0) == "0m");
  CHECK(human_duration(45) == "45s");
  CHECK(human_duration(5700) == "1h 35m");
  CHECK(human_duration(-3600) == "-1h 00m");
  CHECK(human_duration(3 * 86400 + 4 * 3600) == "3d 4h");
}

TEST_CASE("durations past the 64-bit range are errors, never wrapped values") {
  // Each of these would overflow int64 seconds when multiplied out or summed
  // (9,223,372,036,854,775,807 s is about 1.07e14 days), or come close
  // enough that adding it to an instant would. They must be rejected with a
  // message at the offending number, not accepted as a negative or wrapped length.
  const char* cases[] = {
      "P100000000000000W",                 // 6.0e19 s
      "PT2562047788015216H",               // 9.2e18 s: just past the range
      "P100000000000000D",                 // 8.6e18 s: fits, but leaves no room for an instant
      "P100000000000000DT2562047788015H",  // two parts that fit alone, not together
      "PT153722867280912931M",
      "PT9223372036854775807S",
      "P99999999999999999999999999D",      // too many digits for any integer
  };
  for (const char* text : cases) {
    INFO(text);
    DurationParse d = parse_duration(text);
    CHECK_FALSE(d.value);
    CHECK_FALSE(d.error.empty());
    CHECK(d.offset >= 1);
    CHECK(d.offset < std::string_view(text).size());
  }
}

// Regression, found by fuzzing (seeds tests/fuzz/corpus/duration/repeated_hours*):
// the hour unit could be repeated right after 'T' because the parser's "just
// after T" rank equalled the rank of H, so PT1H1H read as two hours. An ISO 8601
// duration gives each component at most once, largest first.
TEST_CASE("a unit repeated right after 'T' is rejected") {
  struct Case {
    const char* text;
    size_t offset;   // of the repeated unit
  };
  const Case cases[] = {
      {"PT1H1H", 5},
      {"P1DT2H2H", 7},
  };
  for (const Case& c : cases) {
    INFO(c.text);
    DurationParse d = parse_duration(c.text);
    CHECK_FALSE(d.value);
    CHECK(d.error == "unit 'H' is out of order or repeated");
    CHECK(d.offset == c.offset);
  }
}

// Regression: `P1000000W` was accepted, then made one day's check take 42 s
// and 700 MB, and sums of such durations overflowed. parse_duration caps
// every duration at a century, so no sum with an instant can overflow.
TEST_CASE("durations are bounded") {
  CHECK(parse_duration("P36525D").value->seconds == kMaxDurationSeconds);
  DurationParse too_long = parse_duration("P36526D");
  CHECK_FALSE(too_long.value);
  CHECK(too_long.error == "duration is longer than 36,525 days (P36525D)");
  CHECK(parse_duration("P1000000W").error == "duration is longer than 36,525 days (P36525D)");
  // The total counts, not only each part.
  CHECK(parse_duration("P36525DT1S").error == "duration is longer than 36,525 days (P36525D)");
  CHECK(parse_duration("PT9999999999999999999S").error == "duration is too large");
  CHECK(kMaxTimingDurationSeconds == 1462 * 86400);  // DESIGN §4: the engine's horizon
}
