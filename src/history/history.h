#pragma once
// The recorded landings that engines read (nightly, drift, forecast), apart
// from the SQLite store that keeps them: an engine that works on a history
// needs this header only, not the store's.

#include <optional>
#include <vector>

#include "history/landing_log.h"
#include "time/instant.h"

namespace readyby {

/// A recorded delivery of one node, as stored.
struct StoredLanding {
  Instant landed_at;
  Instant data_through;
  std::optional<Instant> scheduled_at;
  LandingStatus status = LandingStatus::ok;
};

/// Recorded deliveries by plan node index. nullopt: the node has no row ever
/// recorded (it is unmonitored); a present but empty list: the node has rows,
/// none of them within the range asked for.
using History = std::vector<std::optional<std::vector<StoredLanding>>>;

}  // namespace readyby
