#include "engine/fixes.h"

#include <algorithm>
#include <bit>
#include <climits>
#include <functional>
#include <map>
#include <set>
#include <sstream>

namespace readyby {

const char* to_string(FixKind k) {
  switch (k) {
    case FixKind::land_earlier: return "land-earlier";
    case FixKind::move_start: return "move-start";
    case FixKind::start_later: return "start-later";
  }
  return "?";
}

bool Fix::breaks_others() const {
  return std::any_of(other_changes.begin(), other_changes.end(), [](const RunChange& c) {
    return static_cast<int>(c.after) > static_cast<int>(c.before);
  });
}

// ---------------------------------------------------------------------------
// Moving a cron expression.

namespace {

std::vector<std::string> cron_fields(const std::string& text) {
  std::istringstream in(text);
  std::string first;
  in >> first;
  static const std::map<std::string, std::string> macros = {
      {"@yearly", "0 0 1 1 *"}, {"@annually", "0 0 1 1 *"}, {"@monthly", "0 0 1 * *"},
      {"@weekly", "0 0 * * 0"}, {"@daily", "0 0 * * *"},    {"@midnight", "0 0 * * *"},
      {"@hourly", "0 * * * *"}};
  auto macro = macros.find(first);
  std::istringstream fields(macro != macros.end() ? macro->second : text);
  std::vector<std::string> out;
  std::string f;
  while (fields >> f) out.push_back(f);
  return out;
}

int64_t floor_div(int64_t a, int64_t b) { return a / b - ((a % b != 0) && ((a < 0) != (b < 0))); }

}  // namespace

std::optional<std::string> shifted_cron(const Cron& cron, int64_t minutes, bool has_calendar) {
  std::vector<std::string> fields = cron_fields(cron.text);
  if (fields.size() != 5 || std::popcount(cron.minutes) != 1) return std::nullopt;
  const int minute = std::countr_zero(cron.minutes);
  uint32_t hours = 0;
  int new_minute = 0;
  std::optional<int64_t> carry;
  bool mixed = false;
  for (int h = 0; h < 24; ++h) {
    if (!((cron.hours >> h) & 1)) continue;
    const int64_t t = h * 60 + minute + minutes;
    const int64_t day = floor_div(t, 1440);
    const int64_t in_day = t - day * 1440;
    hours |= 1u << (in_day / 60);
    new_minute = static_cast<int>(in_day % 60);
    if (!carry) carry = day;
    else if (*carry != day) mixed = true;
  }
  if (!carry) return std::nullopt;
  const bool days_free = fields[2] == "*" && fields[3] == "*" && fields[4] == "*";
  if (*carry != 0 || mixed) {
    if (has_calendar) return std::nullopt;
    if (!days_free) {
      if (mixed || fields[2] != "*" || fields[3] != "*") return std::nullopt;
      std::string weekdays;
      for (int d = 0; d < 7; ++d) {
        if (!((cron.weekdays >> d) & 1)) continue;
        const int64_t moved = ((d + *carry) % 7 + 7) % 7;
        weekdays += (weekdays.empty() ? "" : ",") + std::to_string(moved);
      }
      if (weekdays.empty()) return std::nullopt;
      // Keep the list sorted for readability.
      std::vector<int> list;
      std::istringstream in(weekdays);
      for (std::string x; std::getline(in, x, ',');) list.push_back(std::stoi(x));
      std::sort(list.begin(), list.end());
      weekdays.clear();
      for (int d : list) weekdays += (weekdays.empty() ? "" : ",") + std::to_string(d);
      fields[4] = weekdays;
    }
  }
  std::string hour_field;
  if (hours == 0xFFFFFFu) {
    hour_field = "*";
  } else {
    for (int h = 0; h < 24; ++h) {
      if ((hours >> h) & 1) hour_field += (hour_field.empty() ? "" : ",") + std::to_string(h);
    }
  }
  return std::to_string(new_minute) + " " + hour_field + " " + fields[2] + " " + fields[3] + " " + fields[4];
}

// ---------------------------------------------------------------------------
// Re-evaluation with one edit applied. This is the one place that knows how
// an edit changes E: nodes downstream of the edited node are recomputed by
// the DESIGN §4 recursion for each query, every other node is read from the
// evaluation's profiles.

namespace {

class EditTrial {
 public:
  EditTrial(const Plan& plan, const Lineage& lineage, const FreshnessEngine& base, const std::vector<bool>* monitored)
      : plan_(plan), work_(plan), lineage_(lineage), base_(base), monitored_(monitored),
        in_cone_(plan.nodes.size(), false), stamp_(plan.nodes.size(), 0), memo_(plan.nodes.size()) {}

