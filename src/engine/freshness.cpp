#include "engine/freshness.h"

#include <algorithm>

namespace readyby {

using Kind = ProfilePiece::Kind;

Profile::Value Profile::at(int64_t w) const {
  auto it = std::lower_bound(pieces_.begin(), pieces_.end(), w,
                             [](const ProfilePiece& p, int64_t x) { return p.upto < x; });
  if (it == pieces_.end()) it = pieces_.end() - 1;
  Value v;
  v.via = it->via;
  if (it->kind == Kind::constant) v.ready = from_unix(it->value);
  else if (it->kind == Kind::shifted) v.ready = from_unix(w + it->value);
  return v;
}

void Profile::push(ProfilePiece piece) {
  if (!pieces_.empty()) {
    ProfilePiece& last = pieces_.back();
    if (last.kind == piece.kind && last.via == piece.via && (piece.kind == Kind::never || last.value == piece.value)) {
      last.upto = piece.upto;
      return;
    }
  }
  pieces_.push_back(piece);
}

FreshnessEngine::FreshnessEngine(const Plan& plan, const Lineage& lineage, const std::vector<bool>& needed,
                                 Instant w_from, Instant w_to, const ObservedDeliveries* observed)
    : plan_(plan), observed_(observed), profiles_(plan.nodes.size()), lo_(to_unix(w_from)), hi_(to_unix(w_to)) {
  for (int n : lineage.topological_order()) {
    if (needed[static_cast<size_t>(n)]) build(n);
  }
}

FreshnessEngine::FreshnessEngine(const FreshnessEngine& base, const Plan& plan, const std::vector<int>& edited,
                                 const std::vector<int>& cone)
    : plan_(plan), observed_(base.observed_), base_(&base), slot_(plan.nodes.size(), -1), lo_(base.lo_), hi_(base.hi_) {
  std::vector<bool> must(plan.nodes.size(), false);
  for (int n : edited) must[static_cast<size_t>(n)] = true;
  for (int n : cone) {
    if (!base.has_profile(n)) continue;
    bool rebuild = must[static_cast<size_t>(n)];
    for (int i : plan_.nodes[static_cast<size_t>(n)].inputs) rebuild = rebuild || slot_[static_cast<size_t>(i)] >= 0;
    if (!rebuild) continue;
    slot_[static_cast<size_t>(n)] = static_cast<int32_t>(profiles_.size());
    profiles_.emplace_back();
    build(n);
    if (!differs_from_base(n)) {
      profiles_.pop_back();
      slot_[static_cast<size_t>(n)] = -1;
    }
  }
}

bool FreshnessEngine::differs_from_base(int n) const {
  const std::vector<ProfilePiece>& mine = profiles_[static_cast<size_t>(slot_[static_cast<size_t>(n)])].pieces();
  const std::vector<ProfilePiece>& theirs = base_->profile(n).pieces();
  if (mine.size() != theirs.size()) return true;
  for (size_t i = 0; i < mine.size(); ++i) {
    const ProfilePiece& a = mine[i];
    const ProfilePiece& b = theirs[i];
    if (a.upto != b.upto || a.kind != b.kind || a.via != b.via || (a.kind != Kind::never && a.value != b.value)) {
      return true;
    }
  }
  return false;
}

const Profile& FreshnessEngine::own_profile(int n) const {
  int32_t slot = slot_[static_cast<size_t>(n)];
  return slot >= 0 ? profiles_[static_cast<size_t>(slot)] : base_->profile(n);
}

Profile& FreshnessEngine::profile_to_build(int n) {
  return profiles_[static_cast<size_t>(base_ ? slot_[static_cast<size_t>(n)] : n)];
}

void FreshnessEngine::build(int n) {
  const Node& node = plan_.nodes[static_cast<size_t>(n)];
  if (node.fails) {
    profile_to_build(n).push({kForever, 0, -1, Kind::never});
  } else if (observed_ && static_cast<size_t>(n) < observed_->size() && (*observed_)[static_cast<size_t>(n)]) {
    build_observed(n, *(*observed_)[static_cast<size_t>(n)]);
  } else if (node.kind == NodeKind::source) {
    build_source(n, lo_, hi_);
  } else {
    build_derived(n);
  }
}

void FreshnessEngine::build_source(int n, int64_t lo, int64_t hi) {
  const Node& node = plan_.nodes[static_cast<size_t>(n)];
  Profile& p = profile_to_build(n);
  const int64_t lands_after = node.lands_after.seconds;
  if (node.stream) {
    p.push({kForever, lands_after, -1, Kind::shifted});
    return;
  }
  // For w in (o_{k-1} - lag, o_k - lag] the first occurrence at or after
  // w + lag is o_k, so E = o_k + lands_after.
  const Calendar& calendar = plan_.calendar(node.calendar);
  const int64_t lag = node.data_lag.seconds;
  int64_t search_from = lo + lag;
  while (true) {
    std::optional<Instant> occurrence = next_occurrence(*node.schedule, *node.zone, calendar, from_unix(search_from));
    if (!occurrence) {
      p.push({kForever, 0, -1, Kind::never});
      return;
    }
    int64_t o = to_unix(*occurrence);
    int64_t upto = o - lag;
    if (upto >= hi) {
      p.push({kForever, o + lands_after, -1, Kind::constant});
      return;
    }
    p.push({upto, o + lands_after, -1, Kind::constant});
    search_from = o + 1;
  }
}

void FreshnessEngine::build_observed(int n, const std::vector<Delivery>& deliveries) {
  // E(w) = min landed_at over deliveries with data_through >= w: for w in
  // (d_{k-1}, d_k] (distinct data_through values, ascending) it is the
  // minimum landed_at over deliveries with data_through >= d_k.
  // An edited copy of the plan shifts every recorded landing by the change of
  // the node's declared lateness (a `delay` edit).
  const Node& node = plan_.nodes[static_cast<size_t>(n)];
  int64_t shift = 0;
  if (base_) {
    const Node& original = base_->plan_.nodes[static_cast<size_t>(n)];
    shift = node.kind == NodeKind::source ? node.lands_after.seconds - original.lands_after.seconds
                                          : node.run_time.seconds - original.run_time.seconds;
  }
  std::vector<Delivery> sorted = deliveries;
  std::sort(sorted.begin(), sorted.end(),
            [](const Delivery& a, const Delivery& b) { return a.data_through < b.data_through; });
  std::vector<ProfilePiece> reversed;
  int64_t best = kForever;
  for (size_t i = sorted.size(); i-- > 0;) {
    best = std::min(best, to_unix(sorted[i].landed_at) + shift);
    int64_t through = to_unix(sorted[i].data_through);
    if (!reversed.empty() && reversed.back().upto == through) {
      reversed.back().value = best;
    } else {
      reversed.push_back({through, best, -1, Kind::constant});
    }
  }
  Profile& p = profile_to_build(n);
  for (size_t i = reversed.size(); i-- > 0;) p.push(reversed[i]);
  p.push({kForever, 0, -1, Kind::never});
}

namespace {

// The max over inputs on one interval (lo, hi] where every input is a single
// piece; emits one or two pieces into `out` (ties: lowest input index).
void combine(const std::vector<const ProfilePiece*>& current, int64_t lo, int64_t hi, Profile* out) {
  int never_via = -1, const_via = -1, shift_via = -1;
  int64_t const_value = 0, shift_value = 0;
  for (size_t i = 0; i < current.size(); ++i) {
    const ProfilePiece& p = *current[i];
    int idx = static_cast<int>(i);
    if (p.kind == Kind::never) {
      if (never_via < 0) never_via = idx;
    } else if (p.kind == Kind::constant) {
      if (const_via < 0 || p.value > const_value) const_via = idx, const_value = p.value;
    } else if (shift_via < 0 || p.value > shift_value) {
      shift_via = idx, shift_value = p.value;
    }
  }
  if (never_via >= 0) return out->push({hi, 0, never_via, Kind::never});
  if (shift_via < 0) return out->push({hi, const_value, const_via, Kind::constant});
  if (const_via < 0) return out->push({hi, shift_value, shift_via, Kind::shifted});
  // Constant C against w + A: the constant is larger for w < C - A, equal at
  // w = C - A (the lower input index wins), smaller after.
  int64_t cross = const_value - shift_value;
  int64_t last_const = const_via < shift_via ? cross : cross - 1;
  if (last_const > lo) out->push({std::min(hi, last_const), const_value, const_via, Kind::constant});
  if (last_const < hi) out->push({hi, shift_value, shift_via, Kind::shifted});
}

}  // namespace

void FreshnessEngine::build_derived(int n) {
  const Node& node = plan_.nodes[static_cast<size_t>(n)];
  const size_t k = node.inputs.size();
  std::vector<const std::vector<ProfilePiece>*> inputs(k);
  for (size_t i = 0; i < k; ++i) inputs[i] = &profile(node.inputs[i]).pieces();
  std::vector<size_t> index(k, 0);
  std::vector<const ProfilePiece*> current(k);
  Profile max_of_inputs;
  int64_t lo = INT64_MIN / 4;
  // Sweep the union of the inputs' breakpoints.
  while (true) {
    int64_t hi = kForever;
    for (size_t i = 0; i < k; ++i) {
      current[i] = &(*inputs[i])[index[i]];
      hi = std::min(hi, current[i]->upto);
    }
    combine(current, lo, hi, &max_of_inputs);
    if (hi >= kForever) break;
    for (size_t i = 0; i < k; ++i) {
      if ((*inputs[i])[index[i]].upto == hi) ++index[i];
    }
    lo = hi;
  }
  Profile& out = profile_to_build(n);
  if (node.trigger) {
    apply_trigger(n, max_of_inputs, &out);
    return;
  }
  const int64_t run_time = node.run_time.seconds;
  for (ProfilePiece p : max_of_inputs.pieces()) {
    if (p.kind != Kind::never) p.value += run_time;
    out.push(p);
  }
}

void FreshnessEngine::apply_trigger(int n, const Profile& m, Profile* out) {
  const Node& node = plan_.nodes[static_cast<size_t>(n)];
  const Calendar& calendar = plan_.calendar(node.calendar);
  const int64_t run_time = node.run_time.seconds;
  auto next = [&](int64_t from) { return next_occurrence(*node.trigger, *node.zone, calendar, from_unix(from)); };
  int64_t lo = INT64_MIN / 4;
  int64_t cached_from = INT64_MIN;
  std::optional<Instant> cached;
  for (const ProfilePiece& p : m.pieces()) {
    const int64_t hi = p.upto;
    const int64_t start = std::max(lo, lo_ - 1);  // w below the queried range never matters
    if (p.kind == Kind::never || hi <= start) {
      // Never stays never; a piece wholly below the queried range is never
      // looked up, so a never placeholder spares its trigger search.
      out->push({hi, 0, p.via, Kind::never});
      lo = hi;
      continue;
    }
    if (p.kind == Kind::constant) {
      // The inputs are complete at p.value; the job starts at its next trigger.
      if (p.value != cached_from) cached = next(p.value), cached_from = p.value;
      if (cached) out->push({hi, to_unix(*cached) + run_time, p.via, Kind::constant});
      else out->push({hi, 0, p.via, Kind::never});
      lo = hi;
      continue;
    }
    // Shifted: inputs complete at w + A for w in (start, hi]; each trigger
    // occurrence o serves the w with w + A in (previous occurrence, o].
    const int64_t shift = p.value;
    int64_t search_from = start + 1 + shift;
    while (true) {
      std::optional<Instant> o = next(search_from);
      if (!o) {
        out->push({hi, 0, p.via, Kind::never});
        break;
      }
      int64_t upto = to_unix(*o) - shift;
      if (upto >= hi || (hi >= kForever && upto >= hi_)) {
        out->push({hi, to_unix(*o) + run_time, p.via, Kind::constant});
        break;
      }
      out->push({upto, to_unix(*o) + run_time, p.via, Kind::constant});
      search_from = to_unix(*o) + 1;
    }
    lo = hi;
  }
}

std::optional<Instant> FreshnessEngine::ready(int node, Instant w) const {
  return profile(node).at(to_unix(w)).ready;
}

std::vector<int> FreshnessEngine::chain(int node, Instant w) const {
  std::vector<int> out;
  int n = node;
  while (true) {
    out.push_back(n);
    Profile::Value v = profile(n).at(to_unix(w));
    if (v.via < 0) break;
    n = plan_.nodes[static_cast<size_t>(n)].inputs[static_cast<size_t>(v.via)];
  }
  std::reverse(out.begin(), out.end());
  return out;
}

size_t FreshnessEngine::own_profile_count() const {
  size_t total = 0;
  for (const Profile& p : profiles_) total += p.pieces().empty() ? 0 : 1;
  return total;
}

size_t FreshnessEngine::piece_count() const {
  size_t total = 0;
  for (const Profile& p : profiles_) total += p.pieces().size();
  return total;
}

}  // namespace readyby
