#include "time/zone.h"

#include <date/date.h>
#include <date/tz.h>

#include <algorithm>
#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <iterator>
#include <map>
#include <mutex>

#include "time/posix_tz.h"

namespace readyby {
namespace {

// The span copied from the tz database (see zone.h kZoneTableFirstYear).
constexpr int64_t kTableStart = -2208988800;  // 1900-01-01T00:00:00Z
constexpr int64_t kTableEnd = 7258118400;     // 2200-01-01T00:00:00Z

// The TZ rule at the end of the zone's compiled file, if it has one.
std::optional<PosixTzRule> footer_rule(const std::string& name) {
  const char* dir = std::getenv("TZDIR");
  std::string path = std::string(dir && *dir ? dir : "/usr/share/zoneinfo") + "/" + name;
  std::ifstream in(path, std::ios::binary);
  if (!in) return std::nullopt;
  std::string data((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
  std::optional<std::string> footer = tzif_footer(data);
  if (!footer) return std::nullopt;
  return parse_posix_tz(*footer);
}

std::mutex& cache_mutex() {
  static std::mutex m;
  return m;
}

}  // namespace

Zone::Zone(std::string name) : name_(std::move(name)) {
  const date::time_zone* tz = date::locate_zone(name_);
  date::sys_seconds t{Seconds(kTableStart)};
  begin_.push_back(std::numeric_limits<int64_t>::min() / 4);
  offset_.push_back(tz->get_info(t).offset.count());
  while (t.time_since_epoch().count() < kTableEnd) {
    date::sys_info info = tz->get_info(t);
    int64_t b = std::max<int64_t>(info.begin.time_since_epoch().count(), kTableStart);
    if (info.offset.count() != offset_.back() && b > begin_.back()) {
      begin_.push_back(b);
      offset_.push_back(info.offset.count());
    }
    if (info.end <= t || info.end.time_since_epoch().count() >= kTableEnd) break;
    t = info.end;
  }
  // After the last transition written out in the file, the tz database
  // follows the file's POSIX TZ rule (RFC 8536 §3.3); date/tz does not, so
  // the table is extended here with that rule's transitions up to kTableEnd.
  if (t.time_since_epoch().count() < kTableEnd) {
    if (std::optional<PosixTzRule> rule = footer_rule(name_); rule && rule->has_dst) {
      int64_t last = std::max(begin_.back(), t.time_since_epoch().count());
      int first_year = static_cast<int>(date::year_month_day(date::floor<date::days>(date::sys_seconds(Seconds(last)))).year());
      for (int year = first_year; year < 2200; ++year) {
        for (const auto& [at, offset] : rule->transitions(year)) {
          if (at <= last || at >= kTableEnd || offset == offset_.back()) continue;
          begin_.push_back(at);
          offset_.push_back(offset);
        }
      }
    }
  }
  for (size_t i = 0; i < begin_.size(); ++i) local_begin_.push_back(begin_[i] + offset_[i]);
  local_begin_[0] = begin_[0];
}

const Zone* Zone::find(std::string_view name) {
  static std::map<std::string, std::unique_ptr<Zone>, std::less<>> cache;
  std::lock_guard<std::mutex> lock(cache_mutex());
  auto it = cache.find(name);
  if (it != cache.end()) return it->second.get();
  std::unique_ptr<Zone> zone;
  try {
    zone.reset(new Zone(std::string(name)));
  } catch (const std::exception&) {
    cache.emplace(std::string(name), nullptr);
    return nullptr;
  }
  const Zone* out = zone.get();
  cache.emplace(std::string(name), std::move(zone));
  return out;
}

std::vector<std::string> Zone::names() {
  std::vector<std::string> out;
  try {
    const date::tzdb& db = date::get_tzdb();
    for (const auto& z : db.zones) out.emplace_back(z.name());
  } catch (const std::exception&) {
  }
  return out;
}

size_t Zone::index_at(Instant t) const {
  int64_t s = to_unix(t);
  auto it = std::upper_bound(begin_.begin(), begin_.end(), s);
  return static_cast<size_t>(it - begin_.begin()) - 1;
}

Seconds Zone::offset_at(Instant t) const { return Seconds(offset_[index_at(t)]); }

Instant Zone::from_local(LocalTime local) const {
  // The last interval whose local start is at or before `local`. If `local`
  // also lies before the previous interval's local end (a fall-back overlap),
  // the earlier interval gives the first occurrence. If `local` lies past the
  // previous interval's end but before this one's local start, it is in a gap
  // and upper_bound already picked the interval before the gap.
  int64_t l = local.time_since_epoch().count();
  auto it = std::upper_bound(local_begin_.begin(), local_begin_.end(), l);
  size_t i = static_cast<size_t>(it - local_begin_.begin());
  i = i == 0 ? 0 : i - 1;
  if (i > 0 && l < begin_[i] + offset_[i - 1]) --i;
  return from_unix(l - offset_[i]);
}

bool Zone::constant_offset(Instant a, Instant b, Seconds* offset) const {
  size_t i = index_at(a);
  bool constant = i + 1 >= begin_.size() || begin_[i + 1] > to_unix(b);
  if (constant && offset) *offset = Seconds(offset_[i]);
  return constant;
}

std::vector<Instant> Zone::transitions_in(Instant a, Instant b) const {
  std::vector<Instant> out;
  auto it = std::upper_bound(begin_.begin(), begin_.end(), to_unix(a));
  for (; it != begin_.end() && *it <= to_unix(b); ++it) out.push_back(from_unix(*it));
  return out;
}

std::string format_rfc3339(Instant t, const Zone* zone) {
  int64_t off = zone ? zone->offset_at(t).count() : 0;
  date::sys_seconds shifted = t + Seconds(off);
  auto day = date::floor<date::days>(shifted);
  date::year_month_day ymd{day};
  date::hh_mm_ss<Seconds> tod{shifted - day};
  char buf[64];
  std::snprintf(buf, sizeof buf, "%04d-%02u-%02uT%02d:%02d:%02d", static_cast<int>(ymd.year()),
                static_cast<unsigned>(ymd.month()), static_cast<unsigned>(ymd.day()),
                static_cast<int>(tod.hours().count()), static_cast<int>(tod.minutes().count()),
                static_cast<int>(tod.seconds().count()));
  std::string out = buf;
  if (!zone) return out + "Z";
  int64_t a = off < 0 ? -off : off;
  std::snprintf(buf, sizeof buf, "%c%02ld:%02ld", off < 0 ? '-' : '+', static_cast<long>(a / 3600),
                static_cast<long>((a % 3600) / 60));
  return out + buf;
}

std::string unsupported_date(LocalDays day) {
  int year = static_cast<int>(date::year_month_day(day).year());
  if (year >= kFirstSupportedYear && year <= kLastSupportedYear) return "";
  return format_date(day) + " is outside the supported dates " + std::to_string(kFirstSupportedYear) + "-01-01 to " +
         std::to_string(kLastSupportedYear) + "-12-31 (the span of the time-zone tables)";
}

std::string format_local(LocalTime t) {
  auto day = date::floor<date::days>(t);
  date::year_month_day ymd{day};
  date::hh_mm_ss<Seconds> tod{t - day};
  char buf[64];
  std::snprintf(buf, sizeof buf, "%04d-%02u-%02u %02d:%02d", static_cast<int>(ymd.year()),
                static_cast<unsigned>(ymd.month()), static_cast<unsigned>(ymd.day()),
                static_cast<int>(tod.hours().count()), static_cast<int>(tod.minutes().count()));
  return buf;
}

std::string format_date(LocalDays d) {
  date::year_month_day ymd{d};
  char buf[16];
  std::snprintf(buf, sizeof buf, "%04d-%02u-%02u", static_cast<int>(ymd.year()),
                static_cast<unsigned>(ymd.month()), static_cast<unsigned>(ymd.day()));
  return buf;
}

namespace {

bool digits(std::string_view s, size_t pos, size_t n, int* out) {
  if (pos + n > s.size()) return false;
  int v = 0;
  for (size_t i = pos; i < pos + n; ++i) {
    if (s[i] < '0' || s[i] > '9') return false;
    v = v * 10 + (s[i] - '0');
  }
  *out = v;
  return true;
}

std::optional<date::year_month_day> ymd_at(std::string_view s) {
  int y, m, d;
  if (s.size() < 10 || !digits(s, 0, 4, &y) || s[4] != '-' || !digits(s, 5, 2, &m) || s[7] != '-' ||
      !digits(s, 8, 2, &d)) {
    return std::nullopt;
  }
  date::year_month_day ymd{date::year(y), date::month(static_cast<unsigned>(m)),
                           date::day(static_cast<unsigned>(d))};
  if (!ymd.ok()) return std::nullopt;
  return ymd;
}

// Parses "HH:MM[:SS]" at pos; returns characters consumed (0 on error).
size_t time_at(std::string_view s, size_t pos, bool need_seconds, int64_t* secs) {
  int h, m, sec = 0;
  if (!digits(s, pos, 2, &h) || pos + 2 >= s.size() || s[pos + 2] != ':' || !digits(s, pos + 3, 2, &m)) return 0;
  size_t used = 5;
  if (pos + 5 < s.size() && s[pos + 5] == ':') {
    if (!digits(s, pos + 6, 2, &sec)) return 0;
    used = 8;
  } else if (need_seconds) {
    return 0;
  }
  if (h > 23 || m > 59 || sec > 59) return 0;
  *secs = h * 3600 + m * 60 + sec;
  return used;
}

}  // namespace

std::optional<LocalDays> parse_date(std::string_view text) {
  if (text.size() != 10) return std::nullopt;
  auto ymd = ymd_at(text);
  if (!ymd) return std::nullopt;
  return LocalDays(date::sys_days(*ymd).time_since_epoch());
}

std::optional<LocalTime> parse_local_datetime(std::string_view text) {
  auto ymd = ymd_at(text);
  if (!ymd || text.size() < 16 || (text[10] != 'T' && text[10] != ' ')) return std::nullopt;
  int64_t secs = 0;
  size_t used = time_at(text, 11, false, &secs);
  if (used == 0 || 11 + used != text.size()) return std::nullopt;
  return LocalTime(date::sys_days(*ymd).time_since_epoch()) + Seconds(secs);
}

std::optional<Instant> parse_rfc3339(std::string_view text) {
  auto ymd = ymd_at(text);
  if (!ymd || text.size() < 20 || (text[10] != 'T' && text[10] != 't' && text[10] != ' ')) return std::nullopt;
  // Years 0001-9999 only, so that every instant read can be written back.
  if (static_cast<int>(ymd->year()) < 1) return std::nullopt;
  // A leap second (RFC 3339 §5.6 allows time-second 60) is read as the
  // second before it: instants here are POSIX time, which has no leap seconds.
  std::string copy;
  if (text.size() >= 19 && text[16] == ':' && text.substr(17, 2) == "60") {
    copy = std::string(text);
    copy[18] = '9';
    copy[17] = '5';
    text = copy;
  }
  int64_t secs = 0;
  size_t used = time_at(text, 11, true, &secs);
  if (used == 0) return std::nullopt;
  size_t pos = 11 + used;
  if (pos < text.size() && text[pos] == '.') {
    ++pos;
    size_t start = pos;
    while (pos < text.size() && text[pos] >= '0' && text[pos] <= '9') ++pos;
    if (pos == start) return std::nullopt;
  }
  if (pos >= text.size()) return std::nullopt;
  int64_t offset = 0;
  if (text[pos] == 'Z' || text[pos] == 'z') {
    ++pos;
  } else if (text[pos] == '+' || text[pos] == '-') {
    int oh, om;
    if (!digits(text, pos + 1, 2, &oh) || pos + 3 >= text.size() || text[pos + 3] != ':' ||
        !digits(text, pos + 4, 2, &om) || oh > 23 || om > 59) {
      return std::nullopt;
    }
    offset = (oh * 3600 + om * 60) * (text[pos] == '-' ? -1 : 1);
    pos += 6;
  } else {
    return std::nullopt;
  }
  if (pos != text.size()) return std::nullopt;
  return Instant(date::sys_days(*ymd).time_since_epoch()) + Seconds(secs - offset);
}

}  // namespace readyby
