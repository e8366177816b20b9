#include "plan/plan_loader.h"

#include <algorithm>
#include <chrono>
#include <fstream>
#include <map>
#include <set>
#include <sstream>
#include <unordered_map>

#include "plan/lineage.h"
#include "time/zone_names.h"
#include "util/text.h"
#include "util/yaml_fields.h"
#include "util/yaml_tree.h"

namespace readyby {

namespace {

const std::vector<std::string> kRootKeys = {"plan", "title", "timezone", "calendars", "sources", "jobs", "features", "models"};
const std::vector<std::string> kCalendarKeys = {"skip_weekdays", "skip_dates"};
const std::vector<std::string> kSourceKeys = {"description", "schedule", "lands_after", "data_lag",
                                              "history", "timezone", "calendar"};
const std::vector<std::string> kJobKeys = {"description", "inputs", "trigger", "run_time", "timezone", "calendar"};
const std::vector<std::string> kFeatureKeys = {"description", "inputs", "trigger", "run_time", "timezone", "calendar",
                                               "max_age", "lookback", "optional", "elements"};
const std::vector<std::string> kModelKeys = {"description", "timezone", "features", "runs"};
const std::vector<std::string> kRunKeys = {"at", "calendar"};

// A reference from one place in the file to a named thing, resolved after
// everything has been read.
struct Reference {
  std::string name;
  SourcePos pos;
};

struct PendingNode {
  std::vector<Reference> inputs;
  std::optional<Reference> calendar;
};

struct PendingModel {
  std::vector<Reference> features;
  std::vector<std::optional<Reference>> run_calendars;
};

class Loader {
 public:
  Loader(const std::string& text, const std::string& path) : text_(text), path_(path), fields_(path, &diags_) {
    diags_.add_source(path, text);
  }

  PlanLoadResult run() {
    load();
    PlanLoadResult out;
    out.errors = diags_.sorted();
    out.warnings = diags_.warnings();
    out.rendered = diags_.render();
    if (out.errors.empty()) out.plan = std::move(plan_);
    return out;
  }

 private:
  void error(SourcePos pos, std::string message) { diags_.error(path_, pos, std::move(message)); }

  void load() {
    plan_.path = path_;
    YamlNode root;
    if (!parse_yaml(path_, text_, &root, &diags_)) return;
    if (root.is_null()) {
      error({}, "empty file: expected a plan (a map with at least 'plan', 'timezone' and 'models')");
      return;
    }
    if (!root.is_map()) {
      error(root.pos, "a plan must be a map of keys (plan, timezone, sources, ...), found " + root.describe());
      return;
    }
    fields_.check_keys(root, kRootKeys, "plan");
    load_header(root);
    if (const YamlNode* cals = root.find("calendars")) load_calendars(*cals);
    const char* sections[] = {"sources", "jobs", "features"};
    NodeKind kinds[] = {NodeKind::source, NodeKind::job, NodeKind::feature};
    for (int s = 0; s < 3; ++s) {
      if (const YamlNode* section = root.find(sections[s])) load_nodes(*section, kinds[s], sections[s]);
    }
    if (const YamlNode* models = root.find("models")) {
      load_models(*models);
    } else {
      error({1, 1}, "missing required key 'models'");
    }
    resolve();
  }

  // ---- generic helpers -------------------------------------------------

  std::optional<std::string> get_text(const YamlNode& map, const char* key, const std::string& what) {
    const YamlNode* v = map.find(key);
    if (!v) return std::nullopt;
    if (!v->is_scalar()) {
      error(v->is_null() ? FieldReader::key_pos(map, v) : v->pos,
            "'" + std::string(key) + "' of " + what + " must be text, found " + v->describe());
      return std::nullopt;
    }
    return v->value;
  }

  std::optional<Cron> get_cron(const YamlNode& v, const std::string& what) {
    if (!v.is_scalar()) {
      error(v.pos, what + " must be a cron expression in quotes, e.g. \"30 2 * * *\", found " + v.describe());
      return std::nullopt;
    }
    CronParse c = parse_cron(v.value);
    if (!c.value) {
      error(FieldReader::inside(v, c.offset), "bad cron '" + v.value + "' in " + what + ": " + c.error);
      return std::nullopt;
    }
    return c.value;
  }

