#include <chrono>
#include <cstdlib>
#include <iostream>

#include "cli/commands.h"
#include "cli/options.h"
#include "engine/check.h"
#include "engine/explain.h"
#include "plan/plan_loader.h"
#include "report/check_json.h"
#include "report/check_text.h"
#include "util/text.h"

namespace readyby {

namespace {

struct CheckOptions {
  std::string plan_path;
  std::optional<LocalDays> from;
  int days = 28;
  std::string format = "text";
  std::string run;  // MODEL@LOCAL-DATETIME
};

// Parses check's arguments; returns an error message or "".
std::string parse_check_args(const std::vector<std::string>& args, CheckOptions* o) {
  ArgTable table{window_rules(&o->from, &o->days), one_file("check", "PLAN", &o->plan_path)};
  table.options.push_back(format_rule({"text", "json"}, &o->format));
  table.options.push_back({"--run", true, [o](const std::optional<std::string>& v) {
                             if (!v || v->find('@') == std::string::npos) {
                               return std::string("--run needs MODEL@YYYY-MM-DDTHH:MM");
                             }
                             o->run = *v;
                             return std::string();
                           }});
  if (std::string error = parse_args(args, table); !error.empty()) return error;
  if (o->plan_path.empty()) return "check needs a PLAN file";
  if (!o->run.empty() && o->from) return "--run and --from cannot be combined";
  return "";
}

int explain_one_run(const Plan& plan, const CheckOptions& o) {
  const Command& self = command_named("check");
  size_t at = o.run.find('@');
  std::string model_id = o.run.substr(0, at);
  int model = plan.find_model(model_id);
  if (model < 0) {
    std::vector<std::string> ids;
    for (const Model& m : plan.models) ids.push_back(m.id);
    return usage_error("no model '" + model_id + "' in " + o.plan_path + did_you_mean(model_id, ids) +
                           "; its models: " + name_list(ids),
                       self.usage);
  }
  std::optional<LocalTime> local = parse_local_datetime(o.run.substr(at + 1));
  if (!local) return usage_error("--run needs MODEL@YYYY-MM-DDTHH:MM (a local time in the model's zone)", self.usage);
  if (std::string bad = unsupported_date(date::floor<date::days>(*local)); !bad.empty()) {
    return usage_error("--run " + bad, self.usage);
  }
  const Zone* zone = plan.models[static_cast<size_t>(model)].zone;
  // The fixes' effects are re-checked over --days local dates around the run.
  RunExplanation x = explain_run(plan, model, zone->from_local(*local), o.days);
  if (o.format == "json") write_run_explanation_json(std::cout, plan, x);
  else write_run_explanation_text(std::cout, plan, x, TextStyle{use_colour()});
  return x.run.status == RunStatus::fail ? kExitFindings : kExitOk;
}

}  // namespace

int cmd_check(const std::vector<std::string>& args) {
  const Command& self = command_named("check");
  if (wants_help(args, self.usage)) return kExitOk;
  CheckOptions o;
  std::string problem = parse_check_args(args, &o);
  if (!problem.empty()) return usage_error(problem, self.usage);
  std::optional<Plan> loaded = load_plan_or_report(o.plan_path);
  if (!loaded) return kExitBadInput;
  const Plan& plan = *loaded;
  if (!o.run.empty()) return explain_one_run(plan, o);
  if (!o.from) o.from = today_in(*plan.zone);
  // Each run is computed as the report reads it; the writers keep only the
  // runs that are not ok, to group them into patterns.
  Evaluation ev = evaluate_lazily(plan, *o.from, o.days);
  if (o.format == "json") write_check_json(std::cout, plan, ev);
  else write_check_text(std::cout, plan, ev, TextStyle{use_colour()});
  std::cout.flush();
  return ev.ok() ? kExitOk : kExitFindings;
}

}  // namespace readyby
