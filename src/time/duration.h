#pragma once
// ISO 8601 durations (ISO 8601-1:2019 §5.5.2; RFC 5545 §3.3.6 grammar).
//
// Accepted forms: `PnW` and `PnDTnHnMnS` with any subset of the D/H/M/S parts
// (at least one), non-negative integers only. A duration is an exact number
// of seconds: a day is 86,400 s and a week 604,800 s even across a
// daylight-saving change (readyby's durations measure elapsed time — a lag or
// a processing time — not calendar arithmetic). Years and months are rejected
// because their length varies; fractions and signs are rejected.

#include <cstdint>
#include <optional>
#include <string>
#include <string_view>
#include "util/parsed.h"

namespace readyby {

struct Duration {
  int64_t seconds = 0;
  friend bool operator==(Duration, Duration) = default;
  friend auto operator<=>(Duration, Duration) = default;
};

/// The longest duration parse_duration accepts: 36,525 days (a century), so
/// that sums of durations and instants can never overflow.
inline constexpr int64_t kMaxDurationSeconds = 36525LL * 86400;
/// The longest duration a plan may add to or subtract from an instant
/// (lands_after, data_lag, run_time, max_age, and the edits of what-if):
/// 1,462 days, the horizon of the freshness engine (DESIGN §4). `history` and
/// `lookback` are only compared with each other and may be longer.
inline constexpr int64_t kMaxTimingDurationSeconds = 1462LL * 86400;

/// Result of parsing a duration: either a value, or an error message and the
/// 0-based offset in the text of the offending character.
using DurationParse = Parsed<Duration>;

/// Parses `text` as described above. On failure `value` is empty and `error`
/// says what is wrong ("years and months are not allowed ...", "negative
/// durations are not allowed", "expected a number after 'T'", "longer than
/// 36,525 days" ...).
DurationParse parse_duration(std::string_view text);

/// Shortest ISO 8601 form: `PnW` when a whole number of weeks (and > 0), else
/// `PnDTnHnMnS` omitting zero parts; zero is `PT0S`.
std::string format_duration(Duration d);

/// A person-friendly rendering for reports: "2h 05m", "3d 4h", "45s", "0m";
/// negative values get a leading "-".
std::string human_duration(int64_t seconds);

}  // namespace readyby