  /// Sets the edit under trial (it must be valid: edit_problem empty).
  /// `runs_shift_seconds`: for a runs edit, how far each run moves.
  void set(const Edit& edit, int64_t runs_shift_seconds = 0) {
    restore();
    edit_ = edit;
    runs_shift_ = runs_shift_seconds;
    // The working copy gets the edit as apply_edits (engine/edit.h) applies it.
    if (edit.kind == EditKind::runs) {
      Model& model = work_.models[static_cast<size_t>(edit.target)];
      RunSpec spec;
      spec.at = *edit.cron;
      model.runs = {spec};
      std::fill(in_cone_.begin(), in_cone_.end(), false);
      cone_node_ = -1;
      return;
    }
    Node& node = work_.nodes[static_cast<size_t>(edit.target)];
    switch (edit.kind) {
      case EditKind::delay: (node.kind == NodeKind::source ? node.lands_after : node.run_time).seconds += edit.seconds; break;
      case EditKind::fail: node.fails = true; break;
      case EditKind::schedule:
        if (node.kind == NodeKind::source) {
          node.schedule = edit.cron;
          node.stream = false;
        } else {
          node.trigger = edit.cron;
        }
        break;
      case EditKind::max_age: node.max_age.seconds = edit.seconds; break;
      case EditKind::runs: break;
    }
    if (edit.target != cone_node_) {
      std::fill(in_cone_.begin(), in_cone_.end(), false);
      std::vector<int> stack = {edit.target};
      in_cone_[static_cast<size_t>(edit.target)] = true;
      while (!stack.empty()) {
        int n = stack.back();
        stack.pop_back();
        for (int c : lineage_.consumers(n)) {
          if (!in_cone_[static_cast<size_t>(c)]) in_cone_[static_cast<size_t>(c)] = true, stack.push_back(c);
        }
      }
      cone_node_ = edit.target;
    }
  }

  /// Whether the edit can change a run of `model`.
  bool affects(int model) const {
    if (edit_.kind == EditKind::runs) return edit_.target == model;
    for (int f : plan_.models[static_cast<size_t>(model)].features) {
      if (in_cone_[static_cast<size_t>(f)]) return true;
    }
    return false;
  }

  /// Where a run scheduled at `at` happens under the edit.
  Instant moved(int model, Instant at) const {
    if (edit_.kind != EditKind::runs || edit_.target != model) return at;
    const Zone& zone = *plan_.models[static_cast<size_t>(model)].zone;
    return zone.from_local(zone.to_local(at) + Seconds(runs_shift_));
  }

  std::optional<Instant> ready(int node, Instant w) {
    ++query_;
    std::optional<int64_t> e = eval(node, to_unix(w));
    if (!e) return std::nullopt;
    return from_unix(*e);
  }

  /// The run scheduled at `at`, evaluated under the edit (DESIGN §4 "A run").
  RunResult run(int model, Instant scheduled) {
    const Model& m = work_.models[static_cast<size_t>(model)];
    const Instant at = moved(model, scheduled);
    RunResult out;
    out.model = model;
    out.at = at;
    bool fail = false, degraded = false;
    for (int f : m.features) {
      const Node& feature = work_.nodes[static_cast<size_t>(f)];
      FeatureResult fr;
      fr.feature = f;
      fr.optional = feature.optional;
      fr.needs_data_through = at - Seconds(feature.max_age.seconds);
      fr.ready_at = ready(f, fr.needs_data_through);
      if (!fr.ready_at) {
        fr.status = FeatureStatus::never;
      } else {
        fr.slack_seconds = (at - *fr.ready_at).count();
        fr.status = fr.slack_seconds >= 0 ? FeatureStatus::ok : FeatureStatus::late;
      }
      if (fr.status != FeatureStatus::ok) (feature.optional ? degraded : fail) = true;
      out.features.push_back(fr);
    }
    out.status = fail ? RunStatus::fail : degraded ? RunStatus::degraded : RunStatus::ok;
    return out;
  }

