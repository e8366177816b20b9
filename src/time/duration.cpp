#include "time/duration.h"

#include <cctype>
#include <limits>

namespace readyby {
namespace {

DurationParse fail(std::string error, size_t offset) {
  DurationParse out;
  out.error = std::move(error);
  out.offset = offset;
  return out;
}

}  // namespace

DurationParse parse_duration(std::string_view text) {
  if (text.empty()) return fail("empty duration (expected e.g. PT30M or P1D)", 0);
  if (text[0] == '-' || text[0] == '+') {
    return fail(text[0] == '-' ? "negative durations are not allowed" : "a duration takes no sign", 0);
  }
  if (text[0] != 'P') {
    return fail("a duration must start with 'P' (ISO 8601), e.g. PT30M or P1D", 0);
  }
  // Years or months anywhere before 'T' make the length vary: say so first,
  // since that is the real problem with e.g. P3Y6M4DT12H30M5S.
  size_t t_pos = text.find('T');
  for (size_t i = 1; i < text.size() && i < t_pos; ++i) {
    if (text[i] == 'Y' || text[i] == 'M') {
      return fail("years (Y) and months (M) are not allowed in a duration: their length varies; "
                  "use days (D) or weeks (W)",
                  i);
    }
  }
  if (text.size() == 1) return fail("a duration needs at least one part after 'P', e.g. PT0S", 1);

  const std::string_view date_units = "WD";
  const std::string_view time_units = "HMS";
  bool in_time = false;
  bool any_part = false;
  bool weeks = false;
  bool other = false;
  int last_rank = -1;
  int64_t total = 0;
  size_t i = 1;
  while (i < text.size()) {
    if (text[i] == 'T') {
      if (in_time) return fail("'T' appears twice", i);
      in_time = true;
      last_rank = 9;  // below H (rank 10): the first time unit may be any, a repeat of it is caught
      ++i;
      if (i == text.size()) return fail("expected hours, minutes or seconds after 'T'", i);
      continue;
    }
    size_t start = i;
    int64_t n = 0;
    while (i < text.size() && std::isdigit(static_cast<unsigned char>(text[i]))) {
      if (n > (std::numeric_limits<int64_t>::max() / 10) - 10) return fail("duration is too large", start);
      n = n * 10 + (text[i] - '0');
      ++i;
    }
    if (i == start) {
      return fail(std::string("expected a number at '") + text[i] + "'", i);
    }
    if (i == text.size()) return fail("number without a unit (W, D, H, M or S)", i);
    char unit = text[i];
    if (unit == '.' || unit == ',') return fail("fractions are not allowed in a duration", i);
    std::string_view units = in_time ? time_units : date_units;
    size_t rank = units.find(unit);
    if (rank == std::string_view::npos) {
      if (!in_time && time_units.find(unit) != std::string_view::npos) {
        return fail(std::string("'") + unit + "' must come after 'T' (e.g. PT" + std::to_string(n) + unit + ")", i);
      }
      return fail(std::string("unknown unit '") + unit + "' (expected " +
                      (in_time ? "H, M or S after 'T'" : "W or D before 'T'") + ")",
                  i);
    }
    int full_rank = static_cast<int>(rank) + (in_time ? 10 : 0);
    if (full_rank <= last_rank) return fail(std::string("unit '") + unit + "' is out of order or repeated", i);
    last_rank = full_rank;
    static constexpr int64_t kDateMult[] = {604800, 86400};
    static constexpr int64_t kTimeMult[] = {3600, 60, 1};
    int64_t mult = in_time ? kTimeMult[rank] : kDateMult[rank];
    if (n > std::numeric_limits<int64_t>::max() / mult / 4) return fail("duration is too large", start);
    total += n * mult;
    if (total > kMaxDurationSeconds) return fail("duration is longer than 36,525 days (P36525D)", start);
    if (!in_time && unit == 'W') weeks = true; else other = true;
    any_part = true;
    ++i;
  }
  if (!any_part) return fail("a duration needs at least one part, e.g. PT0S", text.size());
  if (weeks && other) return fail("weeks (W) cannot be combined with other units; use days (D)", text.find('W'));
  DurationParse out;
  out.value = Duration{total};
  return out;
}

std::string format_duration(Duration d) {
  int64_t s = d.seconds;
  if (s == 0) return "PT0S";
  if (s % 604800 == 0) return "P" + std::to_string(s / 604800) + "W";
  std::string out = "P";
  if (s >= 86400) out += std::to_string(s / 86400) + "D";
  s %= 86400;
  if (s > 0) {
    out += "T";
    if (s >= 3600) out += std::to_string(s / 3600) + "H";
    if (s % 3600 >= 60) out += std::to_string((s % 3600) / 60) + "M";
    if (s % 60) out += std::to_string(s % 60) + "S";
  }
  return out;
}

std::string human_duration(int64_t seconds) {
  std::string sign = seconds < 0 ? "-" : "";
  int64_t s = seconds < 0 ? -seconds : seconds;
  int64_t d = s / 86400, h = (s % 86400) / 3600, m = (s % 3600) / 60, sec = s % 60;
  auto two = [](int64_t v) { return (v < 10 ? "0" : "") + std::to_string(v); };
  if (d > 0) return sign + std::to_string(d) + "d " + std::to_string(h) + "h" + (m ? " " + two(m) + "m" : "");
  if (h > 0) return sign + std::to_string(h) + "h " + two(m) + "m";
  if (m > 0 || sec == 0) return sign + std::to_string(m) + "m" + (sec ? " " + two(sec) + "s" : "");
  return sign + std::to_string(sec) + "s";
}

}  // namespace readyby
