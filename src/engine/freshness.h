#pragma once
// The freshness engine: E_n(w), the earliest instant at which node n holds
// data that reaches at least w, with the chain of nodes that determined it
// (DESIGN §4). Pure computation: no I/O, no printing.
//
// How it is computed, and why. E_n is a monotone step function of w, made of
// three kinds of piece: constant (a scheduled delivery: every w up to some
// point is served by the same landing), shifted (a stream: E = w + c) and
// never. Each is closed under the operations of §4: the max over inputs of
// such pieces splits at most once per interval (where a shifted piece crosses
// a constant one), adding a run time shifts values, and a cron trigger turns
// every piece into constants at its occurrences. So the engine builds, once,
// a *profile* per node — the ordered pieces covering the queried range of w —
// in topological order, each from its inputs' profiles by one merge sweep.
// Every run's feature lookup is then a binary search, and a chain is a walk
// down the `via` links (E_n(w) of a derived node is decided by one input at
// the *same* w, so the walk needs no other state).
//
// The alternative — evaluating the recursion per run with memoisation — costs
// (runs x features x upstream closure) and hits its memo rarely, because each
// feature asks at its own w = r - max_age. Measured on the benchmark plan
// (bench/gen_plan.py: 20,000 nodes, depth 32, 40,450 runs over 30 days,
// 958,790 feature lookups; bench/freshness_bench): profiles take 0.36 s in
// all (656,371 pieces), while the memoised recursion needs 12.4 s for the
// first 4,000 runs alone (9.7 million node evaluations) — about 300 times
// slower per run — and both give identical answers. Profile cost grows with
// the number of distinct deliveries in the window, not with the number of runs.
//
// Semantics follow DESIGN §4 literally, including ties (the first input in
// `inputs` order wins), the RFC 5545 reading of local times (in
// next_occurrence) and the 1,462-day horizon after which E is "never". When
// an input is never, the node is never and its chain follows the first such
// input.

#include <cstdint>
#include <optional>
#include <vector>

#include "plan/lineage.h"
#include "plan/plan.h"
#include "time/instant.h"

namespace readyby {

/// One piece of a profile: covers every w (unix seconds) in
/// (previous piece's `upto`, `upto`].
struct ProfilePiece {
  enum class Kind : uint8_t { constant, shifted, never };
  int64_t upto = 0;
  int64_t value = 0;   // constant: E; shifted: E = w + value; never: unused
  int32_t via = -1;    // index into the node's inputs of the deciding input; -1 for sources
  Kind kind = Kind::constant;
};

/// E_n over a range of w, as ordered pieces; the last piece reaches "forever".
class Profile {
 public:
  struct Value {
    std::optional<Instant> ready;  // nullopt: never
    int via = -1;                  // deciding input (index into inputs), -1 at a source
  };
  Value at(int64_t w) const;
  const std::vector<ProfilePiece>& pieces() const { return pieces_; }
  /// Appends a piece, merging it into the last one when they agree.
  void push(ProfilePiece piece);

 private:
  std::vector<ProfilePiece> pieces_;
};

inline constexpr int64_t kForever = INT64_MAX / 4;

/// A recorded delivery of a node (DESIGN §7): it landed at `landed_at` and
/// holds data through `data_through`.
struct Delivery {
  Instant landed_at;
  Instant data_through;
};

/// Recorded deliveries by node index. A node present here (even with an
/// empty list) is *monitored*: its E(w) is the earliest `landed_at` among its
/// deliveries with `data_through >= w`, and never ("not landed") when there is
/// none; its chain is the node alone. Only `ok` deliveries belong here.
using ObservedDeliveries = std::vector<std::optional<std::vector<Delivery>>>;

class FreshnessEngine {
 public:
  /// Builds the profiles of every node in `nodes_needed` (a mask over
  /// plan.nodes; nodes upstream of a needed node must be needed too) for
  /// queries with w in [w_from, w_to]. `plan` must outlive the engine.
  /// With `observed` (indexed like plan.nodes), monitored nodes use their
  /// recorded deliveries instead of their declared schedule.
  FreshnessEngine(const Plan& plan, const Lineage& lineage, const std::vector<bool>& nodes_needed, Instant w_from,
                  Instant w_to, const ObservedDeliveries* observed = nullptr);