 private:
  // Undoes the edit on the working copy.
  void restore() {
    if (edit_.target < 0) return;
    if (edit_.kind == EditKind::runs) {
      work_.models[static_cast<size_t>(edit_.target)].runs = plan_.models[static_cast<size_t>(edit_.target)].runs;
    } else {
      work_.nodes[static_cast<size_t>(edit_.target)] = plan_.nodes[static_cast<size_t>(edit_.target)];
    }
    edit_.target = -1;
  }

  bool monitored(int n) const {
    return monitored_ && static_cast<size_t>(n) < monitored_->size() && (*monitored_)[static_cast<size_t>(n)];
  }

  // E_n(w) on the working copy: nodes outside the edited cone from the
  // evaluation's profiles, the others by the recursion of DESIGN §4.
  std::optional<int64_t> eval(int n, int64_t w) {
    const size_t i = static_cast<size_t>(n);
    if (!in_cone_[i]) {
      std::optional<Instant> r = base_.ready(n, from_unix(w));
      return r ? std::optional<int64_t>(to_unix(*r)) : std::nullopt;
    }
    if (stamp_[i] == query_) return memo_[i];
    const Node& node = work_.nodes[i];
    const Node& before = plan_.nodes[i];
    std::optional<int64_t> e;
    if (node.fails) {
      // never lands
    } else if (monitored(n)) {
      // Recorded landings move with the node's lands_after (sources) or
      // run_time (jobs, features), as in the freshness engine.
      std::optional<Instant> r = base_.ready(n, from_unix(w));
      const int64_t shift = node.kind == NodeKind::source ? node.lands_after.seconds - before.lands_after.seconds
                                                          : node.run_time.seconds - before.run_time.seconds;
      if (r) e = to_unix(*r) + shift;
    } else if (node.kind == NodeKind::source) {
      if (node.stream) {
        e = w + node.lands_after.seconds;
      } else {
        std::optional<Instant> s = next_occurrence(*node.schedule, *node.zone, work_.calendar(node.calendar),
                                                   from_unix(w + node.data_lag.seconds));
        if (s) e = to_unix(*s) + node.lands_after.seconds;
      }
    } else {
      std::optional<int64_t> m;
      bool never = false;
      for (int input : node.inputs) {
        std::optional<int64_t> r = eval(input, w);
        if (!r) {
          never = true;
          break;
        }
        m = m ? std::max(*m, *r) : *r;
      }
      if (!never && m) {
        if (node.trigger) {
          std::optional<Instant> c =
              next_occurrence(*node.trigger, *node.zone, work_.calendar(node.calendar), from_unix(*m));
          if (c) e = to_unix(*c) + node.run_time.seconds;
        } else {
          e = *m + node.run_time.seconds;
        }
      }
    }
    stamp_[i] = query_;
    memo_[i] = e;
    return e;
  }

