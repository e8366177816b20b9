#include "engine/margins.h"

#include <algorithm>
#include <climits>
#include <unordered_map>

#include "plan/lineage.h"

namespace readyby {

namespace {

constexpr int64_t kMinute = 60;
constexpr int64_t kNoLimit = INT64_MIN / 4;  // no landing is early enough

// The latest instant by which a node must land for the ok runs that ask
// about w, and the run (index into the evaluation's runs) that sets it.
// Instants are seconds from the start of the engine's range of w, so that the
// tens of millions of limits of a large plan take 12 bytes each.
struct Limit {
  int32_t w;
  int32_t latest;
  int32_t run;
};

// An instant as an offset from `origin`, clamped to what a Limit can hold.
int32_t offset(int64_t t, int64_t origin) {
  return static_cast<int32_t>(std::clamp<int64_t>(t - origin, INT32_MIN + 1, INT32_MAX));
}

bool tighter(const Limit& a, const Limit& b) { return a.latest < b.latest || (a.latest == b.latest && a.run < b.run); }

// Merges `add` into `into` (both sorted by w, one entry per w), keeping the
// tighter limit for each w.
void merge_limits(std::vector<Limit>* into, const std::vector<Limit>& add) {
  if (into->empty()) {
    *into = add;
    return;
  }
  std::vector<Limit> out;
  out.reserve(into->size() + add.size());
  size_t i = 0, j = 0;
  const std::vector<Limit>& a = *into;
  while (i < a.size() || j < add.size()) {
    if (j == add.size() || (i < a.size() && a[i].w < add[j].w)) {
      out.push_back(a[i++]);
    } else if (i == a.size() || add[j].w < a[i].w) {
      out.push_back(add[j++]);
    } else {
      out.push_back(tighter(add[j], a[i]) ? add[j] : a[i]);
      ++i, ++j;
    }
  }
  *into = std::move(out);
}

// The latest occurrence at or before t of a cron trigger, remembering the
// interval [occurrence, next occurrence) found last: limits arrive in nearly
// ascending order, so most lookups need no search, and most others step
// forward by an occurrence or two.
class LatestOccurrence {
 public:
  LatestOccurrence(const Cron& cron, const Zone& zone, const Calendar& calendar)
      : cron_(cron), zone_(zone), calendar_(calendar) {}
  int64_t at_or_before(int64_t t) {
    if (t >= lo_ && t < hi_) return lo_;
    if (lo_ <= hi_ && t >= hi_) {
      for (int step = 0; step < 8 && t >= hi_; ++step) {
        std::optional<Instant> next = next_occurrence(cron_, zone_, calendar_, from_unix(hi_ + 1));
        if (!next) break;
        lo_ = hi_;
        hi_ = to_unix(*next);
      }
      if (t >= lo_ && t < hi_) return lo_;
    }
    std::optional<Instant> o = previous_occurrence(cron_, zone_, calendar_, from_unix(t));
    if (!o) {
      lo_ = 1, hi_ = 0;
      return kNoLimit;
    }
    lo_ = to_unix(*o);
    std::optional<Instant> next = next_occurrence(cron_, zone_, calendar_, *o + Seconds(1));
    hi_ = next ? to_unix(*next) : lo_ + 1;
    return lo_;
  }

 private:
  const Cron& cron_;
  const Zone& zone_;
  const Calendar& calendar_;
  int64_t lo_ = 1, hi_ = 0;  // empty until the first lookup
};

// Re-evaluates the downstream cone of one node with a delay and reports the
// earliest ok run of `base` that the delay makes degraded or failing.
class Prober {
 public:
  Prober(const Plan& plan, const Evaluation& base, const Lineage& lineage)
      : plan_(plan), base_(base), work_(plan), cones_(lineage), ok_runs_(plan.models.size()) {
    for (size_t r = 0; r < base.runs.size(); ++r) {
      if (base.runs[r].status == RunStatus::ok) ok_runs_[static_cast<size_t>(base.runs[r].model)].push_back(static_cast<int>(r));
    }
  }

  std::vector<int> cone(int node) const { return cones_.of({node}); }

  /// Whether `delay node=seconds` makes run `run` (an index into base.runs)
  /// degraded or failing, by the §4 recursion at that run's instants alone:
  /// nodes outside `cone` keep their profiles from `base`.
  bool breaks_run(int node, int64_t seconds, const std::vector<int>& cone, int run) {
    in_cone_.assign(plan_.nodes.size(), 0);
    for (int k : cone) in_cone_[static_cast<size_t>(k)] = 1;
    const RunResult& r = base_.runs[static_cast<size_t>(run)];
    bool broken = false;
    for (const FeatureResult& f : r.features) {
      if (!in_cone_[static_cast<size_t>(f.feature)]) continue;
      memo_.clear();
      std::optional<int64_t> ready = at(f.feature, to_unix(f.needs_data_through), node, seconds);
      broken = broken || !ready || *ready > to_unix(r.at);
    }
    return broken;
  }