  /// E_n(w): nullopt when never. `w` must lie in the range given at construction.
  std::optional<Instant> ready(int node, Instant w) const;
  /// The chain behind E_n(w): node ids' indices from a source to `node`.
  std::vector<int> chain(int node, Instant w) const;

  /// An engine for `plan`, an edited copy of `base`'s plan (same nodes in the
  /// same order, same inputs; schedules, triggers, lands_after, run_time and
  /// `fails` may differ), sharing every profile it can with `base`. `edited`
  /// lists the nodes whose own timing differs from `base`'s plan; `cone` lists,
  /// in topological order, those nodes and every node downstream of them (see
  /// DownstreamCones). The profile of an edited node is rebuilt; a node of the
  /// cone is rebuilt only when one of its inputs' profiles changed, and a
  /// rebuilt profile equal to `base`'s is dropped in favour of it. Nodes that
  /// `base` holds no profile for are skipped. The range of w and the recorded
  /// deliveries are those of `base`; a monitored node keeps its recorded
  /// deliveries, shifted by the change of its lands_after (sources) or
  /// run_time (jobs, features), and never lands when it `fails`. Answers equal
  /// those of an engine built from scratch on `plan` over the same range.
  /// `base` (and what it refers to) and `plan` must outlive this engine.
  FreshnessEngine(const FreshnessEngine& base, const Plan& plan, const std::vector<int>& edited,
                  const std::vector<int>& cone);

  /// The recorded deliveries given at construction (nullptr when none).
  const ObservedDeliveries* observed() const { return observed_; }
  /// The queried range of w given at construction (unix seconds, inclusive).
  int64_t range_from() const { return lo_; }
  int64_t range_to() const { return hi_; }
  /// Whether this engine holds (or shares) a profile for `node`.
  bool has_profile(int node) const { return !profile(node).pieces().empty(); }

  /// Total number of profile pieces held (for benchmarks and tests); an
  /// engine built from another counts only the profiles it holds itself
  /// (those that differ from its base's).
  size_t piece_count() const;
  /// Whether this engine holds its own profile of `node`: always for a built
  /// node of an engine built from a plan; for one built from another engine,
  /// exactly when the node's profile differs from the base's.
  bool owns_profile(int node) const {
    return base_ ? slot_[static_cast<size_t>(node)] >= 0 : has_profile(node);
  }
  /// Nodes whose profile this engine holds itself rather than sharing it
  /// with its base (all built nodes for an engine built from a plan).
  size_t own_profile_count() const;
  const Profile& profile(int node) const {
    if (!base_) return profiles_[static_cast<size_t>(node)];
    return own_profile(node);
  }

 private:
  const Profile& own_profile(int node) const;
  Profile& profile_to_build(int node);
  bool differs_from_base(int node) const;
  void build(int node);
  void build_source(int node, int64_t lo, int64_t hi);
  void build_observed(int node, const std::vector<Delivery>& deliveries);
  void build_derived(int node);
  void apply_trigger(int node, const Profile& max_of_inputs, Profile* out);

  const Plan& plan_;
  const ObservedDeliveries* observed_ = nullptr;
  // A built engine holds every profile in `profiles_` (index = node). An
  // engine built from another holds only the profiles that changed:
  // `slot_[node]` is the index into `profiles_`, -1 for a shared profile.
  const FreshnessEngine* base_ = nullptr;
  std::vector<int32_t> slot_;
  std::vector<Profile> profiles_;
  int64_t lo_, hi_;
};

}  // namespace readyby
