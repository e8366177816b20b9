#include "forecast/draw_engine.h"

#include <algorithm>
#include <climits>

#include "forecast/random.h"
#include "plan/lineage.h"
#include "time/calendar.h"
#include "time/cron.h"

namespace readyby {

namespace {

enum : uint8_t { kConstant = 0, kShifted = 1, kNever = 2 };
constexpr int64_t kNotReady = INT64_MAX;  // a query's E when never / a missing occurrence's landing
constexpr int64_t kBelow = INT64_MIN / 4;

int32_t local_date(const Zone& zone, int64_t at) {
  return static_cast<int32_t>(date::floor<date::days>(zone.to_local(from_unix(at))).time_since_epoch().count());
}

}  // namespace

struct DrawEngine::Piece {
  int64_t upto;    // covers w in (previous piece's upto, upto]
  int64_t value;   // constant: E; shifted: E = w + value; never: unused
  int32_t origin;  // the node that starts the chain
  uint8_t kind;
};

struct DrawEngine::DrawnNode {
  int node = -1;
  int model = -1;                       // index into LandingModels::models when monitored, else -1
  std::vector<Occurrence> occurrences;  // monitored: the synthesized occurrences, ascending
};

namespace {
struct SweepCursor;
}  // namespace

struct DrawEngine::Scratch {
  std::vector<std::vector<Piece>> profiles;   // per drawn slot
  std::vector<std::vector<int64_t>> landed;   // per drawn slot (monitored): landing per occurrence
  std::vector<Piece> merged, reversed;
  std::vector<int32_t> day_pick;              // whole days: recorded date per dates_ entry, INT32_MIN none
  std::vector<int64_t> ready;                 // per query
  std::vector<int32_t> origin;                // per query
  std::vector<int32_t> run_origins;
  std::vector<const std::vector<Piece>*> inputs;
  std::vector<SweepCursor> sweep;
  std::vector<const Piece*> current;
};

namespace {

using Piece = DrawEngine::Piece;

inline __attribute__((always_inline)) void push(std::vector<Piece>& p, const Piece& x) {
  if (!p.empty()) {
    Piece& last = p.back();
    if (last.kind == x.kind && last.origin == x.origin && (x.kind == kNever || last.value == x.value)) {
      last.upto = x.upto;
      return;
    }
  }
  p.push_back(x);
}

// The max over inputs on (lo, hi] where each input is one piece; ties go to
// the lowest input index (DESIGN §4), as in engine/freshness.cpp.
void combine(const std::vector<const Piece*>& current, int64_t lo, int64_t hi, std::vector<Piece>& out) {
  int never_i = -1, const_i = -1, shift_i = -1;
  int64_t const_value = 0, shift_value = 0;
  for (size_t i = 0; i < current.size(); ++i) {
    const Piece& p = *current[i];
    const int idx = static_cast<int>(i);
    if (p.kind == kNever) {
      if (never_i < 0) never_i = idx;
    } else if (p.kind == kConstant) {
      if (const_i < 0 || p.value > const_value) const_i = idx, const_value = p.value;
    } else if (shift_i < 0 || p.value > shift_value) {
      shift_i = idx, shift_value = p.value;
    }
  }
  if (never_i >= 0) return push(out, {hi, 0, current[static_cast<size_t>(never_i)]->origin, kNever});
  if (shift_i < 0) return push(out, {hi, const_value, current[static_cast<size_t>(const_i)]->origin, kConstant});
  if (const_i < 0) return push(out, {hi, shift_value, current[static_cast<size_t>(shift_i)]->origin, kShifted});
  // Constant C against w + A: C is larger for w < C - A; at w = C - A the lower index wins.
  const int64_t cross = const_value - shift_value;
  const int64_t last_const = const_i < shift_i ? cross : cross - 1;
  if (last_const > lo) {
    push(out, {std::min(hi, last_const), const_value, current[static_cast<size_t>(const_i)]->origin, kConstant});
  }
  if (last_const < hi) push(out, {hi, shift_value, current[static_cast<size_t>(shift_i)]->origin, kShifted});
}

}  // namespace

DrawEngine::DrawEngine(const Plan& plan, const LandingModels& models, std::vector<ForecastTarget> targets)
    : plan_(plan), models_(models), targets_(std::move(targets)) {
  compile_queries();
  compile_cone();
  compile_whole_days();
  build_fixed_profiles();
  evaluate_fixed_runs();
}

DrawEngine::~DrawEngine() = default;

void DrawEngine::compile_queries() {
  struct Wanted {
    int feature;
    int64_t w;
  };
  std::vector<Wanted> wanted;
  int64_t latest_run = INT64_MIN;
  for (size_t t = 0; t < targets_.size(); ++t) {
    run_base_.push_back(run_at_.size());
    for (Instant r : targets_[t].runs) {
      run_target_.push_back(static_cast<uint32_t>(t));
      run_at_.push_back(to_unix(r));
      latest_run = std::max(latest_run, to_unix(r));
      for (const TargetInput& in : targets_[t].inputs) wanted.push_back({in.feature, to_unix(r) - in.age_seconds});
    }
  }
  auto before = [](const Wanted& a, const Wanted& b) { return a.feature != b.feature ? a.feature < b.feature : a.w < b.w; };
  std::vector<Wanted> queries = wanted;
  std::sort(queries.begin(), queries.end(), before);
  queries.erase(std::unique(queries.begin(), queries.end(),
                            [](const Wanted& a, const Wanted& b) { return a.feature == b.feature && a.w == b.w; }),
                queries.end());
  w_lo_ = INT64_MAX;
  w_hi_ = INT64_MIN;
  for (const Wanted& q : queries) {
    query_w_.push_back(q.w);
    query_feature_.push_back(q.feature);
    w_lo_ = std::min(w_lo_, q.w);
    w_hi_ = std::max(w_hi_, q.w);
    if (feature_queries_.empty() || feature_queries_.back().first != q.feature) {
      const uint32_t at = static_cast<uint32_t>(query_w_.size() - 1);
      feature_queries_.push_back({q.feature, {at, at}});
    }
    feature_queries_.back().second.second = static_cast<uint32_t>(query_w_.size());
  }
  if (queries.empty()) w_lo_ = w_hi_ = latest_run = 0;
  horizon_ = latest_run + 2 * kSecondsPerDay;
  // Each run input's query.
  size_t k = 0;
  for (size_t run = 0; run < run_at_.size(); ++run) {
    run_input_begin_.push_back(static_cast<uint32_t>(run_inputs_.size()));
    for (const TargetInput& in : targets_[run_target_[run]].inputs) {
      auto it = std::lower_bound(queries.begin(), queries.end(), wanted[k++], before);
      run_inputs_.push_back({static_cast<uint32_t>(it - queries.begin()), in.optional});
    }
  }
  run_input_begin_.push_back(static_cast<uint32_t>(run_inputs_.size()));
}

void DrawEngine::compile_cone() {
  const size_t n_nodes = plan_.nodes.size();
  in_cone_.assign(n_nodes, 0);
  std::vector<int> stack;
  for (const auto& fq : feature_queries_) stack.push_back(fq.first);
  while (!stack.empty()) {
    const int n = stack.back();
    stack.pop_back();
    if (in_cone_[static_cast<size_t>(n)]) continue;
    in_cone_[static_cast<size_t>(n)] = 1;
    if (models_.by_node[static_cast<size_t>(n)] >= 0) continue;  // a monitored node's inputs do not matter
    for (int i : plan_.nodes[static_cast<size_t>(n)].inputs) stack.push_back(i);
  }
  drawn_slot_.assign(n_nodes, -1);
  triggers_.resize(n_nodes);
  fixed_profiles_.resize(n_nodes);
  for (int n : Lineage::of(plan_).topological_order()) {
    const size_t u = static_cast<size_t>(n);
    if (!in_cone_[u]) continue;
    const Node& node = plan_.nodes[u];
    const int model = models_.by_node[u];
    bool drawn = model >= 0;
    if (!drawn) {
      for (int i : node.inputs) drawn = drawn || drawn_slot_[static_cast<size_t>(i)] >= 0;
    }
    if (model < 0 && node.kind != NodeKind::source && node.trigger) {
      // A cron trigger's instants from a day before the window to the first past the horizon.
      TriggerList& list = triggers_[u];
      list.listed_from = w_lo_ - kSecondsPerDay;
      const Calendar& calendar = plan_.calendar(node.calendar);
      Instant search = from_unix(list.listed_from);
      while (true) {
        std::optional<Instant> o = next_occurrence(*node.trigger, *node.zone, calendar, search);
        if (!o) {
          list.exhausted = true;
          break;
        }
        list.at.push_back(to_unix(*o));
        if (to_unix(*o) > horizon_) break;
        search = *o + Seconds(1);
      }
    }
    if (!drawn) {
      fixed_order_.push_back(n);
      continue;
    }
    drawn_slot_[u] = static_cast<int32_t>(drawn_nodes_.size());
    drawn_order_.push_back(n);
    auto d = std::make_unique<DrawnNode>();
    d->node = n;
    d->model = model;
    if (model >= 0) {
      const LandingModel& m = models_.models[static_cast<size_t>(model)];
      int extra = -1;  // occurrences past the last query's, once it is reached
      auto add = [&](int64_t at, int64_t data_end) {
        d->occurrences.push_back({at, data_end, 0, 0, static_cast<uint8_t>(m.weekday_of(from_unix(at)))});
        if (extra < 0 && data_end >= w_hi_) extra = 0;
        else if (extra >= 0) ++extra;
        return extra < kExtraOccurrences;
      };
      if (m.basis == OffsetBasis::schedule) {
        const Cron& cron = *own_schedule(node);
        const Calendar& calendar = plan_.calendar(node.calendar);
        Instant search = from_unix(w_lo_ + m.data_lag_seconds);
        while (true) {
          std::optional<Instant> o = next_occurrence(cron, *node.zone, calendar, search);
          if (!o || !add(to_unix(*o), to_unix(*o) - m.data_lag_seconds)) break;
          search = *o + Seconds(1);
        }
      } else {
        const int64_t c = m.cadence_seconds, anchor = to_unix(m.anchor);
        int64_t k = (w_lo_ - anchor) / c;
        if (anchor + k * c < w_lo_) ++k;
        while (add(anchor + k * c, anchor + k * c)) ++k;
      }
    }
    drawn_nodes_.push_back(std::move(d));
  }
}

void DrawEngine::compile_whole_days() {
  const Zone& zone = *plan_.zone;
  for (auto& d : drawn_nodes_) {
    for (Occurrence& o : d->occurrences) dates_.push_back(local_date(zone, o.at));
  }
  std::sort(dates_.begin(), dates_.end());
  dates_.erase(std::unique(dates_.begin(), dates_.end()), dates_.end());
  for (auto& d : drawn_nodes_) {
    int32_t previous = INT32_MIN;
    uint16_t count = 0;
    for (Occurrence& o : d->occurrences) {
      const int32_t day = local_date(zone, o.at);
      count = day == previous ? static_cast<uint16_t>(count + 1) : 0;
      previous = day;
      o.date = static_cast<int32_t>(std::lower_bound(dates_.begin(), dates_.end(), day) - dates_.begin());
      o.in_date = count;
    }
  }
  std::vector<int32_t> recorded;
  day_outcomes_.resize(models_.models.size());
  for (size_t m = 0; m < models_.models.size(); ++m) {
    DayOutcomes& days = day_outcomes_[m];
    for (const HistoricalOccurrence& h : models_.models[m].history) {
      const int32_t day = local_date(zone, to_unix(h.at));
      if (days.dates.empty() || days.dates.back() != day) {
        days.dates.push_back(day);
        days.begin.push_back(static_cast<uint32_t>(days.outcomes.size()));
        recorded.push_back(day);
      }
      days.outcomes.push_back(h.outcome);
    }
    days.begin.push_back(static_cast<uint32_t>(days.outcomes.size()));
  }
  std::sort(recorded.begin(), recorded.end());
  recorded.erase(std::unique(recorded.begin(), recorded.end()), recorded.end());
  for (int32_t day : recorded) {
    recorded_dates_by_weekday_[static_cast<size_t>(weekday_of(LocalDays(date::days(day))))].push_back(day);
  }
}

namespace {

// A cron source's declared profile over queries in [lo, hi], as
// engine/freshness.cpp builds it: for w in (o_{k-1} - lag, o_k - lag],
// E = o_k + lands_after; a stream is E = w + lands_after.
void source_profile(const Plan& plan, int n, int64_t lo, int64_t hi, std::vector<Piece>& p) {
  const Node& node = plan.nodes[static_cast<size_t>(n)];
  const int64_t lands_after = node.lands_after.seconds;
  if (node.stream) return push(p, {kForever, lands_after, n, kShifted});
  const Calendar& calendar = plan.calendar(node.calendar);
  const int64_t lag = node.data_lag.seconds;
  int64_t search_from = lo + lag;
  while (true) {
    std::optional<Instant> o = next_occurrence(*node.schedule, *node.zone, calendar, from_unix(search_from));
    if (!o) return push(p, {kForever, 0, n, kNever});
    const int64_t at = to_unix(*o), upto = at - lag;
    if (upto >= hi) return push(p, {kForever, at + lands_after, n, kConstant});
    push(p, {upto, at + lands_after, n, kConstant});
    search_from = at + 1;
  }
}

// A monitored node's profile from its synthetic landings (kNotReady:
// missing): E(w) is the earliest landing among occurrences whose data
// reaches w, never past the last one.
void observed_profile(int n, const std::vector<DrawEngine::Occurrence>& occurrences, const std::vector<int64_t>& landed,
                      std::vector<Piece>& reversed, std::vector<Piece>& p) {
  reversed.clear();
  reversed.push_back({kForever, 0, n, kNever});
  int64_t best = kNotReady;
  for (size_t j = occurrences.size(); j-- > 0;) {
    best = std::min(best, landed[j]);
    if (best == kNotReady) reversed.push_back({occurrences[j].data_end, 0, n, kNever});
    else reversed.push_back({occurrences[j].data_end, best, n, kConstant});
  }
  for (size_t i = reversed.size(); i-- > 0;) push(p, reversed[i]);
}

// One input's position in a merge sweep.
struct SweepCursor {
  const Piece* at;
  const Piece* last;  // the final piece (upto kForever)
};

// The first piece at or after `from` that reaches `w` (galloping, then binary
// search); the final piece reaches every w.
const Piece* piece_reaching(const Piece* from, const Piece* last, int64_t w) {
  if (from->upto >= w) return from;
  size_t step = 1;
  const Piece* below = from;  // known to end before w
  while (true) {
    const Piece* probe = below + step > last ? last : below + step;
    if (probe->upto >= w) {
      return std::lower_bound(below + 1, probe + 1, w, [](const Piece& p, int64_t x) { return p.upto < x; });
    }
    below = probe;
    step *= 2;
  }
}

// The max over the inputs' profiles, by one sweep of their breakpoints. E is
// non-decreasing in w (for w past the queried range's start), so when one
// input's constant piece beats every other input's value at that piece's
// end, it beats them on the whole piece: the sweep then jumps to its end
// instead of visiting the others' breakpoints one by one (an hourly feed
// under a daily one costs one step a day, not 24). A piece found not to
// dominate is not tried again.
void max_of_inputs(const std::vector<const std::vector<Piece>*>& inputs, int64_t jump_from,
                   std::vector<SweepCursor>& cursor, std::vector<const Piece*>& current, std::vector<Piece>& out) {
  const size_t k = inputs.size();
  cursor.resize(k);
  current.resize(k);
  for (size_t i = 0; i < k; ++i) cursor[i] = {inputs[i]->data(), inputs[i]->data() + inputs[i]->size() - 1};
  SweepCursor* const c = cursor.data();
  int64_t lo = kBelow;
  const Piece* refused = nullptr;
  while (true) {
    int64_t hi = c[0].at->upto;
    const Piece* best = c[0].at;  // the first largest value
    bool constants = best->kind == kConstant;
    for (size_t i = 1; i < k; ++i) {
      const Piece* p = c[i].at;
      hi = std::min(hi, p->upto);
      constants = constants && p->kind == kConstant;
      if (p->value > best->value) best = p;
    }
    if (!constants) {
      for (size_t i = 0; i < k; ++i) current[i] = c[i].at;
      combine(current, lo, hi, out);
    } else {
      if (best->upto > hi && best->upto < kForever && best != refused && lo >= jump_from) {
        // Does `best` dominate every other input up to its end? Values only grow with w.
        size_t d = 0;
        while (c[d].at != best) ++d;
        const int64_t end = best->upto, value = best->value;
        bool dominates = true;
        for (size_t j = 0; j < k && dominates; ++j) {
          if (j == d) continue;
          const Piece* p = piece_reaching(c[j].at, c[j].last, end);
          if (p->kind == kNever) {
            dominates = false;
          } else {
            const int64_t v = p->kind == kConstant ? p->value : end + p->value;
            dominates = j < d ? v < value : v <= value;
          }
        }
        if (dominates) {
          push(out, {end, value, best->origin, kConstant});
          for (size_t j = 0; j < k; ++j) {
            c[j].at = piece_reaching(c[j].at, c[j].last, end);
            if (c[j].at->upto == end) ++c[j].at;
          }
          lo = end;
          continue;
        }
        refused = best;
      }
      push(out, {hi, best->value, best->origin, kConstant});
    }
    if (hi >= kForever) return;
    for (size_t i = 0; i < k; ++i) {
      if (c[i].at->upto == hi) ++c[i].at;
    }
    lo = hi;
  }
}

}  // namespace

// The first trigger instant at or after `v`, from the precomputed list.
struct DrawEngine::TriggerHit {
  enum State : uint8_t { found, never, past_horizon } state;
  int64_t at;  // found: the instant; past_horizon: `v`, a lower bound past the horizon
};

DrawEngine::TriggerHit DrawEngine::next_trigger(int n, int64_t v) const {
  const TriggerList& list = triggers_[static_cast<size_t>(n)];
  if (v < list.listed_from) {
    // Not expected (E(w) >= w for every queried w), but exact if it happens.
    const Node& node = plan_.nodes[static_cast<size_t>(n)];
    std::optional<Instant> o = next_occurrence(*node.trigger, *node.zone, plan_.calendar(node.calendar), from_unix(v));
    return o ? TriggerHit{TriggerHit::found, to_unix(*o)} : TriggerHit{TriggerHit::never, 0};
  }
  auto it = std::lower_bound(list.at.begin(), list.at.end(), v);
  if (it != list.at.end()) return {TriggerHit::found, *it};
  if (list.exhausted) return {TriggerHit::never, 0};
  return {TriggerHit::past_horizon, v};
}

// A derived node from its inputs' maximum `m`: plus run_time, or through its
// cron trigger (as engine/freshness.cpp's apply_trigger).
void DrawEngine::derive(int n, const std::vector<Piece>& m, std::vector<Piece>& out) const {
  const Node& node = plan_.nodes[static_cast<size_t>(n)];
  const int64_t run_time = node.run_time.seconds;
  if (!node.trigger) {
    for (Piece p : m) {
      if (p.kind != kNever) p.value += run_time;
      push(out, p);
    }
    return;
  }
  int64_t lo = kBelow;
  for (const Piece& p : m) {
    const int64_t hi = p.upto;
    const int64_t start = std::max(lo, w_lo_ - 1);  // w below the queried range is never looked up
    lo = hi;
    if (p.kind == kNever || hi <= start) {
      push(out, {hi, 0, p.origin, kNever});
      continue;
    }
    if (p.kind == kConstant) {
      const TriggerHit t = next_trigger(n, p.value);
      if (t.state == TriggerHit::never) push(out, {hi, 0, p.origin, kNever});
      else push(out, {hi, t.at + run_time, p.origin, kConstant});
      continue;
    }
    // Shifted: inputs complete at w + A; trigger instant o serves the w with
    // w + A in (previous instant, o].
    const int64_t shift = p.value;
    int64_t search_from = start + 1 + shift;
    while (true) {
      const TriggerHit t = next_trigger(n, search_from);
      if (t.state == TriggerHit::never) {
        push(out, {hi, 0, p.origin, kNever});
        break;
      }
      const int64_t upto = t.at - shift;
      if (t.state == TriggerHit::past_horizon || upto >= hi || (hi >= kForever && upto >= w_hi_)) {
        push(out, {hi, t.at + run_time, p.origin, kConstant});
        break;
      }
      push(out, {upto, t.at + run_time, p.origin, kConstant});
      search_from = t.at + 1;
    }
  }
}

const std::vector<Piece>& DrawEngine::profile_of(int n, const Scratch* s) const {
  const int32_t slot = drawn_slot_[static_cast<size_t>(n)];
  return slot >= 0 ? s->profiles[static_cast<size_t>(slot)] : fixed_profiles_[static_cast<size_t>(n)];
}

// Builds node n's profile into `out` (fixed nodes: s may be null).
void DrawEngine::build(int n, Scratch* s, std::vector<Piece>& out) const {
  out.clear();
  const Node& node = plan_.nodes[static_cast<size_t>(n)];
  const int32_t slot = drawn_slot_[static_cast<size_t>(n)];
  if (slot >= 0 && drawn_nodes_[static_cast<size_t>(slot)]->model >= 0) {
    observed_profile(n, drawn_nodes_[static_cast<size_t>(slot)]->occurrences, s->landed[static_cast<size_t>(slot)],
                     s->reversed, out);
    return;
  }
  if (node.kind == NodeKind::source) return source_profile(plan_, n, w_lo_, w_hi_, out);
  if (node.inputs.size() == 1) return derive(n, profile_of(node.inputs[0], s), out);
  s->inputs.clear();
  for (int i : node.inputs) s->inputs.push_back(&profile_of(i, s));
  s->merged.clear();
  max_of_inputs(s->inputs, w_lo_ - 1, s->sweep, s->current, s->merged);
  derive(n, s->merged, out);
}

void DrawEngine::ScratchDelete::operator()(Scratch* s) const { delete s; }

DrawEngine::ScratchPtr DrawEngine::make_scratch() const {
  ScratchPtr s(new Scratch);
  s->profiles.resize(drawn_nodes_.size());
  s->landed.resize(drawn_nodes_.size());
  for (size_t i = 0; i < drawn_nodes_.size(); ++i) s->landed[i].resize(drawn_nodes_[i]->occurrences.size());
  s->day_pick.resize(dates_.size());
  s->ready = fixed_ready_;
  s->origin = fixed_origin_;
  return s;
}

void DrawEngine::build_fixed_profiles() {
  Scratch s;
  for (int n : fixed_order_) build(n, &s, fixed_profiles_[static_cast<size_t>(n)]);
}

// Answers the queries of feature `f` by one walk along its profile.
void DrawEngine::answer(size_t feature_range, const std::vector<Piece>& profile, std::vector<int64_t>& ready,
                        std::vector<int32_t>& origin) const {
  const auto [begin, end] = feature_queries_[feature_range].second;
  size_t i = 0;
  for (uint32_t q = begin; q < end; ++q) {
    const int64_t w = query_w_[q];
    while (profile[i].upto < w) ++i;
    const Piece& p = profile[i];
    ready[q] = p.kind == kConstant ? p.value : p.kind == kShifted ? w + p.value : kNotReady;
    origin[q] = p.origin;
  }
}

// Whether `run` is on time with answers `ready`; else appends to `origins`
// the distinct origins of the inputs that decided it (the non-optional late
// ones when it fails, else the optional late ones).
bool DrawEngine::judge(size_t run, const std::vector<int64_t>& ready, const std::vector<int32_t>& origin,
                       std::vector<int32_t>& origins, bool skip_sure) const {
  const int64_t at = run_at_[run];
  origins.clear();
  size_t required_late = 0;  // origins[0, required_late): of late non-optional inputs; the rest: optional ones
  bool degraded = false;
  for (uint32_t k = run_input_begin_[run]; k < run_input_begin_[run + 1]; ++k) {
    const auto [q, optional] = run_inputs_[k];
    if (ready[q] <= at || (skip_sure && sure_on_time_[k])) continue;
    const int32_t o = origin[q];
    if (!optional) {
      if (std::find(origins.begin(), origins.begin() + static_cast<std::ptrdiff_t>(required_late), o) !=
          origins.begin() + static_cast<std::ptrdiff_t>(required_late)) {
        continue;
      }
      origins.insert(origins.begin() + static_cast<std::ptrdiff_t>(required_late), o);
      ++required_late;
    } else {
      degraded = true;
      if (std::find(origins.begin() + static_cast<std::ptrdiff_t>(required_late), origins.end(), o) == origins.end()) {
        origins.push_back(o);
      }
    }
  }
  if (required_late > 0) {
    origins.resize(required_late);
    return false;
  }
  return !degraded;
}

void DrawEngine::evaluate_fixed_runs() {
  fixed_ready_.assign(query_w_.size(), 0);
  fixed_origin_.assign(query_w_.size(), -1);
  std::vector<uint8_t> feature_drawn(plan_.nodes.size(), 0);
  for (size_t f = 0; f < feature_queries_.size(); ++f) {
    const int feature = feature_queries_[f].first;
    if (drawn_slot_[static_cast<size_t>(feature)] >= 0) {
      feature_drawn[static_cast<size_t>(feature)] = 1;
      drawn_features_.push_back(f);
    } else {
      answer(f, fixed_profiles_[static_cast<size_t>(feature)], fixed_ready_, fixed_origin_);
    }
  }
  drawn_index_.assign(run_at_.size(), -1);
  fixed_ok_.assign(run_at_.size(), 1);
  fixed_origins_.resize(run_at_.size());
  std::vector<int32_t> origins;
  for (size_t run = 0; run < run_at_.size(); ++run) {
    bool drawn = false;
    for (uint32_t k = run_input_begin_[run]; k < run_input_begin_[run + 1] && !drawn; ++k) {
      drawn = feature_drawn[static_cast<size_t>(query_feature_[run_inputs_[k].first])] != 0;
    }
    if (drawn) {
      drawn_index_[run] = static_cast<int32_t>(drawn_runs_.size());
      drawn_runs_.push_back(static_cast<uint32_t>(run));
      continue;
    }
    if (judge(run, fixed_ready_, fixed_origin_, origins)) continue;
    fixed_ok_[run] = 0;
    fixed_origins_[run].assign(origins.begin(), origins.end());
  }
  classify_drawn_runs(feature_drawn);
}

// Every landing of every draw lies between each monitored node's earliest
// recorded offset and its latest (or missing, when it has ever been missing),
// and E only grows with any landing. So the answers with all landings at
// their earliest are lower bounds for every draw, with all at their latest
// upper bounds: an input late even then is late in every draw, one on time
// even then is on time in every draw.
void DrawEngine::bound_answers(bool earliest, std::vector<int64_t>& ready) const {
  ScratchPtr s = make_scratch();
  for (size_t slot = 0; slot < drawn_nodes_.size(); ++slot) {
    const DrawnNode& d = *drawn_nodes_[slot];
    if (d.model < 0) continue;
    int64_t low = INT64_MAX, high = INT64_MIN;
    bool missing = false;
    for (const HistoricalOccurrence& h : models_.models[static_cast<size_t>(d.model)].history) {
      if (h.outcome == kMissingOccurrence) {
        missing = true;
        continue;
      }
      low = std::min(low, h.outcome);
      high = std::max(high, h.outcome);
    }
    const bool never = earliest ? low == INT64_MAX : (missing || high == INT64_MIN);
    for (size_t j = 0; j < d.occurrences.size(); ++j) {
      const Occurrence& o = d.occurrences[j];
      s->landed[slot][j] = never ? kNotReady : std::max(o.at + (earliest ? low : high), o.data_end);
    }
  }
  for (size_t slot = 0; slot < drawn_order_.size(); ++slot) build(drawn_order_[slot], s.get(), s->profiles[slot]);
  for (size_t f : drawn_features_) {
    answer(f, s->profiles[static_cast<size_t>(drawn_slot_[static_cast<size_t>(feature_queries_[f].first)])], s->ready,
           s->origin);
  }
  ready = s->ready;
}

void DrawEngine::classify_drawn_runs(const std::vector<uint8_t>& feature_drawn) {
  std::vector<int64_t> earliest, latest;
  bound_answers(true, earliest);
  bound_answers(false, latest);
  sure_on_time_.assign(run_inputs_.size(), 0);
  std::vector<uint8_t> node_live(plan_.nodes.size(), 0);
  for (size_t i = 0; i < drawn_runs_.size(); ++i) {
    const uint32_t run = drawn_runs_[i];
    const int64_t at = run_at_[run];
    bool doomed = false, settled = true;
    for (uint32_t k = run_input_begin_[run]; k < run_input_begin_[run + 1]; ++k) {
      const auto [q, optional] = run_inputs_[k];
      const bool drawn = feature_drawn[static_cast<size_t>(query_feature_[q])] != 0;
      const int64_t low = drawn ? earliest[q] : fixed_ready_[q], high = drawn ? latest[q] : fixed_ready_[q];
      if (high <= at) sure_on_time_[k] = 1;
      else settled = false;
      if (low > at && !optional) doomed = true;
    }
    doomed_.push_back(doomed ? 1 : settled ? 2 : 0);
    if (doomed) ++doomed_count_;
    if (doomed || settled) continue;
    live_runs_.push_back(static_cast<uint32_t>(i));
    for (uint32_t k = run_input_begin_[run]; k < run_input_begin_[run + 1]; ++k) {
      if (!sure_on_time_[k]) node_live[static_cast<size_t>(query_feature_[run_inputs_[k].first])] = 1;
    }
  }
  for (size_t slot = drawn_order_.size(); slot-- > 0;) {
    const int n = drawn_order_[slot];
    if (!node_live[static_cast<size_t>(n)] || drawn_nodes_[slot]->model >= 0) continue;
    for (int i : plan_.nodes[static_cast<size_t>(n)].inputs) node_live[static_cast<size_t>(i)] = 1;
  }
  for (size_t slot = 0; slot < drawn_order_.size(); ++slot) {
    if (node_live[static_cast<size_t>(drawn_order_[slot])]) live_slots_.push_back(static_cast<uint32_t>(slot));
  }
  for (size_t f : drawn_features_) {
    if (node_live[static_cast<size_t>(feature_queries_[f].first)]) live_features_.push_back(f);
  }
  for (int pass = 0; pass < 2; ++pass) {
    for (size_t slot = 0; slot < drawn_nodes_.size(); ++slot) {
      if (drawn_nodes_[slot]->model < 0 || (node_live[static_cast<size_t>(drawn_order_[slot])] != 0) != (pass == 0)) continue;
      sample_order_.push_back(static_cast<uint32_t>(slot));
    }
    if (pass == 0) live_monitored_ = sample_order_.size();
  }
}

OutcomeTables OutcomeTables::fitted(const LandingModels& models) {
  OutcomeTables out;
  for (const LandingModel& m : models.models) {
    // Group 0 is the pooled distribution; a per-weekday model adds one group
    // per scheduled weekday (other weekdays fall back to the pooled one).
    NodeTables t;
    std::vector<int64_t> pooled;
    for (const HistoricalOccurrence& h : m.history) pooled.push_back(h.outcome);
    if (pooled.empty()) pooled.push_back(kMissingOccurrence);
    t.groups.push_back(std::move(pooled));
    for (int d = 0; d < 7 && m.by_weekday; ++d) {
      if (m.weekdays[static_cast<size_t>(d)].occurrences == 0) continue;
      t.group_of_weekday[static_cast<size_t>(d)] = static_cast<uint8_t>(t.groups.size());
      t.groups.push_back(m.outcomes_for(d));
    }
    out.nodes.push_back(std::move(t));
  }
  return out;
}

OutcomeTables OutcomeTables::resampled(std::mt19937_64& rng) const {
  OutcomeTables out = *this;
  for (size_t n = 0; n < nodes.size(); ++n) {
    for (size_t g = 0; g < nodes[n].groups.size(); ++g) {
      const std::vector<int64_t>& from = nodes[n].groups[g];
      std::vector<int64_t>& to = out.nodes[n].groups[g];
      for (size_t i = 0; i < to.size(); ++i) to[i] = from[uniform_below(rng, from.size())];
    }
  }
  return out;
}

void DrawEngine::sample(const OutcomeTables& tables, DrawMode mode, std::mt19937_64& rng, Scratch* s,
                        bool full) const {
  const bool whole_days = mode == DrawMode::whole_days;
  if (whole_days) {
    for (size_t i = 0; i < dates_.size(); ++i) {
      const auto& candidates = recorded_dates_by_weekday_[static_cast<size_t>(weekday_of(LocalDays(date::days(dates_[i]))))];
      s->day_pick[i] = candidates.empty() ? INT32_MIN : candidates[uniform_below(rng, candidates.size())];
    }
  }
  // Live nodes first, so that a draw gives them the same outcomes whether or
  // not it samples the others.
  const size_t count = full ? sample_order_.size() : live_monitored_;
  for (size_t i = 0; i < count; ++i) {
    const size_t slot = sample_order_[i];
    const DrawnNode& d = *drawn_nodes_[slot];
    const OutcomeTables::NodeTables& t = tables.nodes[static_cast<size_t>(d.model)];
    const DayOutcomes& days = day_outcomes_[static_cast<size_t>(d.model)];
    std::vector<int64_t>& landed = s->landed[slot];
    for (size_t j = 0; j < d.occurrences.size(); ++j) {
      const Occurrence& o = d.occurrences[j];
      int64_t outcome = 0;
      bool chosen = false;
      if (whole_days && s->day_pick[static_cast<size_t>(o.date)] != INT32_MIN) {
        auto it = std::lower_bound(days.dates.begin(), days.dates.end(), s->day_pick[static_cast<size_t>(o.date)]);
        if (it != days.dates.end() && *it == s->day_pick[static_cast<size_t>(o.date)]) {
          const size_t at = static_cast<size_t>(it - days.dates.begin());
          if (days.begin[at] + o.in_date < days.begin[at + 1]) {
            outcome = days.outcomes[days.begin[at] + o.in_date];
            chosen = true;
          }
        }
      }
      if (!chosen) {
        const std::vector<int64_t>& group = t.groups[t.group_of_weekday[o.weekday]];
        outcome = group[uniform_below(rng, group.size())];
      }
      landed[j] = outcome == kMissingOccurrence ? kNotReady : std::max(o.at + outcome, o.data_end);
    }
  }
}

void DrawEngine::run_draw(const OutcomeTables& tables, DrawMode mode, uint64_t draw_seed, Scratch* s,
                          DrawResult* result, bool full) const {
  result->ok.assign(drawn_runs_.size(), 0);
  result->late_origins.clear();
  if (!full && live_runs_.empty()) {
    for (size_t i = 0; i < drawn_runs_.size(); ++i) result->ok[i] = doomed_[i] == 2;
    return;
  }
  std::mt19937_64 rng(draw_seed);
  sample(tables, mode, rng, s, full);
  auto judge_drawn = [&](size_t i) {
    if (judge(drawn_runs_[i], s->ready, s->origin, s->run_origins, !full)) {
      result->ok[i] = 1;
      return;
    }
    for (int32_t o : s->run_origins) result->late_origins.push_back({static_cast<int32_t>(i), o});
  };
  if (full) {
    for (size_t slot = 0; slot < drawn_order_.size(); ++slot) build(drawn_order_[slot], s, s->profiles[slot]);
    for (size_t f : drawn_features_) answer(f, s->profiles[static_cast<size_t>(drawn_slot_[static_cast<size_t>(feature_queries_[f].first)])], s->ready, s->origin);
    for (size_t i = 0; i < drawn_runs_.size(); ++i) judge_drawn(i);
    return;
  }
  for (size_t i = 0; i < drawn_runs_.size(); ++i) result->ok[i] = doomed_[i] == 2;  // settled on time
  for (uint32_t slot : live_slots_) build(drawn_order_[slot], s, s->profiles[slot]);
  for (size_t f : live_features_) answer(f, s->profiles[static_cast<size_t>(drawn_slot_[static_cast<size_t>(feature_queries_[f].first)])], s->ready, s->origin);
  for (uint32_t i : live_runs_) judge_drawn(i);
}

ObservedDeliveries DrawEngine::deliveries(const OutcomeTables& tables, DrawMode mode, uint64_t draw_seed) const {
  ScratchPtr s = make_scratch();
  std::mt19937_64 rng(draw_seed);
  sample(tables, mode, rng, s.get(), true);
  ObservedDeliveries out(plan_.nodes.size());
  for (size_t slot = 0; slot < drawn_nodes_.size(); ++slot) {
    const DrawnNode& d = *drawn_nodes_[slot];
    if (d.model < 0) continue;
    std::vector<Delivery>& list = out[static_cast<size_t>(d.node)].emplace();
    for (size_t j = 0; j < d.occurrences.size(); ++j) {
      if (s->landed[slot][j] == kNotReady) continue;
      list.push_back({from_unix(s->landed[slot][j]), from_unix(d.occurrences[j].data_end)});
    }
  }
  return out;
}

}  // namespace readyby