  const Zone* get_zone(const YamlNode& map, const char* key, const std::string& what) {
    const YamlNode* v = map.find(key);
    if (!v) return nullptr;
    if (!v->is_scalar()) {
      error(v->is_null() ? FieldReader::key_pos(map, v) : v->pos,
            "'" + std::string(key) + "' of " + what + " must be an IANA time zone name such as America/Chicago, found " +
                v->describe());
      return nullptr;
    }
    const Zone* z = Zone::find(v->value);
    if (!z) {
      if (zone_names_.empty()) zone_names_ = Zone::names();
      error(v->pos, "unknown time zone '" + v->value + "'" + zone_did_you_mean(v->value, zone_names_));
    } else if (std::string advice = legacy_zone_advice(v->value); !advice.empty()) {
      diags_.warning(path_, v->pos, advice);
    }
    return z;
  }

  // A list of scalar references; a single scalar is reported as a wrong type.
  std::vector<Reference> get_refs(const YamlNode& map, const char* key, const std::string& what) {
    std::vector<Reference> out;
    const YamlNode* v = map.find(key);
    if (!v) return out;
    if (!v->is_sequence()) {
      error(v->is_null() ? FieldReader::key_pos(map, v) : v->pos,
            "'" + std::string(key) + "' of " + what + " must be a list, e.g. [a, b], found " + v->describe());
      return out;
    }
    for (const YamlNode& item : v->items) {
      if (!item.is_scalar()) {
        error(item.pos, "items of '" + std::string(key) + "' of " + what + " must be ids, found " + item.describe());
        continue;
      }
      out.push_back({item.value, item.pos});
    }
    return out;
  }

  // ---- sections ----------------------------------------------------------

  void load_header(const YamlNode& root) {
    if (const YamlNode* id = root.find("plan")) {
      if (!id->is_scalar()) {
        error(id->is_null() ? FieldReader::key_pos(root, id) : id->pos, "'plan' must be the plan's id, found " + id->describe());
      } else if (!valid_id(id->value)) {
        error(id->pos, "invalid plan id '" + id->value + "' (use letters, digits, '_', '.' and '-')");
      } else {
        plan_.id = id->value;
      }
    } else {
      error({1, 1}, "missing required key 'plan' (the plan's id)");
    }
    if (auto title = get_text(root, "title", "the plan")) plan_.title = *title;
    if (root.find("timezone")) {
      plan_.zone = get_zone(root, "timezone", "the plan");
    } else {
      error({1, 1}, "missing required key 'timezone' (the plan's IANA time zone, e.g. America/Chicago)");
    }
  }

  void load_calendars(const YamlNode& cals) {
    if (!cals.is_map()) {
      error(cals.pos, "'calendars' must be a map of calendar names to calendars, found " + cals.describe());
      return;
    }
    for (const auto& [key, body] : cals.entries) {
      if (!key.is_scalar()) continue;
      Calendar cal;
      cal.name = key.value;
      cal.line = key.pos.line;
      if (!valid_id(key.value)) error(key.pos, "invalid calendar name '" + key.value + "' (use letters, digits, '_', '.' and '-')");
      std::string what = "calendar '" + key.value + "'";
      if (body.is_map()) {
        fields_.check_keys(body, kCalendarKeys, what);
        load_calendar_body(body, what, &cal);
      } else if (!body.is_null()) {
        error(body.pos, what + " must be a map with skip_weekdays and/or skip_dates, found " + body.describe());
      }
      plan_.calendars.push_back(std::move(cal));
    }
  }

