#pragma once
// Instants and local times.
//
// An Instant is an absolute point in time, whole seconds since 1970-01-01 UTC
// (std::chrono::sys_seconds). A LocalTime is a wall-clock reading with no zone
// attached (seconds since 1970-01-01 00:00 in local terms). Durations are
// exact elapsed seconds. Everything in readyby is whole seconds: cron fires on
// whole minutes and durations are integer seconds, so no rounding ever occurs.

#include <chrono>
#include <cstdint>

#include <date/date.h>

namespace readyby {

using Seconds = std::chrono::seconds;
using Instant = date::sys_seconds;      // == std::chrono::sys_seconds
using LocalTime = date::local_seconds;
using LocalDays = date::local_days;

inline constexpr int64_t kSecondsPerDay = 86400;

inline int64_t to_unix(Instant t) { return t.time_since_epoch().count(); }
inline Instant from_unix(int64_t s) { return Instant(Seconds(s)); }

}  // namespace readyby
