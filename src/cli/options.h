#pragma once
// Small helpers shared by the command handlers: option values, the command's
// own table entry, and whether to colour output.

#include <functional>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "time/instant.h"

namespace readyby {

struct Command;
struct Plan;
class Zone;

/// The value of option `name` at args[*i], written `--name=value` or
/// `--name value` (then *i advances past the value); nullopt when args[*i] is
/// not that option or its value is missing.
std::optional<std::string> option_value(const std::vector<std::string>& args, size_t* i, std::string_view name);

/// Whether args[i] is option `name` in either form.
bool is_option(const std::string& arg, std::string_view name);

/// "unknown option 'ARG'", with " (did you mean '--NAME'?)" when one of the
/// options named in `usage` (every `--name` it mentions, and --help) is close
/// to ARG; a value written `--name=value` is left out of the comparison.
std::string unknown_option(const std::string& arg, const char* usage);

/// "a, b, c" — at most `at_most` names, then " and N more".
std::string name_list(const std::vector<std::string>& names, size_t at_most = 20);

/// The command table entry named `name` (which must exist).
const Command& command_named(std::string_view name);

/// One option of a command's table: its name, whether it takes a value, and
/// what to do with it. `take` gets the value (nullopt when it is missing, and
/// always nullopt for a flag) and returns an error message or "".
struct OptionRule {
  std::string_view name;  // "--db"
  bool takes_value = true;
  std::function<std::string(const std::optional<std::string>& value)> take;
};

/// A command's arguments, declared: its options and what a positional
/// argument (anything not starting with '-', and "-" itself when
/// `dash_is_positional`) does.
struct ArgTable {
  std::vector<OptionRule> options;
  std::function<std::string(const std::string& arg)> positional;
  bool dash_is_positional = false;
};

/// Walks `args` once against `table`: `--name value` and `--name=value` both
/// work; an option not in the table is "unknown option" with a did-you-mean
/// among the table's names; a flag given a value (`--verify=x`) is an error.
/// Returns the first error, or "".
std::string parse_args(const std::vector<std::string>& args, const ArgTable& table);

/// Rules shared by several commands.
/// `--from YYYY-MM-DD` and `--days N` (1-3660): the window of local dates.
std::vector<OptionRule> window_rules(std::optional<LocalDays>* from, int* days);
/// `--format` with one of `allowed` ("--format must be text or json").
OptionRule format_rule(std::vector<std::string> allowed, std::string* format);
/// An option naming a file or folder: "--db needs a FILE" when missing or empty.
OptionRule path_rule(std::string_view name, std::string what, std::string* path);
/// A whole-number option in [lo, hi]: `error` when missing or out of range.
OptionRule number_rule(std::string_view name, long lo, long hi, std::string error, std::function<void(long)> set);
/// A date option: "--date needs a date YYYY-MM-DD", and the supported range.
OptionRule date_rule(std::string_view name, std::optional<LocalDays>* date);
/// `--registry DIR`, repeatable.
OptionRule registry_rule(std::vector<std::string>* registries);
/// The positional rule of a command that takes one file: the first sets
/// `path`, a second is "COMMAND takes one WHAT file".
std::function<std::string(const std::string&)> one_file(std::string command, std::string what, std::string* path);

/// "unknown option 'ARG'" with " (did you mean 'NAME'?)" when one of `names`
/// (or --help) is close to ARG.
std::string unknown_option(const std::string& arg, const std::vector<std::string_view>& names);

/// Today's local date in `zone`.
LocalDays today_in(const Zone& zone);

/// Colour only on a terminal, never when NO_COLOR is set or TERM is dumb.
bool use_colour();

/// Loads the plan at `path`; prints its warnings to stderr, and on any error
/// every diagnostic (with source lines and carets), then returns nullopt.
std::optional<Plan> load_plan_or_report(const std::string& path);

/// `text` as a whole number in [lo, hi]; nullopt when absent, not a number
/// or out of range.
std::optional<long> whole_number(const std::optional<std::string>& text, long lo, long hi);

}  // namespace readyby
