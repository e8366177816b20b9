#include <iostream>
#include <map>

#include "cli/commands.h"
#include "cli/options.h"
#include "engine/edit.h"
#include "report/what_if_report.h"

namespace readyby {

namespace {

struct EditOption {
  const char* option;
  EditKind kind;
};
constexpr EditOption kEditOptions[] = {{"--delay", EditKind::delay},
                                       {"--fail", EditKind::fail},
                                       {"--schedule", EditKind::schedule},
                                       {"--runs", EditKind::runs},
                                       {"--max-age", EditKind::max_age}};

struct WhatIfOptions {
  std::string plan_path;
  std::optional<LocalDays> from;
  int days = 28;
  std::string format = "text";
  std::vector<std::pair<const EditOption*, std::string>> edits;  // as written, in order
};

std::string parse_what_if_args(const std::vector<std::string>& args, WhatIfOptions* o) {
  ArgTable table{window_rules(&o->from, &o->days), one_file("what-if", "PLAN", &o->plan_path)};
  table.options.push_back(format_rule({"text", "json"}, &o->format));
  for (const EditOption& e : kEditOptions) {
    table.options.push_back({e.option, true, [o, edit = &e](const std::optional<std::string>& v) {
                               if (!v) return std::string(edit->option) + " needs a value";
                               o->edits.emplace_back(edit, *v);
                               return std::string();
                             }});
  }
  if (std::string error = parse_args(args, table); !error.empty()) return error;
  if (o->plan_path.empty()) return "what-if needs a PLAN file";
  if (o->edits.empty()) return "what-if needs at least one edit (--delay, --fail, --schedule, --runs or --max-age)";
  return "";
}

}  // namespace

int cmd_what_if(const std::vector<std::string>& args) {
  const Command& self = command_named("what-if");
  if (wants_help(args, self.usage)) return kExitOk;
  WhatIfOptions o;
  std::string problem = parse_what_if_args(args, &o);
  if (!problem.empty()) return usage_error(problem, self.usage);
  std::optional<Plan> loaded = load_plan_or_report(o.plan_path);
  if (!loaded) return kExitBadInput;
  const Plan& plan = *loaded;

  // Every edit is checked against the plan as edited so far; all errors are reported.
  std::vector<Edit> edits;
  bool bad = false;
  for (const auto& [option, value] : o.edits) {
    EditParse p = parse_edit_value(plan, option->kind, value);
    if (p.value) {
      std::string later = edit_problem(apply_edits(plan, edits), *p.value);
      if (later.empty()) {
        edits.push_back(*p.value);
        continue;
      }
      p.error = later;
    }
    std::cerr << o.plan_path << ": error: " << option->option << " " << value << ": " << p.error << "\n";
    bad = true;
  }
  if (bad) return kExitBadInput;

  if (!o.from) o.from = today_in(*plan.zone);
  Evaluation before = evaluate(plan, *o.from, o.days);
  Plan edited = apply_edits(plan, edits);
  Evaluation after = reevaluate(before, edited, edits);
  WhatIfResult result{&plan, &edited, edits, &before, &after, status_changes(before, after)};
  if (o.format == "json") write_what_if_json(std::cout, result);
  else write_what_if_text(std::cout, result);
  std::cout.flush();

  // Exit 1 when some run fails now that did not fail before (a new run of a
  // `runs` edit counts when it fails).
  std::map<std::pair<int64_t, int>, RunStatus> was;
  for (const RunResult& r : before.runs) was[{to_unix(r.at), r.model}] = r.status;
  for (const RunResult& r : after.runs) {
    if (r.status != RunStatus::fail) continue;
    auto it = was.find({to_unix(r.at), r.model});
    if (it == was.end() || it->second != RunStatus::fail) return kExitFindings;
  }
  return kExitOk;
}

}  // namespace readyby
