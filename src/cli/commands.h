#pragma once
// The command table: every subcommand with its one-line description and
// handler. `main` only dispatches; handlers live with their concern.

#include <string>
#include <vector>

namespace readyby {

/// Exit statuses shared by every command.
inline constexpr int kExitOk = 0;        // all runs ok or degraded / input valid
inline constexpr int kExitFindings = 1;  // some run fails
inline constexpr int kExitBadInput = 2;  // invalid input or usage

struct Command {
  const char* name;
  const char* summary;
  const char* usage;
  int (*handler)(const std::vector<std::string>& args);
};

/// All commands, in the order `readyby help` lists them.
const std::vector<Command>& command_table();

/// Dispatches `argv` (without the program name) to its command.
int run_cli(const std::vector<std::string>& args);

// Handlers (one per command), defined next to their concern.
int cmd_validate(const std::vector<std::string>& args);
int cmd_check(const std::vector<std::string>& args);
int cmd_record(const std::vector<std::string>& args);
int cmd_nightly(const std::vector<std::string>& args);
int cmd_forecast(const std::vector<std::string>& args);
int cmd_catalog(const std::vector<std::string>& args);
int cmd_reuse(const std::vector<std::string>& args);
int cmd_intake(const std::vector<std::string>& args);
int cmd_what_if(const std::vector<std::string>& args);
int cmd_margins(const std::vector<std::string>& args);
int cmd_impact(const std::vector<std::string>& args);
int cmd_report(const std::vector<std::string>& args);

/// True when `args` asks for help (-h / --help); prints `usage` then.
bool wants_help(const std::vector<std::string>& args, const char* usage);
/// Prints "readyby: MESSAGE" and the usage to stderr; returns kExitBadInput.
int usage_error(const std::string& message, const char* usage);

}  // namespace readyby
