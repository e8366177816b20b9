#include <cstdio>
#include <iostream>
#include <string>

#include "cli/commands.h"
#include "cli/options.h"
#include "plan/plan_loader.h"

namespace readyby {

int cmd_validate(const std::vector<std::string>& args) {
  const Command& self = command_named("validate");
  if (wants_help(args, self.usage)) return kExitOk;
  // Options first: `validate plan.yaml --format json` is about the option.
  for (const std::string& a : args) {
    if (a.starts_with("-") && a != "-") return usage_error(unknown_option(a, self.usage), self.usage);
  }
  if (args.size() != 1) {
    return usage_error(args.empty() ? "validate needs a PLAN file" : "validate takes exactly one PLAN file", self.usage);
  }
  PlanLoadResult loaded = load_plan_file(args[0]);
  std::cerr << loaded.rendered;  // errors, or the warnings of a valid plan
  if (!loaded.plan) {
    std::cerr << loaded.errors.size() << (loaded.errors.size() == 1 ? " error" : " errors") << " in " << args[0] << "\n";
    return kExitBadInput;
  }
  const Plan& plan = *loaded.plan;
  const size_t warnings = loaded.warnings.size();
  std::printf("%s: plan '%s' is valid: %zu sources, %zu jobs, %zu features, %zu models%s\n", args[0].c_str(),
              plan.id.c_str(), plan.count(NodeKind::source), plan.count(NodeKind::job), plan.count(NodeKind::feature),
              plan.models.size(),
              warnings == 0 ? "" : (" (" + std::to_string(warnings) + (warnings == 1 ? " warning)" : " warnings)")).c_str());
  return kExitOk;
}

}  // namespace readyby
