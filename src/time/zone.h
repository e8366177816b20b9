#pragma once
// Time zones over the system tz database (IANA), read through date/tz.
//
// A Zone maps instants to local wall-clock time and back. Local → instant
// follows RFC 5545 §3.3.5: a local time inside a spring-forward gap is read
// with the UTC offset in force *before* the gap (02:30 on a day whose clocks
// jump 02:00→03:00 is 03:30 new time), and a local time that occurs twice at a
// fall-back is its *first* occurrence. (date/tz's choose::earliest maps a gap
// time to the end of the gap instead, which is not that rule.)
//
// The zone's offset history, from 1900 to 2199, is copied once into flat
// arrays, so lookups are a binary search with no locking. date/tz reads the
// compiled TZif files but does not apply the POSIX TZ rule at their end,
// which the tz database uses after the last transition written out (2037 in
// Debian's tzdata); readyby extends the table with that rule (posix_tz.h), so
// Chicago keeps its daylight saving in 2040. Windows outside the table are
// refused by the commands (kFirstSupportedDate .. kLastSupportedDate).

#include <memory>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "time/instant.h"

namespace readyby {

/// The span of dates the commands accept as the start of a window (--from,
/// --date, a run's time): the zone tables cover 1900-2199, a window lasts at
/// most 3,660 days, and an occurrence may be searched for up to 1,462 days
/// after it, so every instant the engine meets (and so every RFC 3339 time
/// it prints) lies within the tables.
inline constexpr int kFirstSupportedYear = 1900;
inline constexpr int kLastSupportedYear = 2180;
/// "" when `day` lies in the supported span, else a message saying so.
std::string unsupported_date(LocalDays day);

class Zone {
 public:
  /// The zone named `name` (e.g. "America/Chicago"); nullptr when the tz
  /// database has no such zone. Zones are cached and live for the program.
  static const Zone* find(std::string_view name);
  /// Some valid zone names near `name`, for "did you mean" messages.
  static std::vector<std::string> names();

  const std::string& name() const { return name_; }

  /// UTC offset in force at `t` (local = t + offset).
  Seconds offset_at(Instant t) const;
  /// Wall-clock reading at `t`.
  LocalTime to_local(Instant t) const { return LocalTime((t + offset_at(t)).time_since_epoch()); }
  /// The instant of wall-clock time `local` by the RFC 5545 rule above.
  Instant from_local(LocalTime local) const;

  /// True when the offset does not change in [a, b]; sets *offset to it.
  bool constant_offset(Instant a, Instant b, Seconds* offset) const;
  /// Instants in (a, b] at which the offset changes, in order.
  std::vector<Instant> transitions_in(Instant a, Instant b) const;

 private:
  explicit Zone(std::string name);
  size_t index_at(Instant t) const;

  std::string name_;
  std::vector<int64_t> begin_;     // begin_[i]: first instant (unix s) of interval i
  std::vector<int64_t> offset_;    // offset_[i]: UTC offset (s) during interval i
  std::vector<int64_t> local_begin_;  // begin_[i] + offset_[i], increasing
};

/// RFC 3339 date-time of `t` with the UTC offset of `zone` at `t`,
/// e.g. "2026-03-08T06:00:00-05:00" (or "...Z" when zone is nullptr).
std::string format_rfc3339(Instant t, const Zone* zone);
/// "YYYY-MM-DD HH:MM" wall-clock reading, for reports.
std::string format_local(LocalTime t);

/// Parses an RFC 3339 date-time with a mandatory offset ("Z" or "±HH:MM"),
/// seconds required, fractional seconds truncated, years 0001-9999. A leap
/// second (":60", RFC 3339 §5.6) is read as ":59" of the same minute.
/// Nullopt on any error.
std::optional<Instant> parse_rfc3339(std::string_view text);
/// Parses "YYYY-MM-DD" (a valid Gregorian date). Nullopt on any error.
std::optional<LocalDays> parse_date(std::string_view text);
/// Parses "YYYY-MM-DDTHH:MM" or "YYYY-MM-DD HH:MM" (optionally ":SS") as a
/// wall-clock reading. Nullopt on any error.
std::optional<LocalTime> parse_local_datetime(std::string_view text);
/// "YYYY-MM-DD".
std::string format_date(LocalDays d);

}  // namespace readyby