  /// Index into base.runs of the earliest ok run that `delay node=seconds`
  /// turns degraded or failing; -1 when none.
  int first_broken(int node, int64_t seconds, const std::vector<int>& cone) {
    Node& n = work_.nodes[static_cast<size_t>(node)];
    Duration& shifted = n.kind == NodeKind::source ? n.lands_after : n.run_time;
    const Duration original = shifted;
    shifted.seconds += seconds;
    FreshnessEngine engine(base_.engine(), work_, {node}, cone);
    shifted = original;
    int first = -1;
    for (size_t m = 0; m < plan_.models.size(); ++m) {
      std::vector<int> changed;
      for (int f : plan_.models[m].features) {
        if (engine.owns_profile(f)) changed.push_back(f);
      }
      if (changed.empty()) continue;
      for (int r : ok_runs_[m]) {
        if (first >= 0 && r >= first) break;
        const Instant at = base_.runs[static_cast<size_t>(r)].at;
        bool broken = false;
        for (int f : changed) {
          std::optional<Instant> ready = engine.ready(f, at - Seconds(plan_.nodes[static_cast<size_t>(f)].max_age.seconds));
          if (!ready || *ready > at) broken = true;
        }
        if (broken) {
          first = r;
          break;
        }
      }
    }
    return first;
  }

 private:
  // E_k(w) with `delay node=seconds`, memoised per query.
  std::optional<int64_t> at(int k, int64_t w, int node, int64_t seconds) {
    auto found = memo_.find(k);
    if (found != memo_.end()) return found->second;
    std::optional<int64_t> e;
    if (!in_cone_[static_cast<size_t>(k)] || k == node) {
      std::optional<Instant> ready = base_.engine().ready(k, from_unix(w));
      if (ready) e = to_unix(*ready) + (k == node ? seconds : 0);
    } else {
      const Node& n = plan_.nodes[static_cast<size_t>(k)];
      int64_t m = INT64_MIN;
      bool never = false;
      for (int i : n.inputs) {
        std::optional<int64_t> v = at(i, w, node, seconds);
        if (!v) never = true;
        else m = std::max(m, *v);
      }
      if (!never && n.trigger) {
        std::optional<Instant> c = next_occurrence(*n.trigger, *n.zone, plan_.calendar(n.calendar), from_unix(m));
        if (c) e = to_unix(*c) + n.run_time.seconds;
      } else if (!never) {
        e = m + n.run_time.seconds;
      }
    }
    memo_.emplace(k, e);
    return e;
  }