  const Plan& plan_;
  Plan work_;  // the plan with the edit under trial applied
  const Lineage& lineage_;
  const FreshnessEngine& base_;
  const std::vector<bool>* monitored_;
  Edit edit_;
  int64_t runs_shift_ = 0;
  int cone_node_ = -1;
  std::vector<bool> in_cone_;
  uint64_t query_ = 0;
  std::vector<uint64_t> stamp_;
  std::vector<std::optional<int64_t>> memo_;
};

// Only the first guess of the search below: the size printed is the least
// whole number of minutes that re-evaluation finds to clear the pattern, so
// the rounding here changes how many evaluations it takes, never the fix.
int64_t minutes_up(int64_t seconds) { return seconds <= 0 ? 1 : (seconds + 59) / 60; }

// Smallest x in [1, cap] with passes(x) and !passes(x - 1), starting from
// `guess` and doubling until a size passes; nullopt when none up to `cap`
// does. passes(0) is taken to be false (the pattern is not clear unedited).
std::optional<int64_t> minimal_size(const std::function<bool(int64_t)>& passes, int64_t guess, int64_t cap) {
  if (cap < 1) return std::nullopt;
  int64_t lo = 0, hi = 0;
  int64_t x = std::clamp<int64_t>(guess, 1, cap);
  while (true) {
    if (passes(x)) {
      hi = x;
      break;
    }
    lo = x;
    if (x >= cap) return std::nullopt;
    x = std::min(cap, x * 2);
  }
  while (hi - lo > 1) {
    const int64_t mid = lo + (hi - lo) / 2;
    (passes(mid) ? hi : lo) = mid;
  }
  return hi;
}

struct Candidate {
  FixKind kind;
  int node;
  bool later;         // move_start: later (else earlier)
  bool by_schedule;   // land_earlier of a source: move its delivery schedule (else delay)
  int64_t guess_seconds;
  friend bool operator==(const Candidate& a, const Candidate& b) {
    return a.kind == b.kind && a.node == b.node && a.later == b.later && a.by_schedule == b.by_schedule;
  }
};

// The candidate edits a blame suggests, the cause first.
void candidates_from(const Plan& plan, const Blame& b, const std::vector<bool>* monitored,
                     std::vector<Candidate>* out) {
  if (b.cause < 0 || b.kind == CauseKind::never || b.kind == CauseKind::none) return;
  const BlameStep& s = b.steps[static_cast<size_t>(b.cause)];
  auto add = [&](Candidate c) {
    if (std::find(out->begin(), out->end(), c) == out->end()) out->push_back(c);
  };
  auto recorded = [&](int n) {
    return monitored && static_cast<size_t>(n) < monitored->size() && (*monitored)[static_cast<size_t>(n)];
  };
  // A step that must land earlier: a delay while it allows, and for a
  // delivery on a schedule, that schedule moved earlier.
  auto land_earlier = [&](int node, int64_t guess) {
    add({FixKind::land_earlier, node, false, false, guess});
    const Node& n = plan.nodes[static_cast<size_t>(node)];
    if (n.kind == NodeKind::source && n.schedule && !recorded(node)) {
      add({FixKind::land_earlier, node, false, true, guess});
    }
  };
  const int64_t late = s.ready && s.latest ? (*s.ready - *s.latest).count() : 0;
  switch (b.kind) {
    case CauseKind::late_delivery:
    case CauseKind::slow_step:
      land_earlier(s.node, late);
      break;
    case CauseKind::stale_start: {
      const int64_t gap = (*s.input_ready - *s.stale_start).count();
      add({FixKind::move_start, s.node, true, true, gap});
      land_earlier(b.steps[static_cast<size_t>(b.cause - 1)].node, gap);
      break;
    }
    case CauseKind::late_start:
      add({FixKind::move_start, s.node, false, true, s.start && s.start_by ? (*s.start - *s.start_by).count() : late});
      land_earlier(s.node, late);
      break;
    default: break;
  }
}

}  // namespace

// The steps upstream of (or equal to) every one of a pattern's features: the
// only steps whose edit can clear them all. One walk up from each feature,
// counting; the counts are undone on the next use.
class CommonUpstream {
 public:
  explicit CommonUpstream(size_t nodes) : reach_(nodes, 0), seen_(nodes, 0) {}

  void compute(const Lineage& lineage, const std::vector<PatternFeature>& features) {
    for (int n : touched_) reach_[static_cast<size_t>(n)] = 0;
    touched_.clear();
    walks_ = 0;
    for (const PatternFeature& f : features) {
      ++stamp_;
      ++walks_;
      stack_.assign(1, f.feature);
      seen_[static_cast<size_t>(f.feature)] = stamp_;
      while (!stack_.empty()) {
        const int n = stack_.back();
        stack_.pop_back();
        // Only a node every earlier walk reached can still be common.
        uint32_t& r = reach_[static_cast<size_t>(n)];
        if (r + 1 == walks_) {
          r = walks_;
          if (walks_ == 1) touched_.push_back(n);
        }
        for (int in : lineage.inputs(n)) {
          if (seen_[static_cast<size_t>(in)] != stamp_) seen_[static_cast<size_t>(in)] = stamp_, stack_.push_back(in);
        }
      }
    }
  }
  bool contains(int n) const { return walks_ > 0 && reach_[static_cast<size_t>(n)] == walks_; }
  bool any() const {
    return std::any_of(touched_.begin(), touched_.end(), [&](int n) { return contains(n); });
  }

