#include <cstdio>
#include <iostream>

#include "cli/commands.h"
#include "cli/options.h"
#include "plan/plan_loader.h"

namespace readyby {

int cmd_validate(const std::vector<std::string>& args) {
  const Command& self = command_named("validate");
  if (wants_help(args, self.usage)) return kExitOk;
  if (args.size() != 1 || args[0].starts_with("-")) {
    return usage_error(args.empty() ? "validate needs a PLAN file" : "validate takes exactly one PLAN file", self.usage);
  }
  PlanLoadResult loaded = load_plan_file(args[0]);
  if (!loaded.plan) {
    std::cerr << loaded.rendered;
    std::cerr << loaded.errors.size() << (loaded.errors.size() == 1 ? " error" : " errors") << " in " << args[0] << "\n";
    return kExitBadInput;
  }
  const Plan& plan = *loaded.plan;
  std::printf("%s: plan '%s' is valid: %zu sources, %zu jobs, %zu features, %zu models\n", args[0].c_str(),
              plan.id.c_str(), plan.count(NodeKind::source), plan.count(NodeKind::job), plan.count(NodeKind::feature),
              plan.models.size());
  return kExitOk;
}

}  // namespace readyby
