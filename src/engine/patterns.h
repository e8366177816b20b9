#pragma once
// Patterns: the runs that are not ok, grouped the way a person fixes them,
// and a summary per model. Computed as runs stream past (PatternCollector),
// so a report over a long window holds a few bytes per run that is not ok,
// never every run's results.
//
// Grouping, per model and separately for failing and for degraded runs
// (a run's *signature* is the set of features that are not ok: required
// features for a failing run, optional ones for a degraded run):
// 1. every_run: every run of the model in the window has that status (>= 2 runs).
// 2. span: for one signature, restrict the model's runs to the weekdays on
//    which that signature occurs; a block of two or more consecutive runs of
//    that restricted sequence, all with the signature, is a span when a
//    daylight-saving change of a zone that times the model's data (its own
//    zone, and that of every cron source or cron trigger upstream of its
//    features) falls between the run before the block and its first run
//    (`starts_after`), or between its last run and the run after it
//    (`ends_with`). A span bounded by changes of two zones (America's in
//    March, Europe's weeks later) is one pattern naming both. Spans of
//    different signatures with the same bounds are one pattern.
// 3. weekday: of the remaining runs, a weekday on which every run of the
//    model (outside spans) has the signature, at least two.
// 4. span without a daylight-saving bound: three or more consecutive runs of
//    the model with the signature.
// 5. daylight_saving: a remaining run within 36 hours after a change of a
//    zone on the chain of its worst feature; one pattern per local date.
// 6. dates: what remains, one pattern per signature.
// Patterns are ordered by model (plan order), failing before degraded, then
// by first run.
//
// Each pattern carries its facts: runs, dates, bounds, the daylight-saving
// changes involved, the features not ok with their worst lateness, the worst
// run, and the blame of its worst feature (engine/blame.h). Fixes are added by
// engine/fixes.h. Pure computation; the writers make the sentences.

#include <cstdint>
#include <array>
#include <map>
#include <optional>
#include <vector>

#include "engine/blame.h"
#include "engine/check.h"
#include "plan/plan.h"

namespace readyby {

/// A change of a zone's UTC offset (daylight saving; tz database).
struct ZoneChange {
  const Zone* zone = nullptr;
  Instant at;                   ///< first instant with the new offset
  int64_t offset_before = 0;    ///< seconds east of UTC
  int64_t offset_after = 0;
  bool forward() const { return offset_after > offset_before; }
  friend bool operator==(const ZoneChange& a, const ZoneChange& b) { return a.zone == b.zone && a.at == b.at; }
};

/// The changes of `zone` in (a, b].
std::vector<ZoneChange> zone_changes(const Zone& zone, Instant a, Instant b);

enum class PatternKind { every_run, weekday, span, daylight_saving, dates };
/// "every-run" | "weekday" | "span" | "daylight-saving" | "dates".
const char* to_string(PatternKind k);

/// A feature not ok in a pattern, with its worst lateness over the pattern's runs.
struct PatternFeature {
  int feature = -1;
  bool never = false;               ///< never fresh in some run of the pattern
  int64_t worst_late_seconds = 0;   ///< largest lateness among its late runs (> 0), 0 when only never
};

struct Pattern {
  int model = -1;
  RunStatus status = RunStatus::fail;   ///< fail or degraded
  PatternKind kind = PatternKind::dates;
  std::vector<Instant> runs;            ///< the pattern's runs, in order
  /// weekday: the weekday (0 = Sunday) and how many runs the model has on it (outside spans).
  int weekday = -1;
  size_t weekday_runs = 0;
  /// span: every run of the model from the first to the last run of the
  /// pattern (so "N of M"), and the weekdays of the pattern's runs when they
  /// are fewer than the model's (e.g. only weekday runs fail).
  size_t runs_in_span = 0;
  std::vector<int> span_weekdays;
  bool from_window_start = false;       ///< span: the first run is the model's first in the window
  bool to_window_end = false;           ///< span: the last run is the model's last in the window
  std::vector<ZoneChange> starts_after; ///< span: changes between the run before and the first run
  std::vector<ZoneChange> ends_with;    ///< span: changes between the last run and the run after
  std::vector<ZoneChange> changes;      ///< daylight_saving: the changes within 36 h before the run
  /// Zones that time the pattern's chains and did not change their clocks
  /// within 36 h of the first change named (daylight_saving and spans).
  std::vector<const Zone*> steady_zones;
  std::vector<PatternFeature> features; ///< not ok (required for fail, optional for degraded), model order
  Instant worst_run;                    ///< the run with the most negative slack (never counts as worst)
  Blame blame;                          ///< of the worst feature of the worst run
};

/// Per model: counts and tightest slack, required and optional features apart.
struct ModelSummary {
  int model = -1;
  size_t runs = 0, ok = 0, degraded = 0, failed = 0;
  /// Smallest slack over required (resp. optional) features that became ready
  /// at all (negative when late), and its run; nullopt when none.
  std::optional<int64_t> tightest_required_seconds, tightest_optional_seconds;
  std::optional<Instant> tightest_required_at, tightest_optional_at;
  std::vector<int> degraded_features;   ///< optional features not ok in some run, first occurrence order
};

/// Collects runs as they are computed; then groups them. Keeps per model the
/// instants of its runs and a small record per run that is not ok.
class PatternCollector {
 public:
  /// `ev` supplies the window and the engine (for chains and re-evaluation);
  /// it must outlive the collector. `monitored` as in blame().
  PatternCollector(const Plan& plan, const Evaluation& ev, const std::vector<bool>* monitored = nullptr);