  void load_calendar_body(const YamlNode& body, const std::string& what, Calendar* cal) {
    if (const YamlNode* wd = body.find("skip_weekdays")) {
      if (!wd->is_sequence()) {
        error(wd->is_null() ? FieldReader::key_pos(body, wd) : wd->pos, "'skip_weekdays' of " + what + " must be a list such as [sat, sun], found " + wd->describe());
      } else {
        for (const YamlNode& item : wd->items) {
          int w = item.is_scalar() ? parse_weekday(item.value) : -1;
          if (w < 0) {
            error(item.pos, "'" + (item.is_scalar() ? item.value : item.describe()) + "' is not a weekday (use sun, mon, tue, wed, thu, fri, sat)");
          } else {
            cal->skip_weekdays |= static_cast<uint8_t>(1u << w);
          }
        }
      }
    }
    if (const YamlNode* dates = body.find("skip_dates")) {
      if (!dates->is_sequence()) {
        error(dates->is_null() ? FieldReader::key_pos(body, dates) : dates->pos, "'skip_dates' of " + what + " must be a list of dates such as [2026-12-25], found " + dates->describe());
      } else {
        for (const YamlNode& item : dates->items) {
          std::optional<LocalDays> d = item.is_scalar() ? parse_date(item.value) : std::nullopt;
          if (!d) {
            error(item.pos, "'" + (item.is_scalar() ? item.value : item.describe()) + "' is not a date (use YYYY-MM-DD)");
          } else {
            cal->skip_dates.push_back(*d);
          }
        }
        std::sort(cal->skip_dates.begin(), cal->skip_dates.end());
        cal->skip_dates.erase(std::unique(cal->skip_dates.begin(), cal->skip_dates.end()), cal->skip_dates.end());
      }
    }
  }

  void load_nodes(const YamlNode& section, NodeKind kind, const char* section_name) {
    if (section.is_null()) return;
    if (!section.is_map()) {
      error(section.pos, "'" + std::string(section_name) + "' must be a map of ids to " + section_name +
                             ", found " + section.describe());
      return;
    }
    for (const auto& [key, body] : section.entries) {
      if (!key.is_scalar()) {
        error(key.pos, "ids of " + std::string(section_name) + " must be plain names");
        continue;
      }
      Node node;
      node.id = key.value;
      node.kind = kind;
      node.pos = key.pos;
      std::string what = std::string(to_string(kind)) + " '" + node.id + "'";
      if (!valid_id(node.id)) {
        error(key.pos, "invalid id '" + node.id + "' (use letters, digits, '_', '.' and '-')");
      }
      auto [it, inserted] = id_index_.emplace(node.id, static_cast<int>(plan_.nodes.size()));
      if (!inserted) {
        const Node& first = plan_.nodes[static_cast<size_t>(it->second)];
        error(key.pos, "id '" + node.id + "' is already used by the " + to_string(first.kind) + " at line " +
                           std::to_string(first.pos.line) + " (sources, jobs and features share one namespace)");
      }
      PendingNode pending;
      if (!body.is_map()) {
        error(body.is_null() ? key.pos : body.pos, what + " must be a map of settings, found " + body.describe());
      } else if (kind == NodeKind::source) {
        load_source(body, what, &node, &pending);
      } else {
        load_derived(body, what, &node, &pending);
      }
      if (inserted) {
        plan_.nodes.push_back(std::move(node));
        pending_nodes_.push_back(std::move(pending));
      } else {
        // Still check what the repeated definition refers to.
        orphan_refs_.insert(orphan_refs_.end(), pending.inputs.begin(), pending.inputs.end());
      }
    }
  }

  void load_source(const YamlNode& body, const std::string& what, Node* node, PendingNode* pending) {
    std::vector<std::string> allowed = kSourceKeys;
    allowed.push_back("inputs");  // reported below with the reason
    fields_.check_keys(body, allowed, what);
    for (const auto& [k, v] : body.entries) {
      if (k.is_scalar() && k.value == "inputs") {
        error(k.pos, what + " cannot have inputs: a source is fed from outside the plan; declare it as a job instead");
      }
    }
    if (auto d = get_text(body, "description", what)) node->description = *d;
    const YamlNode* schedule = body.find("schedule");
    if (!schedule) {
      error(node->pos, what + " is missing required key 'schedule' (a cron expression, or stream)");
    } else if (schedule->is_scalar() && schedule->value == "stream") {
      node->stream = true;
    } else if (schedule->is_null()) {
      error(FieldReader::key_pos(body, schedule), "'schedule' of " + what + " has no value (a cron expression, or stream)");
    } else {
      node->schedule = get_cron(*schedule, "the schedule of " + what);
      node->schedule_pos = schedule->pos;
    }
    if (auto d = fields_.duration(body, "lands_after", what, kMaxTimingDurationSeconds)) node->lands_after = *d;
    if (body.find("data_lag")) {
      if (node->stream) {
        error(FieldReader::key_pos(body, body.find("data_lag")),
              "'data_lag' does not apply to the stream source '" + node->id +
                  "' (a stream's data reaches the moment it is sent; use lands_after for its delay)");
      } else if (auto d = fields_.duration(body, "data_lag", what, kMaxTimingDurationSeconds)) {
        node->data_lag = *d;
      }
    }
    if (auto d = fields_.duration(body, "history", what)) node->history = *d;
    node->zone = get_zone(body, "timezone", what);
    if (const YamlNode* cal = body.find("calendar")) {
      if (cal->is_scalar()) pending->calendar = Reference{cal->value, cal->pos};
      else error(cal->is_null() ? FieldReader::key_pos(body, cal) : cal->pos, "'calendar' of " + what + " must be a calendar name, found " + cal->describe());
    }
  }

