#pragma once
// The draw engine: evaluates runs under synthetic landings (DESIGN §10). A
// *draw* samples, independently for every occurrence of every monitored node,
// an outcome (a landing offset, or missing) from that node's landing model,
// turns the outcomes into deliveries, and evaluates every run with the §4
// recursion under the nightly rule of §7: a monitored node's E(w) is the
// earliest landing among its deliveries with data through >= w ("not
// landed" when none), its chain is the node alone, and unmonitored nodes keep
// their declared timing. Pure computation; no I/O, no printing.
//
// Design. A forecast asks for thousands of draws of tens of thousands of
// runs, so the engine compiles once what every draw shares and redoes only
// what a draw changes:
// - The *cone*: the nodes upstream of the targets' features, not descending
//   past a monitored node (its inputs do not matter, §7). Nodes of the cone
//   that no monitored node feeds are *fixed*: their freshness profiles
//   (engine/freshness.h explains profiles) are built once. The others are
//   *drawn*: monitored nodes and everything they feed, rebuilt every draw in
//   topological order, each from its inputs' profiles by one merge sweep.
// - Schedules are read once: each monitored node's occurrences in the window
//   (with weekday and coverage), and each cron trigger's instants up to the
//   horizon (the latest run plus two days), so a draw calls no time-zone or
//   cron code at all.
// - Every profile piece carries its *origin* — the node that starts its
//   chain — instead of a link to one input, so the node that made a run late
//   is known without walking chains.
// - Queries (feature, w = run − allowed age) are deduplicated and sorted per
//   feature; a draw answers each feature's queries in one walk along its
//   profile. Runs whose inputs are all fixed are evaluated once.
// - Bounds settle runs before any draw. Every landing of every draw lies
//   between a node's earliest recorded offset and its latest (or missing, if
//   it ever was), and E only grows with any landing; so the run evaluated with
//   all monitored nodes at their earliest is a lower bound for every draw, at
//   their latest an upper bound. A run late even at the earliest is *doomed*
//   (fails in every draw), one on time even at the latest is *settled*; the
//   others are *live*. A partial draw samples and rebuilds only what live runs
//   need (live nodes are sampled first, so a live run comes out the same in a
//   full and a partial draw with the same seed); full draws also evaluate the
//   doomed runs, for the attribution of their lateness.
// The cost of a full draw is therefore proportional to the profile pieces of
// the drawn part of the cone plus the number of queries on drawn features,
// independent of the time-zone work; a partial draw's to the live part only.
// Neither depends on how many draws ran before (each has its own generator:
// see random.h).
//
// Exactness. For every query the answer (ready or not by its run, and the
// origin of its chain) equals what engine/check.h's evaluate() gives with the
// same deliveries as observed deliveries (tests/forecast_test.cpp compares them
// on random draws). One deliberate difference: a cron trigger's next instant
// beyond the horizon is not looked up; such a value is reported as some
// instant past the horizon — late for every run either way.
//
// Synthetic deliveries. Occurrence k of a scheduled node (instant o_k)
// delivers data through o_k − data_lag_seconds (landing_model.h) and lands at
// o_k + offset, but never before its data ends (a delivery cannot hold data
// from after it landed; record rejects such rows). A slot of a data-end node
// (data end t) lands at t + offset. Occurrences from the first whose data
// reaches the earliest query through kExtraOccurrences past the last query
// are synthesized; a node missing all of those reads as not landed.

#include <array>
#include <cstdint>
#include <memory>
#include <random>
#include <utility>
#include <vector>

#include "engine/freshness.h"
#include "forecast/landing_model.h"
#include "forecast/random.h"
#include "plan/plan.h"
#include "time/instant.h"

namespace readyby {

/// Occurrences synthesized past the last one a query needs.
inline constexpr int kExtraOccurrences = 7;

/// One input of a target: a feature whose data must reach (run − age_seconds)
/// by the run. An optional input that is not fresh makes the run degraded.
struct TargetInput {
  int feature = -1;          // plan node index (any node works; features in practice)
  int64_t age_seconds = 0;   // the allowed age (max_age, or a score's recency)
  bool optional = false;
};

/// What is forecast: runs at `runs`, each on time when every input is fresh.
struct ForecastTarget {
  std::vector<TargetInput> inputs;
  std::vector<Instant> runs;  // any order; duplicates count twice
};

/// The outcome lists draws sample from: per monitored model (LandingModels
/// order), its groups and the group each local weekday uses.
struct OutcomeTables {
  struct NodeTables {
    std::vector<std::vector<int64_t>> groups;  // never empty lists
    std::array<uint8_t, 7> group_of_weekday{};
  };
  std::vector<NodeTables> nodes;

