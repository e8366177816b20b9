#include "engine/edit.h"

#include <algorithm>
#include <map>

#include "plan/lineage.h"
#include "time/duration.h"
#include "util/text.h"

namespace readyby {

const char* to_string(EditKind kind) {
  switch (kind) {
    case EditKind::delay: return "delay";
    case EditKind::fail: return "fail";
    case EditKind::schedule: return "schedule";
    case EditKind::runs: return "runs";
    case EditKind::max_age: return "max_age";
  }
  return "?";
}

std::optional<EditKind> parse_edit_kind(std::string_view name) {
  for (EditKind k : {EditKind::delay, EditKind::fail, EditKind::schedule, EditKind::runs, EditKind::max_age}) {
    if (name == to_string(k)) return k;
  }
  return std::nullopt;
}

Edit Edit::delay(int node, int64_t seconds) { return {EditKind::delay, node, seconds, std::nullopt}; }
Edit Edit::fail(int node) { return {EditKind::fail, node, 0, std::nullopt}; }
Edit Edit::schedule(int node, Cron cron) { return {EditKind::schedule, node, 0, std::move(cron)}; }
Edit Edit::inputs_trigger(int node) { return {EditKind::schedule, node, 0, std::nullopt}; }
Edit Edit::runs(int model, Cron cron) { return {EditKind::runs, model, 0, std::move(cron)}; }
Edit Edit::max_age(int feature, int64_t seconds) { return {EditKind::max_age, feature, seconds, std::nullopt}; }

bool operator==(const Edit& a, const Edit& b) {
  return a.kind == b.kind && a.target == b.target && a.seconds == b.seconds && a.cron.has_value() == b.cron.has_value() &&
         (!a.cron || a.cron->text == b.cron->text);
}

namespace {

std::string signed_duration(int64_t seconds) {
  return seconds < 0 ? "-" + format_duration({-seconds}) : format_duration({seconds});
}

bool valid_node(const Plan& plan, int n) { return n >= 0 && static_cast<size_t>(n) < plan.nodes.size(); }

std::string target_id(const Plan& plan, const Edit& e) {
  if (e.kind == EditKind::runs) {
    return e.target >= 0 && static_cast<size_t>(e.target) < plan.models.size()
               ? plan.models[static_cast<size_t>(e.target)].id
               : "?";
  }
  return valid_node(plan, e.target) ? plan.nodes[static_cast<size_t>(e.target)].id : "?";
}

// The node (or feature, or model) named `id`, or a "no node ..." message.
int find_target(const Plan& plan, EditKind kind, const std::string& id, std::string* error) {
  std::vector<std::string> candidates;
  if (kind == EditKind::runs) {
    int m = plan.find_model(id);
    if (m >= 0) return m;
    for (const Model& model : plan.models) candidates.push_back(model.id);
    *error = "no model '" + id + "' in the plan" + did_you_mean(id, candidates);
    return -1;
  }
  int n = plan.find_node(id);
  if (n >= 0) return n;
  for (const Node& node : plan.nodes) {
    if (kind != EditKind::max_age || node.kind == NodeKind::feature) candidates.push_back(node.id);
  }
  *error = std::string(kind == EditKind::max_age ? "no feature '" : "no node '") + id + "' in the plan" +
           did_you_mean(id, candidates);
  return -1;
}

// The loader's rule for schedules (cron.h fires_in_every_window): a schedule
// must fire in every window of the horizon, whatever the date, so that an
// edit is refused exactly when the plan with the edit written in would be.
// Returns "" when it does, else the words that follow the schedule's name.
std::string silence(const Cron& cron, const Zone& zone, const Calendar& calendar, const std::string& calendar_name) {
  const SilenceCheck check = fires_in_every_window(cron, zone, calendar);
  if (check.fires) return "";
  std::string text = calendar_name.empty() ? "" : " under calendar '" + calendar_name + "'";
  if (check.after) return text + ": no occurrence within 1,462 days after " + format_rfc3339(*check.after, nullptr);
  return text + " (no occurrence within 1,462 days)";
}

}  // namespace

std::string edit_value_text(const Plan& plan, const Edit& e) {
  std::string id = target_id(plan, e);
  switch (e.kind) {
    case EditKind::delay: return id + "=" + signed_duration(e.seconds);
    case EditKind::fail: return id;
    case EditKind::schedule: return id + "=" + (e.cron ? e.cron->text : std::string("inputs"));
    case EditKind::runs: return id + "=" + (e.cron ? e.cron->text : std::string());
    case EditKind::max_age: return id + "=" + format_duration({e.seconds});
  }
  return id;
}

std::string edit_text(const Plan& plan, const Edit& e) {
  return std::string(to_string(e.kind)) + " " + edit_value_text(plan, e);
}

std::string edit_problem(const Plan& plan, const Edit& e) {
  if (e.kind == EditKind::runs) {
    if (e.target < 0 || static_cast<size_t>(e.target) >= plan.models.size()) return "no such model";
    if (!e.cron) return "runs needs a cron expression";
    const Model& model = plan.models[static_cast<size_t>(e.target)];
    if (std::string words = silence(*e.cron, *model.zone, Calendar{}, ""); !words.empty()) {
      return "the runs '" + e.cron->text + "' of model '" + model.id + "' never fire" + words;
    }
    return "";
  }
  if (!valid_node(plan, e.target)) return "no such node";
  const Node& node = plan.nodes[static_cast<size_t>(e.target)];
  switch (e.kind) {
    case EditKind::delay: {
      const bool source = node.kind == NodeKind::source;
      const int64_t now = source ? node.lands_after.seconds : node.run_time.seconds;
      if (now + e.seconds < 0) {
        return "a delay of " + signed_duration(e.seconds) + " would make the " +
               (source ? "lands_after" : "run_time") + " of " + to_string(node.kind) + " '" + node.id +
               "' negative (it is " + format_duration({now}) + ")";
      }
      return "";
    }
    case EditKind::fail: return "";
    case EditKind::schedule:
      if (!e.cron) {
        if (node.kind == NodeKind::source) {
          return "source '" + node.id + "' has no inputs to be triggered by; give it a cron schedule";
        }
        return "";
      }
      if (std::string words = silence(*e.cron, *node.zone, plan.calendar(node.calendar),
                                      node.calendar >= 0 ? plan.calendar(node.calendar).name : "");
          !words.empty()) {
        return "the schedule '" + e.cron->text + "' of " + to_string(node.kind) + " '" + node.id + "' never fires" +
               words;
      }
      return "";
    case EditKind::max_age:
      if (node.kind != NodeKind::feature) {
        return "max_age applies to features; '" + node.id + "' is a " + to_string(node.kind);
      }
      if (e.seconds < 0) return "max_age cannot be negative";
      return "";
    case EditKind::runs: break;
  }
  return "";
}

EditParse parse_edit_value(const Plan& plan, EditKind kind, std::string_view value) {
  EditParse out;
  std::string id(value), rest;
  const bool takes_value = kind != EditKind::fail;
  size_t eq = value.find('=');
  if (takes_value) {
    if (eq == std::string_view::npos) {
      out.error = std::string("expected ") + (kind == EditKind::runs ? "MODEL" : kind == EditKind::max_age ? "FEATURE" : "NODE") +
                  "=" + (kind == EditKind::delay || kind == EditKind::max_age ? "DURATION" : "CRON") + ", found '" +
                  std::string(value) + "'";
      return out;
    }
    id = std::string(value.substr(0, eq));
    rest = std::string(value.substr(eq + 1));
  } else if (eq != std::string_view::npos) {
    out.error = "fail takes a node id only, found '" + std::string(value) + "'";
    return out;
  }
  if (id.empty()) {
    out.error = std::string("missing ") + (kind == EditKind::runs ? "model" : "node") + " id before '='";
    return out;
  }
  int target = find_target(plan, kind, id, &out.error);
  if (target < 0) return out;
  Edit edit;
  edit.kind = kind;
  edit.target = target;
  const std::string what = std::string(kind == EditKind::delay ? "the delay of '" : "the max_age of '") + id + "'";
  if (kind == EditKind::delay || kind == EditKind::max_age) {
    bool negative = kind == EditKind::delay && !rest.empty() && rest[0] == '-';
    DurationParse d = parse_duration(negative ? std::string_view(rest).substr(1) : std::string_view(rest));
    if (!d.value) {
      out.error = "bad duration '" + rest + "' for " + what + ": " + d.error;
      return out;
    }
    edit.seconds = negative ? -d.value->seconds : d.value->seconds;
  } else if (kind == EditKind::schedule && rest == "inputs") {
    edit.cron = std::nullopt;
  } else if (kind == EditKind::schedule || kind == EditKind::runs) {
    CronParse c = parse_cron(rest);
    if (!c.value) {
      out.error = "bad cron '" + rest + "' for " + std::string(kind == EditKind::runs ? "the runs of '" : "the schedule of '") +
                  id + "': " + c.error;
      return out;
    }
    edit.cron = std::move(c.value);
  }
  out.error = edit_problem(plan, edit);
  if (out.error.empty()) out.value = std::move(edit);
  return out;
}

EditParse parse_edit(const Plan& plan, std::string_view text) {
  size_t space = text.find(' ');
  std::string_view name = text.substr(0, space);
  std::optional<EditKind> kind = parse_edit_kind(name);
  if (!kind) {
    EditParse out;
    out.error = "unknown edit '" + std::string(name) + "'" +
                did_you_mean(name, {"delay", "fail", "schedule", "runs", "max_age"});
    return out;
  }
  if (space == std::string_view::npos) {
    EditParse out;
    out.error = std::string(name) + " needs a value";
    return out;
  }
  return parse_edit_value(plan, *kind, text.substr(space + 1));
}

Plan apply_edits(const Plan& plan, const std::vector<Edit>& edits) {
  Plan out = plan;
  for (const Edit& e : edits) {
    if (!edit_problem(out, e).empty()) continue;
    if (e.kind == EditKind::runs) {
      Model& model = out.models[static_cast<size_t>(e.target)];
      RunSpec spec;
      spec.at = *e.cron;
      if (!model.runs.empty()) spec.pos = model.runs.front().pos;
      model.runs = {spec};
      continue;
    }
    Node& node = out.nodes[static_cast<size_t>(e.target)];
    switch (e.kind) {
      case EditKind::delay:
        (node.kind == NodeKind::source ? node.lands_after : node.run_time).seconds += e.seconds;
        break;
      case EditKind::fail: node.fails = true; break;
      case EditKind::schedule:
        if (node.kind == NodeKind::source) {
          node.schedule = e.cron;
          node.stream = false;
        } else {
          node.trigger = e.cron;
        }
        break;
      case EditKind::max_age: node.max_age.seconds = e.seconds; break;
      case EditKind::runs: break;
    }
  }
  return out;
}

std::vector<int> edited_nodes(const std::vector<Edit>& edits) {
  std::vector<int> out;
  for (const Edit& e : edits) {
    if (e.kind == EditKind::delay || e.kind == EditKind::fail || e.kind == EditKind::schedule) out.push_back(e.target);
  }
  std::sort(out.begin(), out.end());
  out.erase(std::unique(out.begin(), out.end()), out.end());
  return out;
}

Evaluation reevaluate(const Evaluation& base, const Plan& edited, const std::vector<Edit>& edits,
                      const DownstreamCones* cones) {
  const FreshnessEngine& base_engine = base.engine();
  // Models whose runs must be recomputed: their run times changed, or a
  // feature's max_age, or (below) a feature lies in the rebuilt cone.
  std::vector<bool> new_times(edited.models.size(), false), affected(edited.models.size(), false);
  for (const Edit& e : edits) {
    if (e.kind == EditKind::runs) new_times[static_cast<size_t>(e.target)] = affected[static_cast<size_t>(e.target)] = true;
    if (e.kind == EditKind::max_age) {
      for (size_t m = 0; m < edited.models.size(); ++m) {
        const std::vector<int>& fs = edited.models[m].features;
        if (std::find(fs.begin(), fs.end(), e.target) != fs.end()) affected[m] = true;
      }
    }
  }
  std::vector<std::pair<int, Instant>> instants;
  instants.reserve(base.runs.size());
  for (const RunResult& r : base.runs) {
    if (!new_times[static_cast<size_t>(r.model)]) instants.emplace_back(r.model, r.at);
  }
  for (size_t m = 0; m < edited.models.size(); ++m) {
    if (!new_times[m]) continue;
    for (Instant at : run_instants(edited, edited.models[m], base.from, base.days)) {
      instants.emplace_back(static_cast<int>(m), at);
    }
  }
  auto [w_lo, w_hi] = query_range(edited, instants);
  // Keep the range of the unedited evaluation when it covers the edited one
  // (answers inside a range do not depend on how wide it is).
  if (w_lo < base_engine.range_from() || w_hi > base_engine.range_to()) {
    return evaluate(edited, base.from, base.days, base_engine.observed());
  }

  Evaluation ev;
  ev.from = base.from;
  ev.days = base.days;
  ev.plan_ = &edited;
  ev.lineage_ = std::make_unique<Lineage>(*base.lineage_);
  ev.findings = base.findings;
  std::optional<DownstreamCones> own_cones;
  if (!cones) cones = &own_cones.emplace(*ev.lineage_);
  std::vector<int> seeds = edited_nodes(edits);
  ev.engine_ = std::make_unique<FreshnessEngine>(base_engine, edited, seeds, cones->of(seeds));
  for (size_t m = 0; m < edited.models.size(); ++m) {
    for (int f : edited.models[m].features) {
      if (ev.engine_->owns_profile(f)) affected[m] = true;
    }
  }

  std::sort(instants.begin(), instants.end(), [&](const auto& a, const auto& b) {
    if (a.second != b.second) return a.second < b.second;
    return edited.models[static_cast<size_t>(a.first)].id < edited.models[static_cast<size_t>(b.first)].id;
  });
  // Base runs by (model, instant) for reuse.
  std::map<std::pair<int, int64_t>, size_t> base_index;
  bool need_index = false;
  for (bool t : new_times) need_index = need_index || t;
  if (need_index) {
    for (size_t i = 0; i < base.runs.size(); ++i) base_index[{base.runs[i].model, to_unix(base.runs[i].at)}] = i;
  }
  ev.runs.reserve(instants.size());
  for (size_t i = 0; i < instants.size(); ++i) {
    const auto& [model, at] = instants[i];
    if (affected[static_cast<size_t>(model)]) {
      ev.runs.push_back(evaluate_run(edited, *ev.engine_, model, at));
    } else {
      // Unaffected runs keep their positions (and order) from `base`.
      ev.runs.push_back(need_index ? base.runs[base_index.at({model, to_unix(at)})] : base.runs[i]);
    }
    ev.failed_ = ev.failed_ || ev.runs.back().status == RunStatus::fail;
  }
  return ev;
}

std::vector<StatusChange> status_changes(const Evaluation& before, const Evaluation& after) {
  std::map<std::pair<int64_t, int>, RunStatus> earlier;
  for (const RunResult& r : before.runs) earlier[{to_unix(r.at), r.model}] = r.status;
  std::vector<StatusChange> out;
  for (const RunResult& r : after.runs) {
    auto it = earlier.find({to_unix(r.at), r.model});
    if (it == earlier.end() || it->second == r.status) continue;
    out.push_back({r.model, r.at, it->second, r.status});
  }
  return out;
}

std::vector<RunCounts> run_counts(const Plan& plan, const Evaluation& ev) {
  std::vector<RunCounts> out(plan.models.size());
  for (const RunResult& r : ev.runs) {
    RunCounts& c = out[static_cast<size_t>(r.model)];
    (r.status == RunStatus::ok ? c.ok : r.status == RunStatus::degraded ? c.degraded : c.fail) += 1;
  }
  return out;
}

}  // namespace readyby
