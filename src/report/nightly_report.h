#pragma once
// Report writers for `readyby nightly`: text for people, JSON for programs,
// JUnit XML for CI dashboards and schedulers, and an OpenMetrics text
// exposition for a monitoring system's text-file collector. Writers only
// render a NightlyReport; every decision is made in history/nightly.h.
//
// In every format a feature that never became ready has status `not-landed`.

#include <ostream>

#include "history/nightly.h"
#include "plan/plan.h"

namespace readyby {

/// "ok" | "late" | "not-landed".
const char* nightly_status(FeatureStatus s);

/// "no landing of NODE recorded for 3 days (last YYYY-MM-DD HH:MM ±HH:MM) though
/// one was due: has the feed stopped, or is its log no longer recorded?", with
/// times in `zone`.
std::string silent_warning(const Plan& plan, const SilentNode& silent, const Zone* zone);

/// The text report: the day's runs with each failing feature's chain of
/// landings, the cause and verified fixes of each run that is not ok,
/// unmonitored sources, drift, on-time rates and the weakest link.
void write_nightly_text(std::ostream& out, const Plan& plan, const NightlyReport& report);

/// One JSON object: `plan`, `timezone`, `date`, `window`, `window_from`, `ok`,
/// `runs` (as `check`, plus per feature `landings`: the chain with each
/// step's landing time, and per run `advice`: null when ok, else the run as a
/// pattern of `check --format json`, with its cause and verified fixes),
/// `unmonitored`, `drift`, `on_time`, `weakest_link`.
void write_nightly_json(std::ostream& out, const Plan& plan, const NightlyReport& report);

/// JUnit XML: one <testsuite> for the day, one <testcase> per run; a failing
/// run carries a <failure> whose text is the chain of each failing feature.
/// Names do not change from night to night: the suite is "readyby nightly
/// PLAN", a test case "MODEL at HH:MM" (local run time) in class PLAN.MODEL;
/// the date is a property of the suite. Silent nodes are in <system-err>.
void write_nightly_junit(std::ostream& out, const Plan& plan, const NightlyReport& report);

/// OpenMetrics text format: when it was evaluated and which date, slack and
/// landed flag per feature and ok / degraded flags per run of the day, on-time
/// rate per model run time, last landing and silent flag per monitored node,
/// landing offsets and trend per monitored source; ends with `# EOF`. Labels
/// carry no dates: a run is labelled with its local time (`run="06:30"`), so
/// each series continues from night to night.
void write_nightly_metrics(std::ostream& out, const Plan& plan, const NightlyReport& report);

}  // namespace readyby
