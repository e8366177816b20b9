#include "time/calendar.h"

#include <cctype>
#include <string>

namespace readyby {

int weekday_of(LocalDays day) {
  // 1970-01-01 was a Thursday (4).
  int64_t n = day.time_since_epoch().count();
  return static_cast<int>(((n % 7) + 7 + 4) % 7);
}

bool Calendar::skips(LocalDays day) const {
  if (skip_weekdays & (1u << weekday_of(day))) return true;
  return !skip_dates.empty() && std::binary_search(skip_dates.begin(), skip_dates.end(), day);
}

int parse_weekday(std::string_view name) {
  static const char* const kShort[] = {"sun", "mon", "tue", "wed", "thu", "fri", "sat"};
  static const char* const kLong[] = {"sunday", "monday", "tuesday", "wednesday", "thursday", "friday", "saturday"};
  std::string lower;
  for (char c : name) lower += static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  for (int i = 0; i < 7; ++i) {
    if (lower == kShort[i] || lower == kLong[i]) return i;
  }
  return -1;
}

const char* weekday_name(int w) {
  static const char* const kNames[] = {"Sunday", "Monday", "Tuesday", "Wednesday", "Thursday", "Friday", "Saturday"};
  return kNames[((w % 7) + 7) % 7];
}

}  // namespace readyby
