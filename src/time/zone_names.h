#pragma once
// Help with time-zone names: what to suggest for a name the tz database does
// not know, and what to say about a legacy name it still accepts.
//
// The tz database names each zone after one city of a region that has kept
// the same clock since 1970 (America/Los_Angeles for the US Pacific coast), so
// a user who writes the city they are in ("America/San_Francisco") needs the
// zone of its region, not the zone whose spelling is nearest
// ("America/Rio_Branco"). Suggestions therefore come, in order, from:
//   1. the same name in another case or with spaces for underscores;
//   2. a small table of well-known cities that are not zone names, each with
//      the zone of its region (common practice, from memory);
//   3. the nearest known name by edit distance, only when the distance is
//      small relative to the name's length (at most max(1, |name| / 6)),
//      and never a legacy name (see legacy_zone_advice).
// Otherwise nothing is suggested.

#include <string>
#include <string_view>
#include <vector>

namespace readyby {

/// A suggested zone and, when it comes from the city table, the city.
struct ZoneSuggestion {
  std::string zone;  // empty: nothing to suggest
  std::string city;  // "San_Francisco" when the city table gave the zone; else empty
};

/// The zone to suggest for the unknown name `name`, chosen among `known` (the
/// tz database's names). Names longer than 64 characters get no suggestion.
ZoneSuggestion suggest_zone(std::string_view name, const std::vector<std::string>& known);

/// " (did you mean 'ZONE'?)", " (did you mean 'ZONE', the zone of CITY?)" or "".
std::string zone_did_you_mean(std::string_view name, const std::vector<std::string>& known);

/// For a legacy name the tz database keeps only for compatibility with old
/// systems (EST, MST, HST, EST5EDT, CST6CDT, MST7MDT, PST8PDT, CET, MET, EET,
/// WET): what it means and the region zone to use instead, as one sentence.
/// Empty for every other name.
std::string legacy_zone_advice(std::string_view name);

}  // namespace readyby
