#include "intake/feasibility.h"

#include <algorithm>
#include <map>
#include <memory>

#include "engine/freshness.h"
#include "plan/lineage.h"
#include "time/calendar.h"

namespace readyby {

const char* to_string(InputStatus s) {
  switch (s) {
    case InputStatus::on_time: return "on-time";
    case InputStatus::late: return "late";
    case InputStatus::missing: return "missing";
    case InputStatus::unstructured: return "unstructured";
  }
  return "?";
}

const char* to_string(Computable c) {
  switch (c) {
    case Computable::on_time: return "on-time";
    case Computable::gaps: return "gaps";
    case Computable::no: return "no";
  }
  return "?";
}

std::vector<std::string> CandidateCheck::elements_with(InputStatus status) const {
  std::vector<std::string> out;
  for (const InputCheck& in : inputs) {
    if (in.status == status) out.push_back(in.element);
  }
  return out;
}

namespace {

struct WantedInput {
  std::string element;
  std::optional<Duration> recency;
};

// One input per distinct element, in first-mention order, with the strictest recency.
std::vector<WantedInput> distinct_inputs(const Entry& entry) {
  std::vector<WantedInput> out;
  for (const EntryInput& in : entry.inputs) {
    auto it = std::find_if(out.begin(), out.end(), [&](const WantedInput& w) { return w.element == in.element; });
    if (it == out.end()) {
      out.push_back({in.element, in.recency});
    } else if (in.recency && (!it->recency || *in.recency < *it->recency)) {
      it->recency = in.recency;
    }
  }
  return out;
}

// Features listing `element`, in plan order.
std::vector<int> providers(const Plan& plan, const std::string& element) {
  std::vector<int> out;
  for (size_t n = 0; n < plan.nodes.size(); ++n) {
    const Node& node = plan.nodes[n];
    if (node.kind != NodeKind::feature) continue;
    if (std::find(node.elements.begin(), node.elements.end(), element) != node.elements.end()) {
      out.push_back(static_cast<int>(n));
    }
  }
  return out;
}

Duration allowed_age(const Node& feature, const std::optional<Duration>& recency) {
  return recency ? *recency : feature.max_age;
}

std::string date_of(Instant t, const Zone* zone) { return format_date(date::floor<date::days>(zone->to_local(t))); }

// When the late runs happen, in words: every run, every <weekday>, or the dates.
std::string describe_late(const std::vector<Instant>& runs, const std::vector<size_t>& late, const Zone* zone) {
  const std::string count = std::to_string(late.size()) + " of " + std::to_string(runs.size()) + " runs";
  if (late.size() == runs.size()) return runs.size() == 1 ? "at the one run" : "every run (" + count + ")";
  std::map<int, std::pair<size_t, size_t>> per_weekday;  // weekday -> (runs, late runs)
  auto weekday = [&](size_t i) { return weekday_of(date::floor<date::days>(zone->to_local(runs[i]))); };
  for (size_t i = 0; i < runs.size(); ++i) per_weekday[weekday(i)].first++;
  for (size_t i : late) per_weekday[weekday(i)].second++;
  bool by_weekday = std::all_of(late.begin(), late.end(), [&](size_t i) {
    auto [all, late_on_day] = per_weekday[weekday(i)];
    return late_on_day == all && all >= 2;
  });
  if (by_weekday) {
    std::string out;
    for (const auto& [day, counts] : per_weekday) {
      if (counts.second == 0) continue;
      out += std::string(out.empty() ? "every " : " and every ") + weekday_name(day) + " (" +
             std::to_string(counts.second) + " of " + std::to_string(counts.first) + " " + weekday_name(day) +
             " runs)";
    }
    return out;
  }
  constexpr size_t kDatesShown = 4;
  std::string dates;
  for (size_t k = 0; k < late.size() && k < kDatesShown; ++k) {
    dates += (k ? ", " : "") + date_of(runs[late[k]], zone);
  }
  if (late.size() > kDatesShown) dates += ", …";
  return "on " + dates + " (" + count + ")";
}

// Checks inputs of many entries against one freshness engine, built once over
// every feature any of them can use.
class Checker {
 public:
  Checker(const Plan& plan, int model, const std::vector<Instant>& runs, const std::vector<const Entry*>& entries)
      : plan_(plan), model_(plan.models[static_cast<size_t>(model)]), runs_(runs) {
    std::vector<int> features;
    int64_t oldest_age = 0;
    for (const Entry* e : entries) {
      for (const WantedInput& in : distinct_inputs(*e)) {
        for (int f : providers(plan, in.element)) {
          features.push_back(f);
          oldest_age = std::max(oldest_age, allowed_age(plan.nodes[static_cast<size_t>(f)], in.recency).seconds);
        }
      }
    }
    if (features.empty() || runs.empty()) return;
    lineage_ = std::make_unique<Lineage>(Lineage::of(plan));
    std::vector<bool> needed = lineage_->upstream_mask(features);
    engine_ = std::make_unique<FreshnessEngine>(plan, *lineage_, needed, runs.front() - Seconds(oldest_age),
                                                runs.back());
  }

