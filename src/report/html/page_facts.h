#pragma once
// What the report page shows, gathered from the engines before anything is
// drawn: per model the days of the window with their runs, clock changes and
// calendar skips, the model's upstream cone with each node's worst status and
// margin, the advice facts (advice_adapter.h), and — when given — the landing
// history and the intake screening. The drawing modules only lay these out.
//
// Definitions (docs/report.md repeats them for readers):
// - A day's *clock change*: an offset change, within the day's local hours in
//   the model's zone, of the model's zone or of any zone in its upstream cone.
// - A day *skipped* for runs: some run spec of the model has a calendar that
//   skips the day. A *feed off* day: a source in the cone has a calendar that
//   skips the day (its local date in the source's zone at the day's noon).
// - A node's status: the worst, over every run of the window, of the runs
//   whose not-fresh feature's chain passes through the node — fail for a
//   required feature, degraded for an optional one; ok when no such run.
// - A cone is drawn when it holds at most kMaxDrawnCone nodes; a larger one is
//   summarised (counts by kind and status, and the nodes most at risk:
//   failing, then degraded, then on the most late chains, then the smallest
//   margins).

#include <optional>
#include <string>
#include <vector>

#include "engine/check.h"
#include "history/nightly.h"
#include "intake/intake.h"
#include "plan/plan.h"
#include "report/html/advice_adapter.h"

namespace readyby::html {

/// Largest upstream cone (nodes, the model's features included) drawn as a graph.
inline constexpr size_t kMaxDrawnCone = 60;
/// Nodes listed in the table of a summarised cone.
inline constexpr size_t kSummaryRows = 15;

struct DayFacts {
  LocalDays day;
  std::vector<size_t> runs;                // indices into Evaluation::runs, by instant
  std::vector<std::string> clock_changes;  // "clocks forward 1h 00m in America/Chicago"
  std::vector<std::string> runs_skipped;   // calendars of run specs that skip the day
  std::vector<int> feeds_off;              // sources of the cone whose calendar skips the day
};

struct ConeNode {
  int node = -1;
  RunStatus status = RunStatus::ok;
  size_t late_chains = 0; // chains of not-fresh features (one per run and feature) through the node
  NodeMargin margin;
};

struct ConeFacts {
  std::vector<ConeNode> nodes;             // the cone in topological order (sources first)
  std::vector<std::pair<int, int>> edges;  // (input, consumer) as positions in `nodes`
  bool summarised = false;                 // more than kMaxDrawnCone nodes
  size_t sources = 0, jobs = 0, features = 0;
  size_t status_count[3] = {0, 0, 0};      // nodes by status: ok, degraded, fail
};

struct ModelFacts {
  int model = -1;
  size_t ok = 0, degraded = 0, failed = 0;
  std::optional<int64_t> tightest_slack_seconds;  // over required features ready at all
  std::optional<size_t> tightest_run;             // index into Evaluation::runs
  std::vector<DayFacts> days;                     // every local date of the window
  std::vector<size_t> patterns;                   // indices into AdviceFacts::patterns
  std::optional<ExplainedRun> explained;          // the tightest run's tightest feature, when no pattern explains one
  ConeFacts cone;
};

struct OffsetPoint {
  Instant landed_at;
  int64_t offset_seconds = 0;
};

struct SourceChart {
  int source = -1;
  SourceDrift drift;
  std::vector<OffsetPoint> points;          // ok deliveries in the window, by landed_at
  int failed = 0;                           // failed deliveries in the window
  Instant from, to;                         // the window as instants
  std::optional<double> trend_at_from_seconds;  // the Theil–Sen line's offset at `from`
};

struct HistoryFacts {
  LocalDays date;
  LocalDays window_from;
  int window = 0;
  bool day_ok = true;                       // no run of `date` fails
  size_t day_runs = 0, day_failed = 0;
  std::vector<SourceChart> sources;         // monitored sources, plan order
  std::vector<OnTimeRate> on_time;
  std::vector<int> unmonitored;
  std::optional<WeakestLink> weakest_link;
};

struct PageFacts {
  const Plan* plan = nullptr;
  const Evaluation* evaluation = nullptr;
  AdviceFacts advice;
  std::vector<ModelFacts> models;           // plan order
  std::optional<HistoryFacts> history;
  const IntakeReport* intake = nullptr;     // nullptr: no proposal
};

/// Gathers everything the page shows. `ev` must be a filled evaluation
/// (evaluate, not evaluate_lazily) of `plan`; both must outlive the result.
PageFacts gather_page_facts(const Plan& plan, const Evaluation& ev);

/// The history part, from a nightly evaluation and the rows it was made from.
HistoryFacts gather_history_facts(const Plan& plan, const NightlyReport& nightly, const History& history);

}  // namespace readyby::html