 private:
  std::vector<uint32_t> reach_, seen_;
  uint32_t stamp_ = 0, walks_ = 0;
  std::vector<int> touched_, stack_;  // touched_: upstream of the first feature
};

// ---------------------------------------------------------------------------

struct FixFinder::State {
  const PatternCollector& collector;
  const Plan& plan;
  const Evaluation& ev;
  const Lineage& lineage;
  const std::vector<bool>* monitored;
  mutable EditTrial trial;
  CommonUpstream common;

  explicit State(const PatternCollector& c)
      : collector(c), plan(c.plan()), ev(c.evaluation()), lineage(*c.evaluation().lineage_), monitored(c.monitored()),
        trial(c.plan(), *c.evaluation().lineage_, c.evaluation().engine(), c.monitored()),
        common(c.plan().nodes.size()) {}

  bool is_monitored(int n) const {
    return monitored && static_cast<size_t>(n) < monitored->size() && (*monitored)[static_cast<size_t>(n)];
  }

  // The worst run's before and after, and the other runs of the window the
  // edit changes (see the file comment).
  void describe_effect(const Pattern& p, Fix* fix) {
    const std::set<Instant> in_pattern(p.runs.begin(), p.runs.end());
    trial.set(fix->edit, fix->kind == FixKind::start_later ? fix->seconds : 0);
    fix->pattern_runs = p.runs.size();
    if (fix->kind == FixKind::start_later) {
      fix->before = p.worst_run;
      fix->after = trial.moved(p.model, p.worst_run);
    } else {
      const Node& node = plan.nodes[static_cast<size_t>(fix->node)];
      const Instant w = p.blame.needs_data_through;
      std::optional<Instant> before = ev.ready(fix->node, w);
      std::optional<Instant> after = trial.ready(fix->node, w);
      const bool start = fix->kind == FixKind::move_start;
      const Seconds run_time(start ? node.run_time.seconds : 0);
      if (before) fix->before = *before - run_time;
      if (after) fix->after = *after - run_time;
      if (fix->kind == FixKind::move_start && fix->later && !p.blame.steps.empty()) {
        // The start that read old data moves to after the input landed.
        for (const BlameStep& s : p.blame.steps) {
          if (s.node == fix->node && s.stale_start) fix->before = *s.stale_start;
        }
      }
    }
    // Landing earlier moves every E earlier or leaves it (E is monotone in
    // each landing), so only runs that were not ok can change.
    const bool only_improves = fix->edit.kind == EditKind::delay && fix->edit.seconds < 0;
    for (size_t m = 0; m < plan.models.size(); ++m) {
      const int mi = static_cast<int>(m);
      if (!trial.affects(mi)) continue;
      const std::vector<Instant>& all = collector.model_runs(mi);
      if (only_improves) {
        for (const PatternCollector::Record& r : collector.records(mi)) {
          const Instant at = all[r.ordinal];
          if (mi == p.model && in_pattern.count(at)) continue;
          ++fix->runs_rechecked;
          const RunStatus after = trial.run(mi, at).status;
          if (after != r.status) fix->other_changes.push_back({mi, at, r.status, after});
        }
      } else {
        for (Instant at : all) {
          if (mi == p.model && in_pattern.count(at)) continue;
          ++fix->runs_rechecked;
          const RunStatus before = ev.run_at(mi, at).status;
          const RunStatus after = trial.run(mi, at).status;
          if (after != before) fix->other_changes.push_back({mi, at, before, after});
        }
      }
    }
    std::sort(fix->other_changes.begin(), fix->other_changes.end(), [](const RunChange& a, const RunChange& b) {
      return a.at != b.at ? a.at < b.at : a.model < b.model;
    });
  }
};

FixFinder::FixFinder(const PatternCollector& collector) : state_(std::make_unique<State>(collector)) {}
FixFinder::~FixFinder() = default;

namespace {

struct PatternRuns {
  std::vector<Instant> at;
  std::vector<bool> also_degraded;  // a failing run degraded by optional features as well
};

bool clears(const RunResult& after, RunStatus pattern_status, bool also_degraded) {
  if (after.status == RunStatus::ok) return true;
  return pattern_status == RunStatus::fail && also_degraded && after.status == RunStatus::degraded;
}

}  // namespace

FixSearch FixFinder::find(const Pattern& p) const {
  State& st = *state_;
  EditTrial& trial = st.trial;
  const Plan& plan = st.plan;
  const Model& model = plan.models[static_cast<size_t>(p.model)];
  FixSearch out;
  if (p.blame.kind == CauseKind::never) {
    out.never = true;
    return out;
  }
  PatternRuns runs;
  int64_t worst_late = 0;
  for (const PatternFeature& f : p.features) worst_late = std::max(worst_late, f.worst_late_seconds);

  // Whether every run of the pattern clears with the edit under trial; the
  // runs' own optional features are looked at once, on the first trial.
  auto passes_all = [&]() {
    if (runs.at.empty()) {
      for (Instant at : p.runs) {
        bool optional_bad = false;
        if (p.status == RunStatus::fail) {
          for (const FeatureResult& f : st.ev.run_at(p.model, at).features) {
            if (f.optional && f.status != FeatureStatus::ok) optional_bad = true;
          }
        }
        runs.at.push_back(at);
        runs.also_degraded.push_back(optional_bad);
      }
    }
    for (size_t i = 0; i < runs.at.size(); ++i) {
      if (!clears(trial.run(p.model, runs.at[i]), p.status, runs.also_degraded[i])) return false;
    }
    return true;
  };

  // Which steps could clear every feature of the pattern.
  st.common.compute(st.lineage, p.features);
  auto common_step = [&](int n) { return st.common.contains(n); };
  out.causes_apart = !st.common.any();

  // Candidates: the worst run's blame, then other runs' blames if needed.
  std::vector<Candidate> candidates;
  candidates_from(plan, p.blame, st.monitored, &candidates);

  std::vector<Fix> found;
  std::set<std::tuple<int, int, int, int>> tried;  // (kind, later, by_schedule, node)
  auto try_candidate = [&](const Candidate& c) {
    if (!tried.insert({static_cast<int>(c.kind), c.later, c.by_schedule, c.node}).second) return;
    auto note_tried = [&] {
      if (std::find(out.tried_nodes.begin(), out.tried_nodes.end(), c.node) == out.tried_nodes.end()) {
        out.tried_nodes.push_back(c.node);
      }
    };
    if (!common_step(c.node)) {
      note_tried();
      return;
    }
    const Node& node = plan.nodes[static_cast<size_t>(c.node)];
    // The edit of size `minutes`, or nullopt when it cannot be written.
    std::function<std::optional<Edit>(int64_t)> edit_of;
    int64_t cap = 0;
    if (!c.by_schedule) {
      // delay: a lands_after or run_time cannot fall below zero.
      cap = (node.kind == NodeKind::source ? node.lands_after.seconds : node.run_time.seconds) / 60;
      edit_of = [&, c](int64_t minutes) -> std::optional<Edit> { return Edit::delay(c.node, -minutes * 60); };
    } else {
      const std::optional<Cron>& schedule = node.kind == NodeKind::source ? node.schedule : node.trigger;
      if (!schedule) return;
      cap = 24 * 60 - 1;
      const int sign = c.later ? 1 : -1;
      const bool calendar = node.calendar >= 0;
      edit_of = [&, c, sign, calendar](int64_t minutes) -> std::optional<Edit> {
        std::optional<std::string> text = shifted_cron(*schedule, sign * minutes, calendar);
        if (!text) return std::nullopt;
        CronParse parsed = parse_cron(*text);
        if (!parsed.value) return std::nullopt;
        return Edit::schedule(c.node, *parsed.value);
      };
    }
    auto passes = [&](int64_t minutes) {
      std::optional<Edit> edit = edit_of(minutes);
      if (!edit || !edit_problem(plan, *edit).empty()) return false;
      trial.set(*edit);
      return passes_all();
    };
    std::optional<int64_t> size = minimal_size(passes, minutes_up(c.guess_seconds), cap);
    if (!size) {
      note_tried();
      return;
    }
    Fix fix;
    fix.kind = c.kind;
    fix.node = c.node;
    fix.seconds = *size * 60;
    fix.later = c.later;
    fix.edit = *edit_of(*size);
    if (c.by_schedule) {
      fix.from_cron = (node.kind == NodeKind::source ? node.schedule : node.trigger)->text;
    }
    found.push_back(std::move(fix));
  };
  for (const Candidate& c : candidates) try_candidate(c);
  if (found.empty()) {
    // Other runs of the pattern may be late for another reason.
    const size_t n = p.runs.size();
    const size_t samples = std::min<size_t>(n, 8);
    for (size_t k = 0; k < samples && found.empty(); ++k) {
      const Instant at = p.runs[samples == 1 ? 0 : k * (n - 1) / (samples - 1)];
      RunResult run = st.ev.run_at(p.model, at);
      const FeatureResult* worst = nullptr;
      int64_t worst_slack = INT64_MAX;
      for (const FeatureResult& f : run.features) {
        if (f.status == FeatureStatus::ok || f.optional != (p.status == RunStatus::degraded)) continue;
        const int64_t slack = f.status == FeatureStatus::never ? INT64_MIN : f.slack_seconds;
        if (!worst || slack < worst_slack) worst = &f, worst_slack = slack;
      }
      if (!worst) continue;
      std::vector<Candidate> more;
      candidates_from(plan, blame(plan, st.ev.engine(), worst->feature, worst->needs_data_through, at, st.monitored),
                      st.monitored, &more);
      for (const Candidate& c : more) try_candidate(c);
    }
  }
  // Of the two ways to make a source land earlier, keep the delay when both work.
  for (size_t i = 0; i < found.size(); ++i) {
    for (size_t j = 0; j < found.size(); ++j) {
      if (i != j && found[i].kind == FixKind::land_earlier && found[j].kind == FixKind::land_earlier &&
          found[i].node == found[j].node && found[i].edit.kind == EditKind::delay &&
          found[j].edit.kind == EditKind::schedule) {
        found.erase(found.begin() + static_cast<long>(j));
        i = static_cast<size_t>(-1);
        break;
      }
    }
  }

  // Starting the runs later: one run specification without a calendar (a
  // runs edit replaces the runs with one cron and no calendar).
  if (model.runs.size() == 1 && model.runs.front().calendar < 0) {
    out.tried_later_start = true;
    const RunSpec& spec = model.runs.front();
    auto edit_of = [&](int64_t minutes) -> std::optional<Edit> {
      std::optional<std::string> text = shifted_cron(spec.at, minutes, false);
      if (!text) return std::nullopt;
      CronParse parsed = parse_cron(*text);
      if (!parsed.value) return std::nullopt;
      return Edit::runs(p.model, *parsed.value);
    };
    auto passes = [&](int64_t minutes) {
      std::optional<Edit> edit = edit_of(minutes);
      if (!edit || !edit_problem(plan, *edit).empty()) return false;
      trial.set(*edit, minutes * 60);
      return passes_all();
    };
    // Less than a day, so that each run maps to one run of the edited plan.
    std::optional<int64_t> size =
        minimal_size(passes, minutes_up(worst_late), std::min<int64_t>(kLaterStartSearch / 60, 24 * 60 - 1));
    if (size) {
      Fix fix;
      fix.kind = FixKind::start_later;
      fix.seconds = *size * 60;
      fix.later = true;
      fix.from_cron = spec.at.text;
      fix.edit = *edit_of(*size);
      found.push_back(std::move(fix));
    }
  }

  for (Fix& fix : found) st.describe_effect(p, &fix);
  std::stable_sort(found.begin(), found.end(), [](const Fix& a, const Fix& b) {
    return !a.breaks_others() && b.breaks_others();
  });
  out.fixes = std::move(found);
  return out;
}

}  // namespace readyby
