#include "time/zone_names.h"

#include <algorithm>
#include <cctype>

#include "util/text.h"

namespace readyby {

namespace {

// Lower case, spaces and hyphens as underscores: "San Francisco" and
// "san-francisco" read as "san_francisco".
std::string normalised(std::string_view s) {
  std::string out;
  out.reserve(s.size());
  for (char c : s) {
    if (c == ' ' || c == '-') out += '_';
    else out += static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  }
  return out;
}

struct CityZone {
  const char* city;  // normalised
  const char* zone;
};

// Well-known cities that are not tz zone names, each with the zone of its
// region (common practice, from memory). Names shared by cities in
// different regions (Portland, Columbus) are left out.
constexpr CityZone kCityZones[] = {
    // US Pacific
    {"san_francisco", "America/Los_Angeles"}, {"seattle", "America/Los_Angeles"},
    {"san_diego", "America/Los_Angeles"}, {"san_jose", "America/Los_Angeles"},
    {"sacramento", "America/Los_Angeles"}, {"oakland", "America/Los_Angeles"},
    {"las_vegas", "America/Los_Angeles"},
    // US Mountain; Arizona keeps standard time all year
    {"salt_lake_city", "America/Denver"}, {"albuquerque", "America/Denver"}, {"el_paso", "America/Denver"},
    {"colorado_springs", "America/Denver"}, {"tucson", "America/Phoenix"}, {"scottsdale", "America/Phoenix"},
    // US Central
    {"houston", "America/Chicago"}, {"dallas", "America/Chicago"}, {"austin", "America/Chicago"},
    {"san_antonio", "America/Chicago"}, {"fort_worth", "America/Chicago"}, {"minneapolis", "America/Chicago"},
    {"saint_louis", "America/Chicago"}, {"st_louis", "America/Chicago"}, {"kansas_city", "America/Chicago"},
    {"milwaukee", "America/Chicago"}, {"new_orleans", "America/Chicago"}, {"nashville", "America/Chicago"},
    {"memphis", "America/Chicago"}, {"oklahoma_city", "America/Chicago"}, {"omaha", "America/Chicago"},
    // US Eastern
    {"boston", "America/New_York"}, {"philadelphia", "America/New_York"}, {"washington", "America/New_York"},
    {"washington_dc", "America/New_York"}, {"baltimore", "America/New_York"}, {"atlanta", "America/New_York"},
    {"miami", "America/New_York"}, {"orlando", "America/New_York"}, {"tampa", "America/New_York"},
    {"pittsburgh", "America/New_York"}, {"cleveland", "America/New_York"}, {"charlotte", "America/New_York"},
    {"raleigh", "America/New_York"}, {"cincinnati", "America/New_York"}, {"buffalo", "America/New_York"},
    // Alaska, Hawaii, Canada
    {"fairbanks", "America/Anchorage"}, {"honolulu", "Pacific/Honolulu"}, {"ottawa", "America/Toronto"},
    {"calgary", "America/Edmonton"},
    // Europe
    {"manchester", "Europe/London"}, {"birmingham", "Europe/London"}, {"edinburgh", "Europe/London"},
    {"glasgow", "Europe/London"}, {"cardiff", "Europe/London"}, {"munich", "Europe/Berlin"},
    {"frankfurt", "Europe/Berlin"}, {"hamburg", "Europe/Berlin"}, {"cologne", "Europe/Berlin"},
    {"barcelona", "Europe/Madrid"}, {"seville", "Europe/Madrid"}, {"milan", "Europe/Rome"},
    {"naples", "Europe/Rome"}, {"geneva", "Europe/Zurich"}, {"lyon", "Europe/Paris"},
    {"marseille", "Europe/Paris"}, {"rotterdam", "Europe/Amsterdam"}, {"porto", "Europe/Lisbon"},
    // Asia, Oceania
    {"mumbai", "Asia/Kolkata"}, {"delhi", "Asia/Kolkata"}, {"new_delhi", "Asia/Kolkata"},
    {"bengaluru", "Asia/Kolkata"}, {"bangalore", "Asia/Kolkata"}, {"beijing", "Asia/Shanghai"},
    {"shenzhen", "Asia/Shanghai"}, {"osaka", "Asia/Tokyo"}, {"kyoto", "Asia/Tokyo"},
    {"canberra", "Australia/Sydney"},
};

struct LegacyZone {
  const char* name;
  const char* advice;
};

// The names the tz database keeps only for compatibility with UNIX System V:
// release 2024b moved them to its 'backward' file as links — EST to
// America/Panama, MST to America/Phoenix, HST to Pacific/Honolulu, EST5EDT to
// America/New_York, CST6CDT to America/Chicago, MST7MDT to America/Denver,
// PST8PDT to America/Los_Angeles (tz NEWS for 2024b, as summarised in
// OpenJDK's CSR JDK-8340138 for EST, MST and HST); CET and MET to
// Europe/Brussels, EET to Europe/Athens and WET to Europe/Lisbon (from
// memory). Older tz data, such as Debian 12's, still defines them as zones:
// EST, MST and HST fixed offsets, the others US or EU rules with no history.
constexpr LegacyZone kLegacyZones[] = {
    {"EST", "UTC-05:00 all year, with no daylight saving; for US Eastern time use America/New_York, "
            "for UTC-05:00 all year America/Panama"},
    {"MST", "UTC-07:00 all year, with no daylight saving; for US Mountain time use America/Denver, "
            "for Arizona (no daylight saving) America/Phoenix"},
    {"HST", "UTC-10:00 all year; for Hawaii use Pacific/Honolulu"},
    {"EST5EDT", "the US daylight-saving rules at UTC-05:00 without any region's history; use America/New_York"},
    {"CST6CDT", "the US daylight-saving rules at UTC-06:00 without any region's history; use America/Chicago"},
    {"MST7MDT", "the US daylight-saving rules at UTC-07:00 without any region's history; use America/Denver"},
    {"PST8PDT", "the US daylight-saving rules at UTC-08:00 without any region's history; use America/Los_Angeles"},
    {"CET", "Central European rules without any country's history; use the zone of the place, "
            "e.g. Europe/Berlin, Europe/Paris or Europe/Brussels"},
    {"MET", "Central European rules without any country's history; use the zone of the place, "
            "e.g. Europe/Berlin, Europe/Paris or Europe/Brussels"},
    {"EET", "Eastern European rules without any country's history; use the zone of the place, "
            "e.g. Europe/Athens, Europe/Helsinki or Europe/Bucharest"},
    {"WET", "Western European rules without any country's history; use the zone of the place, "
            "e.g. Europe/Lisbon"},
};

constexpr size_t kLongestName = 64;  // tz names are at most about 30 characters

}  // namespace

ZoneSuggestion suggest_zone(std::string_view name, const std::vector<std::string>& known) {
  if (name.empty() || name.size() > kLongestName) return {};
  const std::string wanted = normalised(name);
  for (const std::string& k : known) {
    if (normalised(k) == wanted) return {k, ""};
  }
  const size_t slash = name.rfind('/');
  const std::string_view city = slash == std::string_view::npos ? name : name.substr(slash + 1);
  const std::string city_key = normalised(city);
  for (const CityZone& c : kCityZones) {
    if (city_key == c.city && std::find(known.begin(), known.end(), c.zone) != known.end()) {
      return {c.zone, std::string(city)};
    }
  }
  const size_t limit = std::max<size_t>(1, name.size() / 6);
  size_t best = limit + 1;
  std::string found;
  for (const std::string& k : known) {
    const size_t gap = k.size() > name.size() ? k.size() - name.size() : name.size() - k.size();
    if (gap > limit) continue;  // the distance is at least the difference in length
    if (!legacy_zone_advice(k).empty()) continue;  // never suggest a legacy name for a typo
    const size_t d = edit_distance(name, k);
    if (d < best) best = d, found = k;
  }
  return {found, ""};
}

std::string zone_did_you_mean(std::string_view name, const std::vector<std::string>& known) {
  ZoneSuggestion s = suggest_zone(name, known);
  if (s.zone.empty()) return "";
  if (s.city.empty()) return " (did you mean '" + s.zone + "'?)";
  return " (did you mean '" + s.zone + "', the zone of " + s.city + "?)";
}

std::string legacy_zone_advice(std::string_view name) {
  for (const LegacyZone& z : kLegacyZones) {
    if (name == z.name) {
      return "'" + std::string(name) + "' is a legacy time zone name kept only for compatibility: " + z.advice;
    }
  }
  return "";
}

}  // namespace readyby