  /// The fitted distributions (LandingModel::outcomes_for).
  static OutcomeTables fitted(const LandingModels& models);
  /// A bootstrap resample: every group resampled with replacement to its own
  /// size (per weekday when the model is per weekday), with `rng`.
  OutcomeTables resampled(std::mt19937_64& rng) const;
};

/// How a draw picks outcomes.
enum class DrawMode {
  independent,  // DESIGN §10: every occurrence independently
  whole_days,   // each local date (plan zone) of the window takes every
                // monitored node's outcomes from one recorded date of the same
                // weekday (the i-th occurrence that date from its i-th there);
                // occurrences with no counterpart are drawn independently.
                // Keeps the correlation between nodes within a day; used by
                // the backtest to measure what independence costs.
};

/// What one draw found, for the runs whose inputs are not all fixed.
struct DrawResult {
  std::vector<uint8_t> ok;                      // per drawn run (DrawEngine::drawn_runs order)
  std::vector<std::pair<int32_t, int32_t>> late_origins;  // (drawn run, origin node), once per pair
};

class DrawEngine {
 public:
  /// Compiles the cone of `targets` over `plan` with the monitored nodes of
  /// `models`. Both must outlive the engine. Targets with no runs are allowed.
  DrawEngine(const Plan& plan, const LandingModels& models, std::vector<ForecastTarget> targets);
  ~DrawEngine();
  DrawEngine(const DrawEngine&) = delete;
  DrawEngine& operator=(const DrawEngine&) = delete;

  const std::vector<ForecastTarget>& targets() const { return targets_; }
  /// Runs are numbered target by target, in each target's `runs` order.
  size_t run_count() const { return run_at_.size(); }
  size_t first_run(size_t target) const { return run_base_[target]; }
  size_t target_of(size_t run) const { return run_target_[run]; }
  /// Runs whose inputs are all fixed: the same in every draw.
  bool fixed(size_t run) const { return drawn_index_[run] < 0; }
  /// A fixed run's result: on time, and the origins that made it not.
  bool fixed_ok(size_t run) const { return fixed_ok_[run] != 0; }
  const std::vector<int>& fixed_origins(size_t run) const { return fixed_origins_[run]; }
  /// The drawn runs (run numbers, ascending); DrawResult::ok is in this order.
  const std::vector<uint32_t>& drawn_runs() const { return drawn_runs_; }
  /// A drawn run that fails in every draw: a non-optional input is late even
  /// when every monitored node lands at its earliest recorded offset. Its
  /// status needs no draw, only the attribution of its lateness does.
  bool doomed(size_t drawn_index) const { return doomed_[drawn_index] == 1; }
  size_t doomed_count() const { return doomed_count_; }
  /// Drawn runs whose status a draw can change (neither doomed nor on time
  /// even with every monitored node at its latest recorded offset).
  size_t live_count() const { return live_runs_.size(); }
  /// Nodes whose profiles each draw rebuilds (for benchmarks).
  size_t drawn_node_count() const { return drawn_order_.size(); }

  /// Per-thread working memory for run_draw.
  struct Scratch;
  struct ScratchDelete {
    void operator()(Scratch* s) const;
  };
  using ScratchPtr = std::unique_ptr<Scratch, ScratchDelete>;
  ScratchPtr make_scratch() const;

  /// Evaluates one draw: outcomes from `tables` (built from the same models)
  /// with a generator seeded by `draw_seed`. Deterministic in its arguments.
  /// With `full` false, only live runs are evaluated, and only the nodes they
  /// need are rebuilt: doomed runs get ok 0 and no origins, settled ones ok 1.
  /// Live nodes are sampled first, so a live run's result is the same in a
  /// full and a partial draw with the same seed.
  void run_draw(const OutcomeTables& tables, DrawMode mode, uint64_t draw_seed, Scratch* scratch, DrawResult* result,
                bool full = true) const;

  /// The deliveries one draw synthesizes, as observed deliveries indexed like
  /// plan.nodes (present for every monitored node of the cone). For tests:
  /// engine/check.h's evaluate() with them must agree with run_draw.
  ObservedDeliveries deliveries(const OutcomeTables& tables, DrawMode mode, uint64_t draw_seed) const;

  struct Occurrence {
    int64_t at;         // scheduled instant, or the slot's data end (unix s)
    int64_t data_end;   // the delivery holds data through here
    int32_t date;       // index into dates_ (local date in the plan zone)
    uint16_t in_date;   // its index among the node's occurrences that date
    uint8_t weekday;    // local weekday in the node's zone
  };
  struct Piece;