  /// Adds the next run; runs must come in evaluation order (instant, then model).
  void add(const RunResult& run);

  const std::vector<ModelSummary>& summaries() const { return summaries_; }
  /// The patterns (see the file comment). Call once, after every run was added.
  std::vector<Pattern> patterns() const;

  /// The instants of every run of `model` added, in order.
  const std::vector<Instant>& model_runs(int model) const { return runs_[static_cast<size_t>(model)]; }

  /// A run that is not ok, as recorded.
  struct Record {
    uint32_t ordinal;        ///< position among the model's runs
    uint32_t signature;      ///< index into signatures()
    int64_t worst_slack;     ///< of its worst feature in the signature; INT64_MIN when never
    int32_t worst_feature;   ///< node index
    RunStatus status;
    bool optional_bad;       ///< some optional feature is not ok (a failing run that is also degraded)
  };
  const std::vector<Record>& records(int model) const { return records_[static_cast<size_t>(model)]; }
  const std::vector<std::vector<int>>& signatures() const { return signatures_; }

  /// Fills a pattern's features, worst run and blame from its runs (the
  /// grouping does this for every pattern it returns).
  void complete(Pattern* p) const;
  /// A pattern of one run of `model` at `at` (scheduled or not) with `status`
  /// (fail or degraded), completed; kind `dates`.
  Pattern single_run(int model, Instant at, RunStatus status) const;

  const Plan& plan() const { return plan_; }
  const Evaluation& evaluation() const { return ev_; }
  const std::vector<bool>* monitored() const { return monitored_; }

 private:
  void group(int model, RunStatus status, std::vector<Pattern>* out) const;

  const Plan& plan_;
  const Evaluation& ev_;
  const std::vector<bool>* monitored_;
  std::vector<ModelSummary> summaries_;
  std::vector<std::vector<Instant>> runs_;
  std::vector<std::vector<Record>> records_;
  std::vector<std::vector<int>> signatures_;
  std::map<std::vector<int>, uint32_t> signature_index_;
  // Per model and status (0 fail, 1 degraded): every record's features folded
  // together, in the model's feature order; a pattern holding all of them
  // needs no second look at its runs.
  std::vector<std::array<std::vector<PatternFeature>, 2>> folded_;
  std::vector<std::array<size_t, 2>> folded_runs_;
  std::vector<int> required_, optional_;  // scratch
  std::vector<std::vector<const Zone*>> model_zones_;   // zones that time each model's data
};

/// One pass over every run of `ev` (stored or lazy), fed to a collector.
void collect_runs(const Evaluation& ev, PatternCollector* collector);

}  // namespace readyby