  void load_derived(const YamlNode& body, const std::string& what, Node* node, PendingNode* pending) {
    fields_.check_keys(body, node->kind == NodeKind::feature ? kFeatureKeys : kJobKeys, what);
    if (auto d = get_text(body, "description", what)) node->description = *d;
    if (body.find("inputs")) {
      pending->inputs = get_refs(body, "inputs", what);
      const YamlNode* v = body.find("inputs");
      if (v->is_sequence() && v->items.empty()) error(v->pos, what + " has an empty 'inputs' list; it needs at least one input");
    } else {
      error(node->pos, what + " is missing required key 'inputs'");
    }
    const YamlNode* trigger = body.find("trigger");
    if (trigger && !(trigger->is_scalar() && trigger->value == "inputs")) {
      if (trigger->is_null()) error(FieldReader::key_pos(body, trigger), "'trigger' of " + what + " has no value (inputs, or a cron expression)");
      else {
        node->trigger = get_cron(*trigger, "the trigger of " + what);
        node->schedule_pos = trigger->pos;
      }
    }
    bool cron_trigger = trigger && !(trigger->is_scalar() && trigger->value == "inputs");
    if (auto d = fields_.duration(body, "run_time", what, kMaxTimingDurationSeconds)) node->run_time = *d;
    for (const char* key : {"timezone", "calendar"}) {
      const YamlNode* v = body.find(key);
      if (v && !cron_trigger) {
        error(FieldReader::key_pos(body, v), "'" + std::string(key) + "' of " + what +
                                    " applies to a cron trigger only; this node runs when its inputs land");
      }
    }
    if (cron_trigger) {
      node->zone = get_zone(body, "timezone", what);
      if (const YamlNode* cal = body.find("calendar")) {
        if (cal->is_scalar()) pending->calendar = Reference{cal->value, cal->pos};
        else error(cal->is_null() ? FieldReader::key_pos(body, cal) : cal->pos, "'calendar' of " + what + " must be a calendar name, found " + cal->describe());
      }
    }
    if (node->kind != NodeKind::feature) return;
    if (body.find("max_age")) {
      if (auto d = fields_.duration(body, "max_age", what, kMaxTimingDurationSeconds)) node->max_age = *d;
    } else {
      error(node->pos, what + " is missing required key 'max_age' (how old its data may be at scoring time)");
    }
    if (auto d = fields_.duration(body, "lookback", what)) node->lookback = *d;
    if (auto b = fields_.boolean(body, "optional", what)) node->optional = *b;
    for (const Reference& r : get_refs(body, "elements", what)) node->elements.push_back(r.name);
  }

  void load_models(const YamlNode& models) {
    if (models.is_null()) return;
    if (!models.is_map()) {
      error(models.pos, "'models' must be a map of model ids to models, found " + models.describe());
      return;
    }
    std::set<std::string> seen;
    for (const auto& [key, body] : models.entries) {
      if (!key.is_scalar()) continue;
      Model model;
      model.id = key.value;
      model.pos = key.pos;
      std::string what = "model '" + model.id + "'";
      if (!valid_id(model.id)) error(key.pos, "invalid model id '" + model.id + "' (use letters, digits, '_', '.' and '-')");
      PendingModel pending;
      if (!body.is_map()) {
        error(body.is_null() ? key.pos : body.pos, what + " must be a map with features and runs, found " + body.describe());
      } else {
        fields_.check_keys(body, kModelKeys, what);
        if (auto d = get_text(body, "description", what)) model.description = *d;
        model.zone = get_zone(body, "timezone", what);
        if (body.find("features")) {
          pending.features = get_refs(body, "features", what);
        } else {
          error(key.pos, what + " is missing required key 'features'");
        }
        load_runs(body, what, &model, &pending);
      }
      plan_.models.push_back(std::move(model));
      pending_models_.push_back(std::move(pending));
    }
  }

