#include "cli/commands.h"

#include <cstdio>
#include <iostream>

#include "util/text.h"

namespace readyby {

namespace {

const char* const kVersion = "readyby 0.1.0";

int cmd_help(const std::vector<std::string>& args);

const char kHelpUsage[] = "usage: readyby help [COMMAND]\n";
const char kValidateUsage[] =
    "usage: readyby validate PLAN\n"
    "  Checks a data plan file and reports every error as PATH:LINE:COL.\n"
    "  Exit 0 when valid, 2 when not.\n";
const char kCheckUsage[] =
    "usage: readyby check PLAN [--from YYYY-MM-DD] [--days N] [--format text|json]\n"
    "       readyby check PLAN --run MODEL@YYYY-MM-DDTHH:MM [--format text|json]\n"
    "  Evaluates every run of every model whose local date is in [from, from+days):\n"
    "  is each feature's data fresh by the run? Defaults: --from today in the plan's\n"
    "  zone, --days 28, --format text. --run explains one run step by step.\n"
    "  Exit 0 when every run is ok or degraded, 1 when some run fails, 2 on bad input.\n";

}  // namespace

const std::vector<Command>& command_table() {
  static const std::vector<Command> kTable = {
      {"validate", "check a data plan file and report every error", kValidateUsage, cmd_validate},
      {"check", "will every feature be fresh by every model run?", kCheckUsage, cmd_check},
      {"help", "list the commands, or show one command's usage", kHelpUsage, cmd_help},
  };
  return kTable;
}

bool wants_help(const std::vector<std::string>& args, const char* usage) {
  for (const std::string& a : args) {
    if (a == "-h" || a == "--help") {
      std::fputs(usage, stdout);
      return true;
    }
  }
  return false;
}

int usage_error(const std::string& message, const char* usage) {
  std::cerr << "readyby: " << message << "\n" << usage;
  return kExitBadInput;
}

namespace {

int cmd_help(const std::vector<std::string>& args) {
  if (!args.empty()) {
    for (const Command& c : command_table()) {
      if (args[0] == c.name) {
        std::fputs(c.usage, stdout);
        return kExitOk;
      }
    }
    return usage_error("no command '" + args[0] + "'", kHelpUsage);
  }
  std::printf("%s: is the data there in time, and has a published score already covered it?\n\n", kVersion);
  std::printf("usage: readyby COMMAND [ARGS]\n\ncommands:\n");
  for (const Command& c : command_table()) std::printf("  %-10s %s\n", c.name, c.summary);
  std::printf("\n'readyby COMMAND --help' shows a command's options.\n");
  return kExitOk;
}

}  // namespace

int run_cli(const std::vector<std::string>& args) {
  if (args.empty()) return cmd_help({});
  const std::string& name = args[0];
  if (name == "--version" || name == "version") {
    std::printf("%s\n", kVersion);
    return kExitOk;
  }
  if (name == "-h" || name == "--help") return cmd_help({});
  std::vector<std::string> rest(args.begin() + 1, args.end());
  std::vector<std::string> names;
  for (const Command& c : command_table()) {
    if (name == c.name) return c.handler(rest);
    names.emplace_back(c.name);
  }
  std::cerr << "readyby: unknown command '" << name << "'" << did_you_mean(name, names)
            << "\nrun 'readyby help' for the list of commands\n";
  return kExitBadInput;
}

}  // namespace readyby
