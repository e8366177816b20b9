#pragma once
// Cron schedules (five fields) and their next occurrence.
//
// Fields: minute 0-59, hour 0-23, day-of-month 1-31, month 1-12 or jan-dec,
// day-of-week 0-7 or sun-sat (0 and 7 are Sunday). Elements: `*`, `N`, `A-B`,
// `*/S`, `A-B/S`, `N/S` (N to the field's maximum, step S), comma lists.
// Macros: @yearly/@annually, @monthly, @weekly, @daily/@midnight, @hourly.
// Day rule (POSIX crontab, as the widespread Unix cron implements it): when
// the day-of-month or the day-of-week field *begins with* `*`, a day must
// match both fields; otherwise it must match either.

#include <cstdint>
#include <optional>
#include <string>
#include <string_view>

#include "time/calendar.h"
#include "time/instant.h"
#include "time/zone.h"
#include "util/parsed.h"

namespace readyby {

struct Cron {
  std::string text;        // as written
  uint64_t minutes = 0;    // bit m: minute m matches
  uint32_t hours = 0;      // bit h
  uint32_t days = 0;       // bit d, 1..31
  uint16_t months = 0;     // bit m, 1..12
  uint8_t weekdays = 0;    // bit w, 0 = Sunday .. 6 = Saturday
  bool days_star = false;      // day-of-month field begins with '*'
  bool weekdays_star = false;  // day-of-week field begins with '*'

  /// Whether local date `day` passes the month and day rules.
  bool matches_day(LocalDays day) const;
};

/// Result of parsing a cron expression: a schedule, or an error naming the
/// field and the bad element, with the 0-based offset of that element.
using CronParse = Parsed<Cron>;

/// Parses a cron expression as described above.
CronParse parse_cron(std::string_view text);

/// How far ahead an occurrence is searched for: 1,462 days (four years and a
/// day, so that a schedule firing only on 29 February is always found).
inline constexpr int64_t kSearchHorizonSeconds = 1462 * kSecondsPerDay;

/// First occurrence of `schedule` at or after `from`, skipping local dates
/// that `calendar` excludes. Local times in a daylight-saving gap take the
/// offset in force before the gap; repeated local times take the first
/// occurrence (RFC 5545 §3.3.5); when that makes local order and instant order
/// differ, the earliest instant wins. Returns nullopt when nothing qualifies
/// at or before `from` + kSearchHorizonSeconds.
///
/// Computed field by field: whole months and days that cannot match are
/// skipped, and within a day the next hour and minute are found with bit
/// scans. Days near an offset change are examined exhaustively.
std::optional<Instant> next_occurrence(const Cron& schedule, const Zone& zone, const Calendar& calendar,
                                       Instant from);

/// The latest occurrence of `schedule` at or before `at` (same rules as
/// next_occurrence), found by searching forward with next_occurrence from
/// increasingly early starts (1 hour, 2 days, 8 days, 32 days, 367 days and
/// 1,462 days before `at`). Nullopt when none exists in that span.
std::optional<Instant> previous_occurrence(const Cron& schedule, const Zone& zone, const Calendar& calendar,
                                           Instant at);

/// The result of fires_in_every_window.
struct SilenceCheck {
  bool fires = true;              // true: every window of the horizon holds an occurrence
  std::optional<Instant> after;   // when `fires` is false: the start of a silent window, if known
};

/// Whether `schedule` fires at least once in *every* window of
/// kSearchHorizonSeconds (1,462 days), whatever the current date — so the
/// answer never depends on the clock. Exact for the finite `skip_dates` of
/// `calendar` (each gap between surviving occurrences that contains a skipped
/// date is measured); the weekly and yearly pattern without skip dates is
/// checked from 2001-01-01, which finds any month/day and weekday
/// combination (29 February included: 2004). One known exception is
/// accepted: a schedule that fires only on 29 February is silent for eight
/// years around 2100, a year without one.
SilenceCheck fires_in_every_window(const Cron& schedule, const Zone& zone, const Calendar& calendar);

}  // namespace readyby
