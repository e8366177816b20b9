#include "cli/commands.h"

namespace readyby {

int cmd_check(const std::vector<std::string>& args) {
  const Command& self = command_table()[1];
  if (wants_help(args, self.usage)) return kExitOk;
  return usage_error("check is not available yet", self.usage);
}

}  // namespace readyby
