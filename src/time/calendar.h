#pragma once
// Calendars: local dates on which a schedule does not fire.
//
// A calendar skips whole local dates — by weekday and by explicit date — in
// the zone of the node that uses it. The default-constructed calendar skips
// nothing.

#include <algorithm>
#include <cstdint>
#include <string>
#include <vector>

#include "time/instant.h"

namespace readyby {

struct Calendar {
  std::string name;                  // empty for "no calendar"
  uint8_t skip_weekdays = 0;         // bit w set: skip weekday w (0 = Sunday .. 6 = Saturday)
  std::vector<LocalDays> skip_dates; // sorted, unique
  int line = 0;                      // where it is defined in its file; 0: unknown

  /// True when local date `day` is skipped.
  bool skips(LocalDays day) const;
  /// True when the calendar skips nothing.
  bool empty() const { return skip_weekdays == 0 && skip_dates.empty(); }
  /// True when every weekday is skipped, so nothing can ever fire.
  bool skips_every_day() const { return (skip_weekdays & 0x7F) == 0x7F; }
};

/// Weekday of a local date, 0 = Sunday .. 6 = Saturday.
int weekday_of(LocalDays day);

/// Parses "sun".."sat" (or full names, any case) to 0..6; -1 otherwise.
int parse_weekday(std::string_view name);
/// "Sunday".."Saturday".
const char* weekday_name(int w);

}  // namespace readyby
