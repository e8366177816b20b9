#include "time/posix_tz.h"

#include <date/date.h>

#include <cctype>

namespace readyby {
namespace {

struct Reader {
  std::string_view s;
  size_t i = 0;
  bool done() const { return i >= s.size(); }
  char peek() const { return done() ? '\0' : s[i]; }

  bool name() {
    if (peek() == '<') {
      size_t close = s.find('>', i);
      if (close == std::string_view::npos || close - i < 4) return false;  // at least 3 characters inside
      i = close + 1;
      return true;
    }
    size_t start = i;
    while (!done() && std::isalpha(static_cast<unsigned char>(peek()))) ++i;
    return i - start >= 3;
  }
  // [+-]h[h][:mm[:ss]], hours up to `max_hours`.
  bool hms(int max_hours, int64_t* out) {
    int sign = 1;
    if (peek() == '+' || peek() == '-') sign = s[i++] == '-' ? -1 : 1;
    int64_t parts[3] = {0, 0, 0};
    for (int p = 0; p < 3; ++p) {
      if (p > 0) {
        if (peek() != ':') break;
        ++i;
      }
      size_t start = i;
      while (!done() && std::isdigit(static_cast<unsigned char>(peek())) && i - start < 3) {
        parts[p] = parts[p] * 10 + (s[i++] - '0');
      }
      if (i == start) return false;
    }
    if (parts[0] > max_hours || parts[1] > 59 || parts[2] > 59) return false;
    *out = sign * (parts[0] * 3600 + parts[1] * 60 + parts[2]);
    return true;
  }
  bool number(int lo, int hi, int* out) {
    size_t start = i;
    int v = 0;
    while (!done() && std::isdigit(static_cast<unsigned char>(peek())) && i - start < 4) v = v * 10 + (s[i++] - '0');
    if (i == start || v < lo || v > hi) return false;
    *out = v;
    return true;
  }
  bool date(PosixTzRule::Date* d) {
    using Kind = PosixTzRule::Date::Kind;
    if (peek() == 'J') {
      ++i;
      d->kind = Kind::julian_no_leap;
      if (!number(1, 365, &d->day)) return false;
    } else if (peek() == 'M') {
      ++i;
      d->kind = Kind::month_week_day;
      if (!number(1, 12, &d->month) || peek() != '.') return false;
      ++i;
      if (!number(1, 5, &d->week) || peek() != '.') return false;
      ++i;
      if (!number(0, 6, &d->day)) return false;
    } else {
      d->kind = Kind::zero_based;
      if (!number(0, 365, &d->day)) return false;
    }
    if (peek() == '/') {
      ++i;
      if (!hms(167, &d->time)) return false;
    }
    return true;
  }
};

// Unix day number of the rule's date in `year`.
int64_t rule_day(const PosixTzRule::Date& d, int year) {
  using namespace date;
  using Kind = PosixTzRule::Date::Kind;
  sys_days jan1 = sys_days(date::year(year) / January / 1);
  switch (d.kind) {
    case Kind::julian_no_leap: {
      // Day 60 is always 1 March: 29 February is not counted.
      int n = d.day;
      bool leap = date::year(year).is_leap();
      int64_t offset = n - 1 + ((leap && n >= 60) ? 1 : 0);
      return (jan1 + days(offset)).time_since_epoch().count();
    }
    case Kind::zero_based:
      return (jan1 + days(d.day)).time_since_epoch().count();
    case Kind::month_week_day: {
      year_month ym = date::year(year) / month(static_cast<unsigned>(d.month));
      sys_days first = sys_days(ym / 1);
      unsigned first_wd = weekday(first).c_encoding();
      int64_t delta = (d.day - static_cast<int>(first_wd) + 7) % 7;
      sys_days day = first + days(delta + 7 * (d.week - 1));
      sys_days month_end = sys_days(ym / date::last);
      while (day > month_end) day -= days(7);  // week 5: the last such weekday
      return day.time_since_epoch().count();
    }
  }
  return 0;
}

}  // namespace

std::optional<PosixTzRule> parse_posix_tz(std::string_view text) {
  Reader r{text};
  PosixTzRule rule;
  if (!r.name()) return std::nullopt;
  int64_t west = 0;
  if (!r.hms(24, &west)) return std::nullopt;
  rule.std_offset = -west;
  if (r.done()) return rule;
  if (!r.name()) return std::nullopt;
  rule.has_dst = true;
  rule.dst_offset = rule.std_offset + 3600;
  if (r.peek() != ',') {
    if (!r.hms(24, &west)) return std::nullopt;
    rule.dst_offset = -west;
  }
  // A TZ string with daylight time but no rule has no portable meaning in a
  // TZif footer (RFC 8536 requires the rule): refuse it.
  if (r.peek() != ',') return std::nullopt;
  ++r.i;
  if (!r.date(&rule.start) || r.peek() != ',') return std::nullopt;
  ++r.i;
  if (!r.date(&rule.end) || !r.done()) return std::nullopt;
  return rule;
}

std::vector<std::pair<int64_t, int64_t>> PosixTzRule::transitions(int year) const {
  std::vector<std::pair<int64_t, int64_t>> out;
  if (!has_dst) return out;
  // Start: given in standard time; end: given in daylight time.
  int64_t to_dst = rule_day(start, year) * 86400 + start.time - std_offset;
  int64_t to_std = rule_day(end, year) * 86400 + end.time - dst_offset;
  out.push_back({to_dst, dst_offset});
  out.push_back({to_std, std_offset});
  if (out[1].first < out[0].first) std::swap(out[0], out[1]);
  return out;
}

std::optional<std::string> tzif_footer(std::string_view data) {
  if (data.size() < 44 || data.substr(0, 4) != "TZif" || data[4] < '2') return std::nullopt;
  if (data.back() != '\n') return std::nullopt;
  size_t start = data.rfind('\n', data.size() - 2);
  if (start == std::string_view::npos) return std::nullopt;
  std::string_view footer = data.substr(start + 1, data.size() - start - 2);
  if (footer.empty()) return std::nullopt;
  return std::string(footer);
}

}  // namespace readyby
