#include <catch2/catch.hpp>

#include "time/calendar.h"
#include "time/zone.h"

using namespace readyby;

TEST_CASE("calendars skip weekdays and dates by local date") {
  Calendar cal;
  cal.skip_weekdays = (1u << 0) | (1u << 6);  // sun, sat
  cal.skip_dates = {*parse_date("2026-12-25")};
  // 2026-03-07 is a Saturday, 2026-03-09 a Monday, 2026-12-25 a Friday
  // (proleptic Gregorian calendar, ISO 8601).
  CHECK(weekday_of(*parse_date("2026-03-07")) == 6);
  CHECK(weekday_of(*parse_date("2026-03-09")) == 1);
  CHECK(weekday_of(*parse_date("2026-12-25")) == 5);
  CHECK(weekday_of(*parse_date("1970-01-01")) == 4);
  CHECK(cal.skips(*parse_date("2026-03-07")));
  CHECK(cal.skips(*parse_date("2026-03-08")));
  CHECK_FALSE(cal.skips(*parse_date("2026-03-09")));
  CHECK(cal.skips(*parse_date("2026-12-25")));
  CHECK_FALSE(cal.skips(*parse_date("2026-12-24")));
  CHECK(Calendar{}.empty());
  CHECK_FALSE(cal.skips_every_day());
}

TEST_CASE("weekday names parse") {
  CHECK(parse_weekday("sun") == 0);
  CHECK(parse_weekday("Sat") == 6);
  CHECK(parse_weekday("wednesday") == 3);
  CHECK(parse_weekday("wed ") == -1);
  CHECK(std::string(weekday_name(1)) == "Monday");
}
