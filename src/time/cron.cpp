#include "time/cron.h"

#include <date/date.h>

#include <bit>
#include <cctype>
#include <vector>

namespace readyby {
namespace {

struct FieldSpec {
  const char* name;
  int min;
  int max;
  const char* const* names;  // names[i] is value names_base + i; nullptr when none
  int names_base;
};

const char* const kMonthNames[] = {"jan", "feb", "mar", "apr", "may", "jun",
                                   "jul", "aug", "sep", "oct", "nov", "dec", nullptr};
const char* const kDayNames[] = {"sun", "mon", "tue", "wed", "thu", "fri", "sat", nullptr};

const FieldSpec kFields[5] = {
    {"minute", 0, 59, nullptr, 0},
    {"hour", 0, 23, nullptr, 0},
    {"day-of-month", 1, 31, nullptr, 0},
    {"month", 1, 12, kMonthNames, 1},
    {"day-of-week", 0, 7, kDayNames, 0},
};

struct FieldError {
  std::string message;
  size_t offset;  // within the whole expression
};

// Parses one value (number or name) of a field; returns false with an error.
bool parse_value(const FieldSpec& spec, std::string_view s, size_t base, int* out, FieldError* err) {
  if (s.empty()) {
    *err = {std::string(spec.name) + " field: empty element", base};
    return false;
  }
  if (std::isdigit(static_cast<unsigned char>(s[0]))) {
    int v = 0;
    for (size_t i = 0; i < s.size(); ++i) {
      if (!std::isdigit(static_cast<unsigned char>(s[i])) || v > 1000) {
        *err = {std::string(spec.name) + " field: '" + std::string(s) + "' is not a number", base};
        return false;
      }
      v = v * 10 + (s[i] - '0');
    }
    if (v < spec.min || v > spec.max) {
      *err = {std::string(spec.name) + " field: '" + std::string(s) + "' is out of range " +
                  std::to_string(spec.min) + "-" + std::to_string(spec.max),
              base};
      return false;
    }
    *out = v;
    return true;
  }
  if (spec.names) {
    std::string lower;
    for (char c : s) lower += static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
    for (int i = 0; spec.names[i]; ++i) {
      if (lower == spec.names[i]) {
        *out = spec.names_base + i;
        return true;
      }
    }
  }
  *err = {std::string(spec.name) + " field: '" + std::string(s) + "' is not a valid value" +
              (spec.names ? std::string(" (use ") + std::to_string(spec.min) + "-" + std::to_string(spec.max) +
                                " or " + spec.names[0] + "-" +
                                spec.names[spec.names == kMonthNames ? 11 : 6] + ")"
                          : ""),
          base};
  return false;
}

// Parses one comma-separated element into `bits`.
bool parse_element(const FieldSpec& spec, std::string_view el, size_t base, uint64_t* bits, FieldError* err) {
  std::string_view range = el;
  int step = 1;
  size_t slash = el.find('/');
  if (slash != std::string_view::npos) {
    range = el.substr(0, slash);
    std::string_view step_text = el.substr(slash + 1);
    if (step_text.empty()) {
      *err = {std::string(spec.name) + " field: '" + std::string(el) + "' has no step after '/'", base};
      return false;
    }
    int v = 0;
    for (char c : step_text) {
      if (!std::isdigit(static_cast<unsigned char>(c)) || v > 1000) {
        *err = {std::string(spec.name) + " field: step '" + std::string(step_text) + "' is not a number",
                base + slash + 1};
        return false;
      }
      v = v * 10 + (c - '0');
    }
    if (v == 0 || v > spec.max) {
      *err = {std::string(spec.name) + " field: step '" + std::string(step_text) + "' must be 1-" +
                  std::to_string(spec.max),
              base + slash + 1};
      return false;
    }
    step = v;
  }
  int lo, hi;
  if (range == "*") {
    lo = spec.min;
    hi = spec.max;
  } else {
    size_t dash = range.find('-');
    if (dash == std::string_view::npos) {
      if (!parse_value(spec, range, base, &lo, err)) return false;
      hi = slash != std::string_view::npos ? spec.max : lo;  // N/S = N to max, step S
    } else {
      if (!parse_value(spec, range.substr(0, dash), base, &lo, err)) return false;
      if (!parse_value(spec, range.substr(dash + 1), base + dash + 1, &hi, err)) return false;
      if (lo > hi) {
        *err = {std::string(spec.name) + " field: range '" + std::string(range) + "' runs backwards", base};
        return false;
      }
    }
  }
  for (int v = lo; v <= hi; v += step) *bits |= uint64_t{1} << v;
  return true;
}

std::string_view macro_expansion(std::string_view text) {
  if (text == "@yearly" || text == "@annually") return "0 0 1 1 *";
  if (text == "@monthly") return "0 0 1 * *";
  if (text == "@weekly") return "0 0 * * 0";
  if (text == "@daily" || text == "@midnight") return "0 0 * * *";
  if (text == "@hourly") return "0 * * * *";
  return {};
}

int next_bit(uint64_t bits, int from) {
  if (from >= 64) return -1;
  uint64_t masked = bits & (~uint64_t{0} << from);
  return masked ? std::countr_zero(masked) : -1;
}

}  // namespace

CronParse parse_cron(std::string_view text) {
  CronParse out;
  std::string_view body = text;
  if (!text.empty() && text[0] == '@') {
    body = macro_expansion(text);
    if (body.empty()) {
      out.error = "unknown cron macro '" + std::string(text) +
                  "' (expected @yearly, @annually, @monthly, @weekly, @daily, @midnight or @hourly)";
      return out;
    }
  }
  // Split into fields, remembering where each starts.
  std::vector<std::pair<std::string_view, size_t>> fields;
  size_t i = 0;
  while (i < body.size()) {
    while (i < body.size() && (body[i] == ' ' || body[i] == '\t')) ++i;
    if (i == body.size()) break;
    size_t start = i;
    while (i < body.size() && body[i] != ' ' && body[i] != '\t') ++i;
    fields.emplace_back(body.substr(start, i - start), body.data() == text.data() ? start : 0);
  }
  if (fields.size() != 5) {
    out.error = "cron needs 5 fields (minute hour day-of-month month day-of-week), found " +
                std::to_string(fields.size());
    return out;
  }
  uint64_t bits[5] = {0, 0, 0, 0, 0};
  for (int f = 0; f < 5; ++f) {
    auto [field, base] = fields[f];
    size_t pos = 0;
    while (true) {
      size_t comma = field.find(',', pos);
      std::string_view el = field.substr(pos, comma == std::string_view::npos ? std::string_view::npos : comma - pos);
      FieldError err;
      if (!parse_element(kFields[f], el, base + pos, &bits[f], &err)) {
        out.error = std::move(err.message);
        out.offset = err.offset;
        return out;
      }
      if (comma == std::string_view::npos) break;
      pos = comma + 1;
    }
  }
  Cron cron;
  cron.text = std::string(text);
  cron.minutes = bits[0];
  cron.hours = static_cast<uint32_t>(bits[1]);
  cron.days = static_cast<uint32_t>(bits[2]);
  cron.months = static_cast<uint16_t>(bits[3]);
  cron.weekdays = static_cast<uint8_t>((bits[4] | (bits[4] >> 7)) & 0x7F);  // 7 is Sunday
  cron.days_star = fields[2].first[0] == '*';
  cron.weekdays_star = fields[4].first[0] == '*';
  out.value = std::move(cron);
  return out;
}

bool Cron::matches_day(LocalDays day) const {
  date::year_month_day ymd{day};
  if (!(months & (1u << static_cast<unsigned>(ymd.month())))) return false;
  bool dom = days & (1u << static_cast<unsigned>(ymd.day()));
  bool dow = weekdays & (1u << weekday_of(day));
  return (days_star || weekdays_star) ? (dom && dow) : (dom || dow);
}

namespace {

// Earliest instant >= from among the schedule's times on local date `day`
// (whose day rule and calendar are already known to pass); nullopt if none.
std::optional<Instant> first_on_day(const Cron& c, const Zone& zone, LocalDays day, Instant from) {
  LocalTime midnight{day.time_since_epoch()};
  Instant approx_start = Instant(midnight.time_since_epoch()) - Seconds(26 * 3600);
  Instant approx_end = Instant(midnight.time_since_epoch()) + Seconds(50 * 3600);
  Seconds offset{0};
  if (zone.constant_offset(approx_start, approx_end, &offset)) {
    // One offset all day: local order is instant order. Jump field by field.
    LocalTime local_from = LocalTime((from + offset).time_since_epoch());
    int64_t lower = (local_from - midnight).count();  // seconds into the day
    if (lower >= kSecondsPerDay) return std::nullopt;
    int h = 0, m = 0;
    if (lower > 0) {
      int64_t minute_index = (lower + 59) / 60;  // occurrences are whole minutes
      h = static_cast<int>(minute_index / 60);
      m = static_cast<int>(minute_index % 60);
      if (h >= 24) return std::nullopt;
    }
    int hour = next_bit(c.hours, h);
    if (hour < 0) return std::nullopt;
    int minute = next_bit(c.minutes, hour == h ? m : 0);
    if (minute < 0) {
      hour = next_bit(c.hours, hour + 1);
      if (hour < 0) return std::nullopt;
      minute = next_bit(c.minutes, 0);
    }
    LocalTime local = midnight + Seconds(hour * 3600 + minute * 60);
    return Instant((local - offset).time_since_epoch());
  }
  // The offset changes near this day: examine every scheduled time.
  std::optional<Instant> best;
  for (uint32_t hours = c.hours; hours; hours &= hours - 1) {
    int hour = std::countr_zero(hours);
    for (uint64_t minutes = c.minutes; minutes; minutes &= minutes - 1) {
      int minute = std::countr_zero(minutes);
      Instant t = zone.from_local(midnight + Seconds(hour * 3600 + minute * 60));
      if (t >= from && (!best || t < *best)) best = t;
    }
  }
  return best;
}

}  // namespace

std::optional<Instant> next_occurrence(const Cron& c, const Zone& zone, const Calendar& calendar, Instant from) {
  if (c.minutes == 0 || c.hours == 0 || c.months == 0) return std::nullopt;
  Instant limit = from + Seconds(kSearchHorizonSeconds);
  // Start a day early: a gap time of the previous local date can map past `from`.
  LocalDays day = date::floor<date::days>(zone.to_local(from)) - date::days(1);
  LocalDays last_day = date::floor<date::days>(zone.to_local(limit)) + date::days(1);
  std::optional<Instant> found;
  const bool both = c.days_star || c.weekdays_star;
  while (day <= last_day && !found) {
    date::year_month_day ymd{day};
    if (!(c.months & (1u << static_cast<unsigned>(ymd.month())))) {
      date::year_month_day next = date::year_month_day{ymd.year() / ymd.month() / 1} + date::months(1);
      day = LocalDays(date::sys_days(next).time_since_epoch());
      continue;
    }
    // Walk the rest of this month with day-of-month and weekday kept
    // incrementally (no calendar conversion per day).
    unsigned last_dom = static_cast<unsigned>(date::year_month_day_last{ymd.year() / ymd.month() / date::last}.day());
    int weekday = weekday_of(day);
    for (unsigned dom = static_cast<unsigned>(ymd.day()); dom <= last_dom && day <= last_day;
         ++dom, day += date::days(1), weekday = weekday == 6 ? 0 : weekday + 1) {
      bool dom_ok = (c.days >> dom) & 1u;
      bool dow_ok = (c.weekdays >> weekday) & 1u;
      if (!(both ? (dom_ok && dow_ok) : (dom_ok || dow_ok)) || calendar.skips(day)) continue;
      found = first_on_day(c, zone, day, from);
      if (found) break;
    }
  }
  if (!found) return std::nullopt;
  // A time in a daylight-saving gap is read with the earlier offset and can
  // land after the next day's first times: compare with the next day too.
  LocalDays next_day = day + date::days(1);
  bool steady = zone.constant_offset(*found - Seconds(2 * kSecondsPerDay), *found + Seconds(2 * kSecondsPerDay), nullptr);
  if (!steady && c.matches_day(next_day) && !calendar.skips(next_day)) {
    std::optional<Instant> t = first_on_day(c, zone, next_day, from);
    if (t && *t < *found) found = t;
  }
  if (*found > limit) return std::nullopt;
  return found;
}

std::optional<Instant> previous_occurrence(const Cron& schedule, const Zone& zone, const Calendar& calendar,
                                           Instant at) {
  static constexpr int64_t kLookbacks[] = {3600,
                                           2 * kSecondsPerDay,
                                           8 * kSecondsPerDay,
                                           32 * kSecondsPerDay,
                                           367 * kSecondsPerDay,
                                           1462 * kSecondsPerDay};
  for (int64_t lookback : kLookbacks) {
    std::optional<Instant> latest;
    Instant from = at - Seconds(lookback);
    while (true) {
      std::optional<Instant> o = next_occurrence(schedule, zone, calendar, from);
      if (!o || *o > at) break;
      latest = o;
      from = *o + Seconds(1);
    }
    if (latest) return latest;
  }
  return std::nullopt;
}

SilenceCheck fires_in_every_window(const Cron& schedule, const Zone& zone, const Calendar& calendar) {
  SilenceCheck out;
  Calendar pattern = calendar;
  pattern.skip_dates.clear();
  const Instant anchor = from_unix(978307200);  // 2001-01-01T00:00:00Z
  if (!next_occurrence(schedule, zone, pattern, anchor)) {
    out.fires = false;
    return out;
  }
  // Each skipped date lies in a gap between two surviving occurrences; the
  // gap must stay within the horizon. Dates inside a gap already measured
  // are skipped.
  std::optional<Instant> measured_until;
  for (LocalDays day : calendar.skip_dates) {
    Instant t = zone.from_local(LocalTime(day.time_since_epoch()));
    if (measured_until && t <= *measured_until) continue;
    std::optional<Instant> before = previous_occurrence(schedule, zone, calendar, t);
    std::optional<Instant> after = next_occurrence(schedule, zone, calendar, t);
    if (!before || !after || (*after - *before).count() > kSearchHorizonSeconds) {
      out.fires = false;
      out.after = before ? *before : t;
      return out;
    }
    measured_until = after;
  }
  return out;
}

}  // namespace readyby