  void load_runs(const YamlNode& body, const std::string& what, Model* model, PendingModel* pending) {
    const YamlNode* runs = body.find("runs");
    if (!runs) {
      error(model->pos, what + " is missing required key 'runs'");
      return;
    }
    if (!runs->is_sequence()) {
      error(runs->is_null() ? FieldReader::key_pos(body, runs) : runs->pos,
            "'runs' of " + what + " must be a list of {at: \"cron\"}, found " + runs->describe());
      return;
    }
    if (runs->items.empty()) error(runs->pos, what + " has no runs; add at least one {at: \"cron\"}");
    for (const YamlNode& item : runs->items) {
      if (!item.is_map()) {
        error(item.pos, "each run of " + what + " must be a map such as {at: \"0 6 * * *\"}, found " + item.describe());
        continue;
      }
      fields_.check_keys(item, kRunKeys, "a run of " + what);
      const YamlNode* at = item.find("at");
      if (!at) {
        error(item.pos, "a run of " + what + " is missing required key 'at'");
        continue;
      }
      std::optional<Cron> cron = get_cron(*at, "the run time of " + what);
      std::optional<Reference> cal;
      if (const YamlNode* c = item.find("calendar")) {
        if (c->is_scalar()) cal = Reference{c->value, c->pos};
        else error(c->pos, "'calendar' of a run must be a calendar name, found " + c->describe());
      }
      if (cron) {
        model->runs.push_back({*cron, -1, at->pos});
        pending->run_calendars.push_back(cal);
      }
    }
  }

  // ---- cross references ----------------------------------------------------

  int resolve_calendar(const Reference& ref) {
    for (size_t i = 0; i < plan_.calendars.size(); ++i) {
      if (plan_.calendars[i].name == ref.name) return static_cast<int>(i);
    }
    std::vector<std::string> names;
    for (const Calendar& c : plan_.calendars) names.push_back(c.name);
    error(ref.pos, "unknown calendar '" + ref.name + "'" + did_you_mean(ref.name, names));
    return -1;
  }

  void resolve() {
    std::vector<std::string> ids;
    for (const Node& n : plan_.nodes) ids.push_back(n.id);
    for (size_t i = 0; i < plan_.nodes.size(); ++i) {
      Node& node = plan_.nodes[i];
      if (!node.zone) node.zone = plan_.zone;
      const PendingNode& pending = pending_nodes_[i];
      if (pending.calendar) node.calendar = resolve_calendar(*pending.calendar);
      for (const Reference& ref : pending.inputs) {
        auto it = id_index_.find(ref.name);
        if (it == id_index_.end()) {
          std::string hint = did_you_mean(ref.name, ids);
          int model = plan_.find_model(ref.name);
          if (model >= 0 && hint.empty()) hint = " ('" + ref.name + "' is a model; models cannot be inputs)";
          error(ref.pos, "unknown input '" + ref.name + "'" + hint);
          continue;
        }
        node.inputs.push_back(it->second);
      }
    }
    for (const Reference& ref : orphan_refs_) {
      if (!id_index_.count(ref.name)) error(ref.pos, "unknown input '" + ref.name + "'" + did_you_mean(ref.name, ids));
    }
    for (size_t m = 0; m < plan_.models.size(); ++m) {
      Model& model = plan_.models[m];
      if (!model.zone) model.zone = plan_.zone;
      const PendingModel& pending = pending_models_[m];
      for (const Reference& ref : pending.features) {
        auto it = id_index_.find(ref.name);
        if (it == id_index_.end()) {
          std::vector<std::string> feature_ids;
          for (const Node& n : plan_.nodes) if (n.kind == NodeKind::feature) feature_ids.push_back(n.id);
          error(ref.pos, "unknown feature '" + ref.name + "'" + did_you_mean(ref.name, feature_ids));
          continue;
        }
        const Node& target = plan_.nodes[static_cast<size_t>(it->second)];
        if (target.kind != NodeKind::feature) {
          error(ref.pos, "'" + ref.name + "' is a " + to_string(target.kind) +
                             ", not a feature; a model lists features only (declare one that takes '" + ref.name +
                             "' as input)");
          continue;
        }
        if (std::find(model.features.begin(), model.features.end(), it->second) != model.features.end()) {
          error(ref.pos, "feature '" + ref.name + "' is listed twice in model '" + model.id + "'");
          continue;
        }
        model.features.push_back(it->second);
      }
      for (size_t r = 0; r < model.runs.size(); ++r) {
        if (pending.run_calendars[r]) model.runs[r].calendar = resolve_calendar(*pending.run_calendars[r]);
      }
    }
    check_cycles();
    check_schedules_fire();
  }

