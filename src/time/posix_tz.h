#pragma once
// The POSIX TZ rule at the end of a compiled time-zone file (TZif version 2
// and later, RFC 8536 §3.3 "TZ string"), which the tz database uses for every
// instant after the file's last explicit transition. date/tz does not apply
// it, so without it a zone would keep its 2037 offset for ever (Chicago
// without daylight saving from 2038).
//
// Grammar (POSIX.1-2017 XBD §8.3 TZ, with the RFC 8536 §3.3.1 extensions:
// hours of a transition time from -167 to 167):
//   std offset [dst [offset] [,start[/time],end[/time]]]
// names are 3+ letters or <quoted> (e.g. <+0330>); offsets are
// [+-]hh[:mm[:ss]] *west* of Greenwich (CST6 is UTC-6); dst defaults to one
// hour ahead of std; rules are Jn (1..365, 29 February never counted), n
// (0..365, counted) or Mm.w.d (month m, week w = 1..5 where 5 means the
// last, weekday d = 0 Sunday); a transition time defaults to 02:00 and is in
// the local time in force before it (standard time for start, daylight time
// for end).

#include <cstdint>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace readyby {

struct PosixTzRule {
  int64_t std_offset = 0;   // UTC offset of standard time, seconds *east* (CST6 -> -21600)
  bool has_dst = false;
  int64_t dst_offset = 0;   // UTC offset of daylight time, seconds east
  struct Date {
    enum class Kind { julian_no_leap, zero_based, month_week_day } kind = Kind::month_week_day;
    int day = 0;            // Jn: 1..365; n: 0..365; M: weekday 0..6
    int month = 0, week = 0;  // M only
    int64_t time = 7200;    // seconds after local midnight (may be negative or past 24 h)
  };
  Date start, end;          // daylight time starts / ends (only when has_dst)

  /// The offset changes of calendar year `year` as (instant in unix seconds,
  /// new offset), in instant order. Empty without daylight saving.
  std::vector<std::pair<int64_t, int64_t>> transitions(int year) const;
};

/// Parses a TZ string; nullopt when it does not follow the grammar above.
std::optional<PosixTzRule> parse_posix_tz(std::string_view text);

/// The TZ string at the end of the TZif file `data` (the text between the
/// last two newlines, after a version 2+ header); nullopt when the file is
/// not TZif version 2 or later or has no footer.
std::optional<std::string> tzif_footer(std::string_view data);

}  // namespace readyby
