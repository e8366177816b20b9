#include "engine/patterns.h"

#include <algorithm>
#include <climits>
#include <set>

namespace readyby {

std::vector<ZoneChange> zone_changes(const Zone& zone, Instant a, Instant b) {
  std::vector<ZoneChange> out;
  for (Instant t : zone.transitions_in(a, b)) {
    out.push_back({&zone, t, zone.offset_at(t - Seconds(1)).count(), zone.offset_at(t).count()});
  }
  return out;
}

const char* to_string(PatternKind k) {
  switch (k) {
    case PatternKind::every_run: return "every-run";
    case PatternKind::weekday: return "weekday";
    case PatternKind::span: return "span";
    case PatternKind::daylight_saving: return "daylight-saving";
    case PatternKind::dates: return "dates";
  }
  return "?";
}

namespace {

constexpr int64_t kDaylightSavingReach = 36 * 3600;  // how long after a change a run counts as affected

// Whether a node's timing depends on its zone: a cron source or a cron trigger.
bool zone_times(const Node& n) { return (n.kind == NodeKind::source && n.schedule) || n.trigger; }

void add_zone(std::vector<const Zone*>* zones, const Zone* z) {
  if (std::find(zones->begin(), zones->end(), z) == zones->end()) zones->push_back(z);
}

// Changes of any of `zones` in (a, b], by instant.
std::vector<ZoneChange> changes_between(const std::vector<const Zone*>& zones, Instant a, Instant b) {
  std::vector<ZoneChange> out;
  for (const Zone* z : zones) {
    for (const ZoneChange& c : zone_changes(*z, a, b)) out.push_back(c);
  }
  std::sort(out.begin(), out.end(), [](const ZoneChange& x, const ZoneChange& y) {
    return x.at != y.at ? x.at < y.at : x.zone->name() < y.zone->name();
  });
  return out;
}

// Zones of `zones` with no change within 36 h either side of `at`.
std::vector<const Zone*> steady(const std::vector<const Zone*>& zones, Instant at) {
  std::vector<const Zone*> out;
  for (const Zone* z : zones) {
    if (z->transitions_in(at - Seconds(kDaylightSavingReach), at + Seconds(kDaylightSavingReach)).empty()) {
      out.push_back(z);
    }
  }
  return out;
}

bool relevant(const FeatureResult& f, RunStatus status) {
  return f.status != FeatureStatus::ok && (status == RunStatus::fail ? !f.optional : f.optional);
}

}  // namespace

PatternCollector::PatternCollector(const Plan& plan, const Evaluation& ev, const std::vector<bool>* monitored)
    : plan_(plan), ev_(ev), monitored_(monitored) {
  const size_t models = plan.models.size();
  summaries_.resize(models);
  runs_.resize(models);
  folded_.resize(models);
  folded_runs_.resize(models, {0, 0});
  records_.resize(models);
  model_zones_.resize(models);
  const Lineage lineage = Lineage::of(plan);
  for (size_t m = 0; m < models; ++m) {
    summaries_[m].model = static_cast<int>(m);
    const Model& model = plan.models[m];
    add_zone(&model_zones_[m], model.zone);
    std::vector<bool> upstream = lineage.upstream_mask(model.features);
    for (size_t n = 0; n < plan.nodes.size(); ++n) {
      if (upstream[n] && zone_times(plan.nodes[n])) add_zone(&model_zones_[m], plan.nodes[n].zone);
    }
  }
}

void PatternCollector::add(const RunResult& run) {
  const size_t m = static_cast<size_t>(run.model);
  ModelSummary& s = summaries_[m];
  ++s.runs;
  (run.status == RunStatus::ok ? s.ok : run.status == RunStatus::degraded ? s.degraded : s.failed)++;
  required_.clear();
  optional_.clear();
  for (const FeatureResult& f : run.features) {
    if (f.ready_at) {
      auto& tightest = f.optional ? s.tightest_optional_seconds : s.tightest_required_seconds;
      auto& at = f.optional ? s.tightest_optional_at : s.tightest_required_at;
      if (!tightest || f.slack_seconds < *tightest) tightest = f.slack_seconds, at = run.at;
    }
    if (f.status == FeatureStatus::ok) continue;
    (f.optional ? optional_ : required_).push_back(f.feature);
    if (f.optional && std::find(s.degraded_features.begin(), s.degraded_features.end(), f.feature) ==
                          s.degraded_features.end()) {
      s.degraded_features.push_back(f.feature);
    }
  }
  const uint32_t ordinal = static_cast<uint32_t>(runs_[m].size());
  runs_[m].push_back(run.at);
  if (run.status == RunStatus::ok) return;
  const std::vector<int>& signature = run.status == RunStatus::fail ? required_ : optional_;
  auto it = signature_index_.find(signature);
  if (it == signature_index_.end()) {
    it = signature_index_.emplace(signature, static_cast<uint32_t>(signatures_.size())).first;
    signatures_.push_back(signature);
  }
  // Fold the run's features into its model's totals for this status.
  const size_t which = run.status == RunStatus::fail ? 0 : 1;
  std::vector<PatternFeature>& folded = folded_[m][which];
  if (folded.empty()) {
    for (const FeatureResult& f : run.features) folded.push_back({f.feature, false, 0});
  }
  ++folded_runs_[m][which];
  Record r{ordinal, it->second, INT64_MAX, -1, run.status, !optional_.empty()};
  for (size_t k = 0; k < run.features.size(); ++k) {
    const FeatureResult& f = run.features[k];
    if (!relevant(f, run.status)) continue;
    if (f.status == FeatureStatus::never) folded[k].never = true;
    else folded[k].worst_late_seconds = std::max(folded[k].worst_late_seconds, -f.slack_seconds);
    const int64_t slack = f.status == FeatureStatus::never ? INT64_MIN : f.slack_seconds;
    if (r.worst_feature < 0 || slack < r.worst_slack) r.worst_slack = slack, r.worst_feature = f.feature;
  }
  records_[m].push_back(r);
}

std::vector<Pattern> PatternCollector::patterns() const {
  std::vector<Pattern> out;
  for (size_t m = 0; m < plan_.models.size(); ++m) {
    group(static_cast<int>(m), RunStatus::fail, &out);
    group(static_cast<int>(m), RunStatus::degraded, &out);
  }
  for (Pattern& p : out) complete(&p);
  return out;
}

void PatternCollector::group(int model, RunStatus status, std::vector<Pattern>* out) const {
  const Model& mdl = plan_.models[static_cast<size_t>(model)];
  const std::vector<Instant>& all = runs_[static_cast<size_t>(model)];
  const std::vector<const Zone*>& zones = model_zones_[static_cast<size_t>(model)];
  const size_t n = all.size();
  std::vector<int64_t> sig(n, -1);  // signature of each run with `status`, else -1
  std::vector<uint32_t> order;      // signatures in order of first occurrence
  size_t count = 0;
  for (const Record& r : records_[static_cast<size_t>(model)]) {
    if (r.status != status) continue;
    sig[r.ordinal] = r.signature;
    if (std::find(order.begin(), order.end(), r.signature) == order.end()) order.push_back(r.signature);
    ++count;
  }
  if (count == 0) return;
  auto make = [&](PatternKind kind) {
    Pattern p;
    p.model = model;
    p.status = status;
    p.kind = kind;
    return p;
  };
  if (count == n && n >= 2) {
    Pattern p = make(PatternKind::every_run);
    p.runs = all;
    out->push_back(std::move(p));
    return;
  }
  std::vector<int> weekday(n);
  for (size_t i = 0; i < n; ++i) weekday[i] = weekday_of(date::floor<date::days>(mdl.zone->to_local(all[i])));
  std::vector<bool> consumed(n, false);
  const size_t first_new = out->size();

  // 2. Spans bounded by a daylight-saving change, per signature over the
  // runs on the weekdays where the signature occurs.
  std::vector<Pattern> spans;
  std::vector<std::vector<size_t>> span_ordinals;
  for (uint32_t s : order) {
    // Weekdays where the signature occurs; those where it occurs in every
    // run of the window (at least two) fail whatever the clocks do and are
    // left to the weekday rule, unless nothing else remains.
    uint8_t days = 0, always = 0;
    int runs_on[7] = {}, with_sig[7] = {};
    for (size_t i = 0; i < n; ++i) {
      runs_on[weekday[i]]++;
      if (sig[i] == s) days |= static_cast<uint8_t>(1u << weekday[i]), with_sig[weekday[i]]++;
    }
    for (int d = 0; d < 7; ++d) {
      if (with_sig[d] >= 2 && with_sig[d] == runs_on[d]) always |= static_cast<uint8_t>(1u << d);
    }
    if (days & ~always) days &= static_cast<uint8_t>(~always);
    std::vector<size_t> seq;
    for (size_t i = 0; i < n; ++i) {
      if ((days >> weekday[i]) & 1) seq.push_back(i);
    }
    for (size_t a = 0; a < seq.size();) {
      if (sig[seq[a]] != s) {
        ++a;
        continue;
      }
      size_t b = a;
      while (b + 1 < seq.size() && sig[seq[b + 1]] == s) ++b;
      if (b > a) {
        Pattern p = make(PatternKind::span);
        p.from_window_start = seq[a] == 0;
        p.to_window_end = seq[b] == n - 1;
        if (a > 0) p.starts_after = changes_between(zones, all[seq[a - 1]], all[seq[a]]);
        if (b + 1 < seq.size()) p.ends_with = changes_between(zones, all[seq[b]], all[seq[b + 1]]);
        if (!p.starts_after.empty() || !p.ends_with.empty()) {
          std::vector<size_t> ordinals(seq.begin() + static_cast<long>(a), seq.begin() + static_cast<long>(b) + 1);
          // Merge with a span of another signature that has the same bounds.
          bool merged = false;
          for (size_t k = 0; k < spans.size(); ++k) {
            if (spans[k].starts_after == p.starts_after && spans[k].ends_with == p.ends_with) {
              span_ordinals[k].insert(span_ordinals[k].end(), ordinals.begin(), ordinals.end());
              merged = true;
              break;
            }
          }
          if (!merged) {
            spans.push_back(std::move(p));
            span_ordinals.push_back(std::move(ordinals));
          }
        }
      }
      a = b + 1;
    }
  }
  for (size_t k = 0; k < spans.size(); ++k) {
    std::vector<size_t>& ords = span_ordinals[k];
    std::sort(ords.begin(), ords.end());
    Pattern& p = spans[k];
    uint8_t days = 0;
    for (size_t i : ords) {
      consumed[i] = true;
      p.runs.push_back(all[i]);
      days |= static_cast<uint8_t>(1u << weekday[i]);
    }
    p.from_window_start = ords.front() == 0;
    p.to_window_end = ords.back() == n - 1;
    p.runs_in_span = ords.back() - ords.front() + 1;
    uint8_t model_days = 0;
    for (size_t i = ords.front(); i <= ords.back(); ++i) model_days |= static_cast<uint8_t>(1u << weekday[i]);
    if (days != model_days) {
      for (int d = 0; d < 7; ++d) {
        if ((days >> d) & 1) p.span_weekdays.push_back(d);
      }
    }
    const std::vector<ZoneChange>& named = !p.starts_after.empty() ? p.starts_after : p.ends_with;
    p.steady_zones = steady(zones, named.front().at);
    out->push_back(std::move(p));
  }

  // 3. Weekdays on which every remaining run has the signature.
  for (uint32_t s : order) {
    int runs_on[7] = {}, with_sig[7] = {};
    for (size_t i = 0; i < n; ++i) {
      if (consumed[i]) continue;
      runs_on[weekday[i]]++;
      if (sig[i] == s) with_sig[weekday[i]]++;
    }
    for (int d = 0; d < 7; ++d) {
      if (with_sig[d] < 2 || with_sig[d] != runs_on[d]) continue;
      Pattern p = make(PatternKind::weekday);
      p.weekday = d;
      p.weekday_runs = static_cast<size_t>(runs_on[d]);
      for (size_t i = 0; i < n; ++i) {
        if (!consumed[i] && weekday[i] == d) {
          consumed[i] = true;
          p.runs.push_back(all[i]);
        }
      }
      out->push_back(std::move(p));
    }
  }

  // 4. Three or more consecutive runs with the signature.
  for (uint32_t s : order) {
    for (size_t a = 0; a < n;) {
      if (consumed[a] || sig[a] != s) {
        ++a;
        continue;
      }
      size_t b = a;
      while (b + 1 < n && !consumed[b + 1] && sig[b + 1] == s) ++b;
      if (b - a + 1 >= 3) {
        Pattern p = make(PatternKind::span);
        p.from_window_start = a == 0;
        p.to_window_end = b == n - 1;
        p.runs_in_span = b - a + 1;
        for (size_t i = a; i <= b; ++i) {
          consumed[i] = true;
          p.runs.push_back(all[i]);
        }
        out->push_back(std::move(p));
      }
      a = b + 1;
    }
  }

  // 5. Runs just after a daylight-saving change of a zone on their chain.
  std::vector<Pattern> dst_days;
  std::vector<LocalDays> dst_dates;
  for (size_t i = 0; i < n; ++i) {
    if (consumed[i] || sig[i] < 0) continue;
    RunResult run = ev_.run_at(model, all[i]);
    std::vector<const Zone*> chain_zones = {mdl.zone};
    int64_t worst = INT64_MAX;
    const FeatureResult* worst_feature = nullptr;
    for (const FeatureResult& f : run.features) {
      if (!relevant(f, status)) continue;
      int64_t slack = f.status == FeatureStatus::never ? INT64_MIN : f.slack_seconds;
      if (!worst_feature || slack < worst) worst = slack, worst_feature = &f;
    }
    if (worst_feature) {
      for (int node : ev_.chain(*worst_feature)) {
        const Node& nd = plan_.nodes[static_cast<size_t>(node)];
        if (zone_times(nd)) add_zone(&chain_zones, nd.zone);
      }
    }
    std::vector<ZoneChange> changes =
        changes_between(chain_zones, all[i] - Seconds(kDaylightSavingReach), all[i]);
    if (changes.empty()) continue;
    const LocalDays day = date::floor<date::days>(mdl.zone->to_local(all[i]));
    auto it = std::find(dst_dates.begin(), dst_dates.end(), day);
    if (it == dst_dates.end()) {
      Pattern p = make(PatternKind::daylight_saving);
      p.changes = changes;
      p.steady_zones = steady(chain_zones, changes.front().at);
      dst_days.push_back(std::move(p));
      dst_dates.push_back(day);
      it = dst_dates.end() - 1;
    }
    dst_days[static_cast<size_t>(it - dst_dates.begin())].runs.push_back(all[i]);
    consumed[i] = true;
  }
  for (Pattern& p : dst_days) out->push_back(std::move(p));

  // 6. The rest, per signature.
  for (uint32_t s : order) {
    Pattern p = make(PatternKind::dates);
    for (size_t i = 0; i < n; ++i) {
      if (!consumed[i] && sig[i] == s) {
        consumed[i] = true;
        p.runs.push_back(all[i]);
      }
    }
    if (!p.runs.empty()) out->push_back(std::move(p));
  }
  std::stable_sort(out->begin() + static_cast<long>(first_new), out->end(),
                   [](const Pattern& a, const Pattern& b) { return a.runs.front() < b.runs.front(); });
}

void PatternCollector::complete(Pattern* p) const {
  const Model& model = plan_.models[static_cast<size_t>(p->model)];
  const size_t which = p->status == RunStatus::fail ? 0 : 1;
  int64_t worst = INT64_MAX;
  int worst_feature = -1;
  Instant worst_at = p->runs.front();
  std::vector<PatternFeature> features;
  const std::vector<Record>& records = records_[static_cast<size_t>(p->model)];
  const std::vector<Instant>& all = runs_[static_cast<size_t>(p->model)];
  if (p->runs.size() == folded_runs_[static_cast<size_t>(p->model)][which] && p->runs.size() > 1) {
    // The pattern holds every such run of the model: the folded totals are its own.
    features = folded_[static_cast<size_t>(p->model)][which];
    for (const Record& r : records) {
      if (r.status != p->status) continue;
      if (worst_feature < 0 || r.worst_slack < worst) {
        worst = r.worst_slack, worst_feature = r.worst_feature, worst_at = all[r.ordinal];
      }
    }
  } else {
    for (int f : model.features) features.push_back({f, false, 0});
    for (Instant at : p->runs) {
      RunResult run = ev_.run_at(p->model, at);
      for (size_t k = 0; k < run.features.size(); ++k) {
        const FeatureResult& f = run.features[k];
        if (!relevant(f, p->status)) continue;
        if (f.status == FeatureStatus::never) features[k].never = true;
        else features[k].worst_late_seconds = std::max(features[k].worst_late_seconds, -f.slack_seconds);
        const int64_t slack = f.status == FeatureStatus::never ? INT64_MIN : f.slack_seconds;
        if (worst_feature < 0 || slack < worst) worst = slack, worst_feature = f.feature, worst_at = at;
      }
    }
  }
  for (const PatternFeature& f : features) {
    if (f.never || f.worst_late_seconds > 0) p->features.push_back(f);
  }
  p->worst_run = worst_at;
  if (worst_feature >= 0) {
    const Instant w = worst_at - Seconds(plan_.nodes[static_cast<size_t>(worst_feature)].max_age.seconds);
    p->blame = blame(plan_, ev_.engine(), worst_feature, w, worst_at, monitored_);
  }
}

Pattern PatternCollector::single_run(int model, Instant at, RunStatus status) const {
  Pattern p;
  p.model = model;
  p.status = status;
  p.kind = PatternKind::dates;
  p.runs = {at};
  complete(&p);
  return p;
}

void collect_runs(const Evaluation& ev, PatternCollector* collector) {
  if (!ev.runs.empty()) {
    for (const RunResult& run : ev.runs) collector->add(run);
    return;
  }
  for (size_t i = 0; i < ev.pending_count(); ++i) collector->add(ev.pending_run(i));
}

}  // namespace readyby