  void check_cycles() {
    Lineage lineage = Lineage::of(plan_);
    for (const std::vector<int>& cycle : lineage.cycles()) {
      std::string text;
      for (int n : cycle) text += plan_.nodes[static_cast<size_t>(n)].id + " -> ";
      text += plan_.nodes[static_cast<size_t>(cycle.front())].id;
      error(plan_.nodes[static_cast<size_t>(cycle.front())].pos, "cycle in the lineage: " + text);
    }
  }

  // A schedule that never fires (e.g. "0 0 30 2 *", or weekdays only under a
  // calendar that skips weekdays) can never deliver: reject it. The test is
  // independent of the clock: the schedule must fire in every window of the
  // engine's horizon (cron.h fires_in_every_window). The error points at the
  // schedule (or the run's `at`) and names the calendar's line.
  void check_schedules_fire() {
    auto silence = [&](const SilenceCheck& check, int calendar) {
      std::string text = " never fires";
      if (calendar >= 0) {
        const Calendar& cal = plan_.calendar(calendar);
        text += " under calendar '" + cal.name + "' (defined at line " + std::to_string(cal.line) + ")";
      }
      if (check.after) {
        text += ": no occurrence within 1,462 days after " + format_rfc3339(*check.after, nullptr);
      } else {
        text += " (no occurrence within 1,462 days)";
      }
      return text;
    };
    for (const Node& node : plan_.nodes) {
      const std::optional<Cron>& cron = node.schedule ? node.schedule : node.trigger;
      if (!cron || !node.zone) continue;
      SilenceCheck check = fires_in_every_window(*cron, *node.zone, plan_.calendar(node.calendar));
      if (!check.fires) {
        error(node.schedule_pos, std::string(node.schedule ? "the schedule" : "the trigger") + " '" + cron->text +
                                     "' of " + to_string(node.kind) + " '" + node.id + "'" + silence(check, node.calendar));
      }
    }
    for (const Model& model : plan_.models) {
      for (const RunSpec& run : model.runs) {
        if (!model.zone) continue;
        SilenceCheck check = fires_in_every_window(run.at, *model.zone, plan_.calendar(run.calendar));
        if (!check.fires) {
          error(run.pos, "the run '" + run.at.text + "' of model '" + model.id + "'" + silence(check, run.calendar));
        }
      }
    }
  }

  const std::string& text_;
  const std::string& path_;
  Diagnostics diags_;
  FieldReader fields_;
  Plan plan_;
  std::unordered_map<std::string, int> id_index_;
  std::vector<PendingNode> pending_nodes_;
  std::vector<PendingModel> pending_models_;
  std::vector<Reference> orphan_refs_;
  std::vector<std::string> zone_names_;
};

}  // namespace

PlanLoadResult load_plan_text(const std::string& text, const std::string& path) {
  return Loader(text, path).run();
}

PlanLoadResult load_plan_file(const std::string& path) {
  std::string text;
  if (!read_file(path, &text)) {
    PlanLoadResult out;
    Diagnostic d{path, {}, "cannot read the file"};
    out.errors.push_back(d);
    out.rendered = d.str() + "\n";
    return out;
  }
  return load_plan_text(text, path);
}

}  // namespace readyby
