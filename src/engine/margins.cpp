#include "engine/margins.h"

#include <algorithm>
#include <climits>

#include "plan/lineage.h"

namespace readyby {

namespace {

constexpr int64_t kMinute = 60;
constexpr int64_t kNoLimit = INT64_MIN / 4;  // no landing is early enough

// The latest instant by which a node must land for the ok runs that ask
// about w, and the run (index into the evaluation's runs) that sets it.
struct Limit {
  int64_t w;
  int64_t latest;
  int32_t run;
};

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
// last interval [occurrence, next occurrence) found: limits arrive in nearly
// ascending order, so most lookups need no search.
class LatestOccurrence {
 public:
  LatestOccurrence(const Cron& cron, const Zone& zone, const Calendar& calendar)
      : cron_(cron), zone_(zone), calendar_(calendar) {}
  int64_t at_or_before(int64_t t) {
    if (t >= lo_ && t < hi_) return lo_;
    std::optional<Instant> o = previous_occurrence(cron_, zone_, calendar_, from_unix(t));
    if (!o) return kNoLimit;
    lo_ = to_unix(*o);
    std::optional<Instant> next = next_occurrence(cron_, zone_, calendar_, *o + Seconds(1));
    hi_ = next ? to_unix(*next) : lo_ + 1;
    return lo_;
  }

 private:
  const Cron& cron_;
  const Zone& zone_;
  const Calendar& calendar_;
  int64_t lo_ = 1, hi_ = 0;
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
  const Plan& plan_;
  const Evaluation& base_;
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
  std::vector<std::vector<Limit>> limits(n_nodes);
  for (size_t r = 0; r < base.runs.size(); ++r) {
    const RunResult& run = base.runs[r];
    if (run.status != RunStatus::ok) continue;
    for (const FeatureResult& f : run.features) {
      limits[static_cast<size_t>(f.feature)].push_back(
          {to_unix(f.needs_data_through), to_unix(run.at), static_cast<int32_t>(r)});
    }
  }
  for (std::vector<Limit>& l : limits) {
    std::sort(l.begin(), l.end(), [](const Limit& a, const Limit& b) { return a.w < b.w || (a.w == b.w && tighter(a, b)); });
    l.erase(std::unique(l.begin(), l.end(), [](const Limit& a, const Limit& b) { return a.w == b.w; }), l.end());
  }

  // Backward pass: a node's limits are complete once every consumer has
  // passed its own on; then its margin is read off and its limits pushed to
  // its inputs and freed.
  const FreshnessEngine& engine = base.engine();
  std::vector<int> order = base.lineage_->topological_order();
  std::vector<Limit> passed;
  for (auto it = order.rbegin(); it != order.rend(); ++it) {
    const int n = *it;
    std::vector<Limit>& mine = limits[static_cast<size_t>(n)];
    if (mine.empty()) continue;
    Margin& m = out[static_cast<size_t>(n)];
    const Profile& profile = engine.profile(n);
    const Limit* binding = nullptr;
    int64_t room = INT64_MAX;
    for (const Limit& l : mine) {
      std::optional<Instant> ready = profile.at(l.w).ready;
      int64_t r = ready ? l.latest - to_unix(*ready) : kNoLimit;
      if (r < room || (r == room && l.run < binding->run)) room = r, binding = &l;
    }
    m.room_seconds = room;
    m.seconds = std::max<int64_t>(0, room) / kMinute * kMinute;
    m.binding_model = base.runs[static_cast<size_t>(binding->run)].model;
    m.binding_at = base.runs[static_cast<size_t>(binding->run)].at;

    const Node& node = plan.nodes[static_cast<size_t>(n)];
    if (!node.inputs.empty()) {
      passed.clear();
      passed.reserve(mine.size());
      const int64_t run_time = node.run_time.seconds;
      if (node.trigger) {
        LatestOccurrence latest(*node.trigger, *node.zone, plan.calendar(node.calendar));
        for (const Limit& l : mine) passed.push_back({l.w, latest.at_or_before(l.latest - run_time), l.run});
      } else {
        for (const Limit& l : mine) passed.push_back({l.w, l.latest - run_time, l.run});
      }
      std::vector<int> distinct = node.inputs;
      std::sort(distinct.begin(), distinct.end());
      distinct.erase(std::unique(distinct.begin(), distinct.end()), distinct.end());
      for (int i : distinct) merge_limits(&limits[static_cast<size_t>(i)], passed);
    }
    std::vector<Limit>().swap(mine);
  }

  if (!options.confirm) return out;
  Prober prober(plan, base, *base.lineage_);
  for (Margin& m : out) {
    if (!m.seconds) continue;
    std::vector<int> cone = prober.cone(m.node);
    const int64_t margin = *m.seconds;
    int at_margin = margin > 0 ? prober.first_broken(m.node, margin, cone) : -1;
    int past_margin = prober.first_broken(m.node, margin + kMinute, cone);
    m.reevaluations = margin > 0 ? 2 : 1;
    if (at_margin < 0 && past_margin >= 0) {
      m.method = Margin::Method::confirmed;
      continue;
    }
    bisect(prober, base, m.node, cone, &m);
  }
  return out;
}

}  // namespace readyby