 private:
  struct DrawnNode;
  struct TriggerHit;
  void compile_queries();
  void compile_cone();
  void compile_whole_days();
  void build_fixed_profiles();
  void evaluate_fixed_runs();
  void sample(const OutcomeTables& tables, DrawMode mode, std::mt19937_64& rng, Scratch* s, bool full) const;
  TriggerHit next_trigger(int node, int64_t v) const;
  void derive(int node, const std::vector<Piece>& max_of_inputs, std::vector<Piece>& out) const;
  const std::vector<Piece>& profile_of(int node, const Scratch* s) const;
  void build(int node, Scratch* s, std::vector<Piece>& out) const;
  void answer(size_t feature_range, const std::vector<Piece>& profile, std::vector<int64_t>& ready,
              std::vector<int32_t>& origin) const;
  bool judge(size_t run, const std::vector<int64_t>& ready, const std::vector<int32_t>& origin,
             std::vector<int32_t>& origins, bool skip_sure = false) const;
  void bound_answers(bool earliest, std::vector<int64_t>& ready) const;
  void classify_drawn_runs(const std::vector<uint8_t>& feature_drawn);

  const Plan& plan_;
  const LandingModels& models_;
  std::vector<ForecastTarget> targets_;

  // Runs and their inputs.
  std::vector<size_t> run_base_;
  std::vector<uint32_t> run_target_;
  std::vector<int64_t> run_at_;
  std::vector<uint32_t> run_input_begin_;                // size run_count() + 1
  std::vector<std::pair<uint32_t, bool>> run_inputs_;    // (query, optional)
  std::vector<int32_t> drawn_index_;                     // per run: index in drawn_runs_, -1 fixed
  std::vector<uint32_t> drawn_runs_;
  std::vector<uint8_t> fixed_ok_;
  std::vector<uint8_t> doomed_;                          // per drawn run: 1 doomed, 2 settled on time, 0 live
  std::vector<uint8_t> sure_on_time_;                    // per run input: on time in every draw
  size_t doomed_count_ = 0;
  std::vector<uint32_t> live_runs_;                      // drawn runs not doomed (indices into drawn_runs_)
  std::vector<uint32_t> live_slots_;                     // drawn slots those need, topological order
  std::vector<size_t> live_features_;                    // feature ranges those need
  std::vector<uint32_t> sample_order_;                   // monitored drawn slots: live ones first
  size_t live_monitored_ = 0;                            // how many of sample_order_ are live
  std::vector<std::vector<int>> fixed_origins_;

  // Queries, sorted by (feature, w); per queried feature its range.
  std::vector<int64_t> query_w_;
  std::vector<int> query_feature_;
  std::vector<std::pair<int, std::pair<uint32_t, uint32_t>>> feature_queries_;  // (feature, [begin, end))
  std::vector<int64_t> fixed_ready_;   // per query of a fixed feature: E, or INT64_MAX for never
  std::vector<int32_t> fixed_origin_;
  std::vector<size_t> drawn_features_;  // indices into feature_queries_ of drawn features

  // The cone.
  int64_t w_lo_ = 0, w_hi_ = 0, horizon_ = 0;
  std::vector<uint8_t> in_cone_;            // per node
  std::vector<int32_t> drawn_slot_;         // per node: index into drawn_nodes_, -1 when fixed
  std::vector<int> fixed_order_;            // fixed cone nodes, topological order
  std::vector<int> drawn_order_;            // drawn nodes, topological order
  std::vector<std::unique_ptr<DrawnNode>> drawn_nodes_;
  std::vector<std::vector<Piece>> fixed_profiles_;  // per node (empty unless fixed and in the cone)
  struct TriggerList {
    std::vector<int64_t> at;   // instants from before the window to the first past the horizon
    int64_t listed_from = 0;   // every instant >= listed_from up to at.back() is listed
    bool exhausted = false;    // the schedule has no instant after at.back()
  };
  std::vector<TriggerList> triggers_;       // per node (cron-triggered cone nodes)

  // Whole-day draws: recorded outcomes by local date.
  std::vector<int32_t> dates_;              // local dates (days since epoch) of synthesized occurrences
  std::array<std::vector<int32_t>, 7> recorded_dates_by_weekday_;
  struct DayOutcomes {
    std::vector<int32_t> dates;             // ascending
    std::vector<uint32_t> begin;            // into outcomes, size dates.size() + 1
    std::vector<int64_t> outcomes;
  };
  std::vector<DayOutcomes> day_outcomes_;   // per monitored model
};

}  // namespace readyby
