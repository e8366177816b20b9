#pragma once
// Run evaluation (DESIGN §4 "A run", "Findings"): every run of every model in
// a window of local dates, each feature's needs_data_through, ready_at, slack
// and status, and the plan-wide findings. Pure computation over a loaded plan.

#include <memory>
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "engine/freshness.h"
#include "plan/lineage.h"
#include "plan/plan.h"

namespace readyby {

enum class FeatureStatus { ok, late, never };
enum class RunStatus { ok, degraded, fail };
const char* to_string(FeatureStatus s);
const char* to_string(RunStatus s);

struct FeatureResult {
  int feature = -1;                  // node index
  bool optional = false;
  Instant needs_data_through;        // run - max_age
  std::optional<Instant> ready_at;   // nullopt: never
  int64_t slack_seconds = 0;         // run - ready_at; 0 when never
  FeatureStatus status = FeatureStatus::ok;
};

struct RunResult {
  int model = -1;
  Instant at;
  RunStatus status = RunStatus::ok;
  std::vector<FeatureResult> features;  // in the model's `features` order
};

struct Finding {
  std::string kind;     // "lookback" | "unused"
  int feature = -1;     // node index, lookback only
  int source = -1;      // node index, lookback only
  int node = -1;        // node index, unused only
  std::string message;
};

/// The result of evaluating a plan over a window. Holds the freshness engine
/// so that chains can be produced on demand (storing every chain of a large
/// check would cost far more memory than computing the few that are read).
class Evaluation {
 public:
  LocalDays from;
  int days = 0;
  std::vector<RunResult> runs;       // by instant, then model id
  std::vector<Finding> findings;     // lookback findings, then unused, in plan order

  /// False iff some run fails.
  bool ok() const { return !failed_; }

  /// Runs evaluated but not stored (see evaluate_lazily): how many, and the
  /// i-th, computed on demand, in the same order as `runs` would hold them.
  size_t pending_count() const { return pending_.size(); }
  RunResult pending_run(size_t i) const;
  /// A run of `model` at `at` evaluated with this evaluation's engine (`at`
  /// need not be a scheduled run, but its features' needs_data_through must
  /// lie in the evaluated range, which reaches kLaterStartSearch past the window).
  RunResult run_at(int model, Instant at) const;
  /// The chain behind a feature result: node indices from a source to the feature.
  std::vector<int> chain(const FeatureResult& f) const { return engine_->chain(f.feature, f.needs_data_through); }
  /// E_n(w) for any node upstream of a model feature, w within the evaluated range.
  std::optional<Instant> ready(int node, Instant w) const { return engine_->ready(node, w); }
  const FreshnessEngine& engine() const { return *engine_; }

  std::unique_ptr<FreshnessEngine> engine_;
  std::unique_ptr<Lineage> lineage_;
  struct PendingRun {
    int model;
    Instant at;
  };
  std::vector<PendingRun> pending_;   // lazily evaluated runs (empty when `runs` is filled)
  const Plan* plan_ = nullptr;
  bool failed_ = false;
};

/// How far past the window the engine answers queries, so that reports can
/// ask "how much later would the run have to start" (DESIGN §5 text report).
inline constexpr int64_t kLaterStartSearch = 2 * kSecondsPerDay;

/// Every run of every model whose local date (model zone) is in
/// [from, from + days), evaluated as DESIGN §4 says; runs of one model that
/// fall on the same instant are one run. With `observed`, monitored nodes use
/// their recorded deliveries (DESIGN §7); "never" then means "not landed".
Evaluation evaluate(const Plan& plan, LocalDays from, int days, const ObservedDeliveries* observed = nullptr);

/// Like evaluate, but keeps only the run instants: `runs` stays empty and
/// each run is computed when asked for (pending_run), so memory does not
/// grow with the number of runs. ok() is known at once (the runs are
/// evaluated up to the first that fails).
Evaluation evaluate_lazily(const Plan& plan, LocalDays from, int days);

/// The runs of one model at one instant, evaluated alone (for --run). The
/// instant need not be a scheduled run.
Evaluation evaluate_single(const Plan& plan, int model, Instant at);

/// Runs of `model` with local date in [from, from + days): their instants, sorted.
std::vector<Instant> run_instants(const Plan& plan, const Model& model, LocalDays from, int days);

/// One run of model `model` at `at`, every feature, with E taken from
/// `engine`, which must answer every w = at - max_age of the model's features.
RunResult evaluate_run(const Plan& plan, const FreshnessEngine& engine, int model, Instant at);

/// The range of w, [first, second] in unix seconds, that evaluate() builds
/// profiles for when it evaluates runs at `runs` (model index, instant):
/// every w = run - max_age, with kLaterStartSearch added at the top. {0, 0 +
/// kLaterStartSearch} when there are no runs.
std::pair<int64_t, int64_t> query_range(const Plan& plan, const std::vector<std::pair<int, Instant>>& runs);

/// Plan-wide findings (lookback, unused).
std::vector<Finding> plan_findings(const Plan& plan, const Lineage& lineage);

}  // namespace readyby
