// `readyby margins` and `readyby impact`: the two plan-wide counterfactual
// reports of DESIGN §9. They share their options (PLAN, --from, --days,
// --format) and their exit statuses (as check: 1 when some run of the window
// fails, else 0; 2 on bad input).
#include <iostream>

#include "cli/commands.h"
#include "cli/options.h"
#include "engine/impact.h"
#include "engine/margins.h"
#include "report/margins_report.h"

namespace readyby {

namespace {

struct WindowOptions {
  std::string plan_path;
  std::optional<LocalDays> from;
  int days = 28;
  std::string format = "text";
  bool verify = false;  // margins: re-evaluate every cone at M and M + 1 minute
};

std::string parse_window_args(const char* command, const std::vector<std::string>& args, WindowOptions* o) {
  ArgTable table{window_rules(&o->from, &o->days), one_file(command, "PLAN", &o->plan_path)};
  table.options.push_back(format_rule({"text", "json"}, &o->format));
  if (std::string_view(command) == "margins") {
    table.options.push_back({"--verify", false, [o](const std::optional<std::string>&) {
                               o->verify = true;
                               return std::string();
                             }});
  }
  if (std::string error = parse_args(args, table); !error.empty()) return error;
  if (o->plan_path.empty()) return std::string(command) + " needs a PLAN file";
  return "";
}

// Parses, loads and evaluates; returns the exit status on failure.
std::optional<int> prepare(const char* command, const std::vector<std::string>& args, WindowOptions* o,
                           std::optional<Plan>* plan) {
  const Command& self = command_named(command);
  if (wants_help(args, self.usage)) return kExitOk;
  std::string problem = parse_window_args(command, args, o);
  if (!problem.empty()) return usage_error(problem, self.usage);
  *plan = load_plan_or_report(o->plan_path);
  if (!*plan) return kExitBadInput;
  if (!o->from) o->from = today_in(*(*plan)->zone);
  return std::nullopt;
}

}  // namespace

int cmd_margins(const std::vector<std::string>& args) {
  WindowOptions o;
  std::optional<Plan> plan;
  if (std::optional<int> status = prepare("margins", args, &o, &plan)) return *status;
  Evaluation ev = evaluate(*plan, *o.from, o.days);
  MarginOptions options;
  if (o.verify) options.check = MarginOptions::Check::full;
  std::vector<Margin> result = margins(*plan, ev, options);
  if (o.format == "json") write_margins_json(std::cout, *plan, result);
  else write_margins_text(std::cout, *plan, ev, result);
  std::cout.flush();
  return ev.ok() ? kExitOk : kExitFindings;
}

int cmd_impact(const std::vector<std::string>& args) {
  WindowOptions o;
  std::optional<Plan> plan;
  if (std::optional<int> status = prepare("impact", args, &o, &plan)) return *status;
  Evaluation ev = evaluate(*plan, *o.from, o.days);
  std::vector<NodeImpact> result = impact(*plan, ev);
  if (o.format == "json") write_impact_json(std::cout, *plan, result);
  else write_impact_text(std::cout, *plan, ev, result);
  std::cout.flush();
  return ev.ok() ? kExitOk : kExitFindings;
}

}  // namespace readyby