  CandidateCheck check(const Entry& entry, const Vocabulary& vocabulary) const {
    CandidateCheck out;
    out.entry = &entry;
    out.in_house = entry.local();
    bool any_available = false, all_on_time = true;
    for (const WantedInput& in : distinct_inputs(entry)) {
      InputCheck c = check_input(in, vocabulary);
      any_available = any_available || c.available();
      all_on_time = all_on_time && c.status == InputStatus::on_time;
      out.inputs.push_back(std::move(c));
    }
    out.computable = all_on_time ? Computable::on_time : any_available ? Computable::gaps : Computable::no;
    return out;
  }

 private:
  InputCheck check_input(const WantedInput& in, const Vocabulary& vocabulary) const {
    InputCheck best;
    best.element = in.element;
    best.recency = in.recency;
    const Element* element = vocabulary.element(in.element);
    best.label = element ? element->label : in.element;
    best.structured = element ? element->structured : true;
    for (int f : providers(plan_, in.element)) {
      InputCheck c = best;
      timing(f, &c);
      if (!best.available() || better(c, best)) best = std::move(c);
    }
    if (!best.structured) best.status = InputStatus::unstructured;
    else if (!best.available()) best.status = InputStatus::missing;
    else best.status = best.late_runs.empty() ? InputStatus::on_time : InputStatus::late;
    return best;
  }

  // Fresh at more runs, then the model's own feature, then plan order (the earlier candidate stays).
  static bool better(const InputCheck& a, const InputCheck& b) {
    if (a.late_runs.size() != b.late_runs.size()) return a.late_runs.size() < b.late_runs.size();
    return a.model_feature && !b.model_feature;
  }

  void timing(int feature, InputCheck* c) const {
    const Node& node = plan_.nodes[static_cast<size_t>(feature)];
    c->feature = feature;
    c->feature_id = node.id;
    c->model_feature = std::find(model_.features.begin(), model_.features.end(), feature) != model_.features.end();
    c->allowed_age = allowed_age(node, c->recency);
    c->runs = runs_.size();
    for (size_t i = 0; i < runs_.size(); ++i) {
      std::optional<Instant> ready = engine_->ready(feature, runs_[i] - Seconds(c->allowed_age.seconds));
      if (ready && *ready <= runs_[i]) continue;
      c->late_runs.push_back(i);
      if (!ready) c->never = true;
      else c->worst_late_seconds = std::max(c->worst_late_seconds, (*ready - runs_[i]).count());
    }
    if (!c->late_runs.empty()) c->late_when = describe_late(runs_, c->late_runs, model_.zone);
  }

  const Plan& plan_;
  const Model& model_;
  const std::vector<Instant>& runs_;
  std::unique_ptr<Lineage> lineage_;
  std::unique_ptr<FreshnessEngine> engine_;
};

}  // namespace

Feasibility assess_feasibility(const Plan& plan, int model, const std::vector<Instant>& runs,
                               const ReuseReport& reuse, const Vocabulary& vocabulary) {
  Feasibility out;
  out.model = model;
  out.runs = runs;
  std::vector<const Candidate*> chosen;
  std::vector<const Entry*> entries;
  for (const Candidate& c : reuse.candidates) {
    if (c.coverage == Coverage::related) continue;
    chosen.push_back(&c);
    entries.push_back(c.entry);
  }
  Checker checker(plan, model, out.runs, entries);
  for (const Candidate* c : chosen) {
    CandidateCheck check = checker.check(*c->entry, vocabulary);
    check.coverage = c->coverage;
    check.in_house = c->in_house;
    check.rank = c->rank;
    out.candidates.push_back(std::move(check));
  }
  return out;
}

CandidateCheck assess_entry(const Plan& plan, int model, const std::vector<Instant>& runs, const Entry& entry,
                            const Vocabulary& vocabulary) {
  Checker checker(plan, model, runs, {&entry});
  return checker.check(entry, vocabulary);
}

}  // namespace readyby
