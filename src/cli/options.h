#pragma once
// Small helpers shared by the command handlers: option values, the command's
// own table entry, and whether to colour output.

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

/// Handles args[*i] when it is `--format`: returns true and sets *format, or
/// sets *error ("--format must be text or json") when the value is not one of
/// `allowed`. Returns false when args[*i] is another argument.
bool take_format(const std::vector<std::string>& args, size_t* i, const std::vector<std::string>& allowed,
                 std::string* format, std::string* error);

/// Handles args[*i] when it is `--from YYYY-MM-DD` or `--days N` (1-3660),
/// the window of local dates that `check` and `intake` take; like take_format.
bool take_window(const std::vector<std::string>& args, size_t* i, std::optional<LocalDays>* from, int* days,
                 std::string* error);

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