  const Plan& plan_;
  const Evaluation& base_;
  std::vector<char> in_cone_;
  std::unordered_map<int, std::optional<int64_t>> memo_;
  Plan work_;  // the plan with the node under test delayed, restored after each probe
  DownstreamCones cones_;
  std::vector<std::vector<int>> ok_runs_;  // per model, indices into base.runs, ascending
};

// The margin by bisection on re-evaluations alone (used when the backward
// pass and a re-evaluation disagree).
void bisect(Prober& prober, const Evaluation& base, int node, const std::vector<int>& cone, Margin* m) {
  int64_t lo = 0, hi = std::max<int64_t>(1, m->seconds.value_or(0) / kMinute + 1);
  int broken = -1;
  while ((broken = prober.first_broken(node, hi * kMinute, cone)) < 0) {
    ++m->reevaluations;
    lo = hi;
    hi *= 2;
    if (hi > (int64_t{1} << 24)) {  // over 30 years: no ok run depends on it after all
      m->seconds.reset();
      m->binding_model = -1;
      return;
    }
  }
  ++m->reevaluations;
  int binding = broken;
  while (hi - lo > 1) {
    int64_t mid = lo + (hi - lo) / 2;
    int b = prober.first_broken(node, mid * kMinute, cone);
    ++m->reevaluations;
    if (b < 0) lo = mid;
    else hi = mid, binding = b;
  }
  m->seconds = lo * kMinute;
  m->binding_run = static_cast<size_t>(binding);
  m->binding_model = base.runs[static_cast<size_t>(binding)].model;
  m->binding_at = base.runs[static_cast<size_t>(binding)].at;
  m->method = Margin::Method::bisection;
}

}  // namespace

std::vector<Margin> margins(const Plan& plan, const Evaluation& base, MarginOptions options) {
  const size_t n_nodes = plan.nodes.size();
  std::vector<Margin> out(n_nodes);
  for (size_t n = 0; n < n_nodes; ++n) out[n].node = static_cast<int>(n);

  // Each ok run asks each of its features about w = run - max_age; the
  // feature must be ready by the run.
  const FreshnessEngine& engine = base.engine();
  const int64_t origin = engine.range_from();
  std::vector<std::vector<Limit>> limits(n_nodes);
  for (size_t r = 0; r < base.runs.size(); ++r) {
    const RunResult& run = base.runs[r];
    if (run.status != RunStatus::ok) continue;
    for (const FeatureResult& f : run.features) {
      limits[static_cast<size_t>(f.feature)].push_back(
          {offset(to_unix(f.needs_data_through), origin), offset(to_unix(run.at), origin), static_cast<int32_t>(r)});
    }
  }
  for (std::vector<Limit>& l : limits) {
    std::sort(l.begin(), l.end(), [](const Limit& a, const Limit& b) { return a.w < b.w || (a.w == b.w && tighter(a, b)); });
    l.erase(std::unique(l.begin(), l.end(), [](const Limit& a, const Limit& b) { return a.w == b.w; }), l.end());
  }

  // The least room (L_n(w) - E_n(w)) of each node and the run that sets it;
  // run -1 until some ok run depends on the node.
  struct Room {
    int64_t seconds = INT64_MAX;
    int32_t run = -1;
  };
  std::vector<Room> rooms(n_nodes);
  auto take = [&](int n, const std::vector<Limit>& list) {
    const std::vector<ProfilePiece>& pieces = engine.profile(n).pieces();
    Room& room = rooms[static_cast<size_t>(n)];
    size_t piece = 0;  // limits ascend in w: walk the pieces alongside
    for (const Limit& l : list) {
      const int64_t w = origin + l.w, latest = origin + l.latest;
      while (piece + 1 < pieces.size() && pieces[piece].upto < w) ++piece;
      const ProfilePiece& p = pieces[piece];
      int64_t r = p.kind == ProfilePiece::Kind::never      ? kNoLimit
                  : p.kind == ProfilePiece::Kind::constant ? latest - p.value
                                                           : latest - (w + p.value);
      if (r < room.seconds || (r == room.seconds && l.run < room.run)) room = {r, l.run};
    }
  };

  // Backward pass, deepest nodes first (each node after all its consumers):
  // a node's limits are complete once every consumer has passed its own on;
  // then its room is read off and its limits, moved through its run time or
  // fixed start, are passed to its inputs and freed. A source passes nothing
  // on, so what reaches it is read off at once and never stored. Deepest
  // first keeps few lists alive at a time.
  const std::vector<int> topological = base.lineage_->topological_order();
  std::vector<int> depth(n_nodes, 0);
  for (int n : topological) {
    for (int i : plan.nodes[static_cast<size_t>(n)].inputs) {
      depth[static_cast<size_t>(n)] = std::max(depth[static_cast<size_t>(n)], depth[static_cast<size_t>(i)] + 1);
    }
  }
  std::vector<int> order(topological.rbegin(), topological.rend());
  std::stable_sort(order.begin(), order.end(),
                   [&](int a, int b) { return depth[static_cast<size_t>(a)] > depth[static_cast<size_t>(b)]; });
  std::vector<Limit> passed;
  for (int n : order) {
    std::vector<Limit>& mine = limits[static_cast<size_t>(n)];
    if (mine.empty()) continue;
    take(n, mine);
    const Node& node = plan.nodes[static_cast<size_t>(n)];
    passed.clear();
    passed.reserve(mine.size());
    const int64_t run_time = node.run_time.seconds;
    if (node.trigger) {
      LatestOccurrence latest(*node.trigger, *node.zone, plan.calendar(node.calendar));
      for (const Limit& l : mine) {
        passed.push_back({l.w, offset(latest.at_or_before(origin + l.latest - run_time), origin), l.run});
      }
    } else {
      for (const Limit& l : mine) passed.push_back({l.w, offset(origin + l.latest - run_time, origin), l.run});
    }
    std::vector<Limit>().swap(mine);
    std::vector<int> distinct = node.inputs;
    std::sort(distinct.begin(), distinct.end());
    distinct.erase(std::unique(distinct.begin(), distinct.end()), distinct.end());
    for (int i : distinct) {
      if (plan.nodes[static_cast<size_t>(i)].inputs.empty()) take(i, passed);
      else merge_limits(&limits[static_cast<size_t>(i)], passed);
    }
  }
  for (size_t n = 0; n < n_nodes; ++n) {
    const Room& room = rooms[n];
    if (room.run < 0) continue;
    Margin& m = out[n];
    m.room_seconds = room.seconds;
    m.seconds = std::max<int64_t>(0, room.seconds) / kMinute * kMinute;
    m.binding_run = static_cast<size_t>(room.run);
    m.binding_model = base.runs[static_cast<size_t>(room.run)].model;
    m.binding_at = base.runs[static_cast<size_t>(room.run)].at;
  }

  if (options.check == MarginOptions::Check::none) return out;
  Prober prober(plan, base, *base.lineage_);
  for (Margin& m : out) {
    if (!m.seconds) continue;
    std::vector<int> cone = prober.cone(m.node);
    const int64_t margin = *m.seconds;
    const int binding = static_cast<int>(m.binding_run);
    bool holds;
    if (options.check == MarginOptions::Check::binding_run) {
      holds = prober.breaks_run(m.node, margin + kMinute, cone, binding);
      m.method = Margin::Method::binding_run_checked;
    } else {
      int at_margin = margin > 0 ? prober.first_broken(m.node, margin, cone) : -1;
      int past_margin = prober.first_broken(m.node, margin + kMinute, cone);
      m.reevaluations = margin > 0 ? 2 : 1;
      holds = at_margin < 0 && past_margin >= 0;
      m.method = Margin::Method::cone_checked;
    }
    if (!holds) bisect(prober, base, m.node, cone, &m);
  }
  return out;
}

}  // namespace readyby
