#include "cli/options.h"

#include <unistd.h>

#include <chrono>
#include <cstdlib>

#include <iostream>

#include "cli/commands.h"
#include "plan/plan_loader.h"
#include "time/zone.h"

namespace readyby {

bool is_option(const std::string& arg, std::string_view name) {
  return arg == name || (arg.size() > name.size() && arg.starts_with(name) && arg[name.size()] == '=');
}

std::optional<std::string> option_value(const std::vector<std::string>& args, size_t* i, std::string_view name) {
  const std::string& a = args[*i];
  if (!is_option(a, name)) return std::nullopt;
  if (a.size() > name.size()) return a.substr(name.size() + 1);
  if (*i + 1 < args.size()) return args[++*i];
  return std::nullopt;
}

const Command& command_named(std::string_view name) {
  for (const Command& c : command_table()) {
    if (name == c.name) return c;
  }
  return command_table().front();
}

std::optional<Plan> load_plan_or_report(const std::string& path) {
  PlanLoadResult loaded = load_plan_file(path);
  if (!loaded.plan) std::cerr << loaded.rendered;
  return std::move(loaded.plan);
}

std::optional<long> whole_number(const std::optional<std::string>& text, long lo, long hi) {
  if (!text || text->empty()) return std::nullopt;
  char* end = nullptr;
  long n = std::strtol(text->c_str(), &end, 10);
  if (*end || n < lo || n > hi) return std::nullopt;
  return n;
}

bool take_format(const std::vector<std::string>& args, size_t* i, const std::vector<std::string>& allowed,
                 std::string* format, std::string* error) {
  if (!is_option(args[*i], "--format")) return false;
  std::optional<std::string> v = option_value(args, i, "--format");
  for (const std::string& a : allowed) {
    if (v && *v == a) {
      *format = a;
      return true;
    }
  }
  std::string list;
  for (size_t k = 0; k < allowed.size(); ++k) {
    list += (k == 0 ? "" : k + 1 == allowed.size() ? " or " : ", ") + allowed[k];
  }
  *error = "--format must be " + list;
  return true;
}

bool take_window(const std::vector<std::string>& args, size_t* i, std::optional<LocalDays>* from, int* days,
                 std::string* error) {
  if (is_option(args[*i], "--from")) {
    std::optional<std::string> v = option_value(args, i, "--from");
    if (!v || !(*from = parse_date(*v))) *error = "--from needs a date YYYY-MM-DD";
    else if (std::string bad = unsupported_date(**from); !bad.empty()) *error = "--from " + bad;
    return true;
  }
  if (is_option(args[*i], "--days")) {
    std::optional<long> n = whole_number(option_value(args, i, "--days"), 1, 3660);
    if (n) *days = static_cast<int>(*n);
    else *error = "--days needs a whole number from 1 to 3660";
    return true;
  }
  return false;
}

LocalDays today_in(const Zone& zone) {
  Instant now = std::chrono::time_point_cast<Seconds>(std::chrono::system_clock::now());
  return date::floor<date::days>(zone.to_local(now));
}

bool use_colour() {
  const char* no_colour = std::getenv("NO_COLOR");
  if (no_colour && *no_colour) return false;
  const char* term = std::getenv("TERM");
  if (term && std::string_view(term) == "dumb") return false;
  return isatty(STDOUT_FILENO) != 0;
}

}  // namespace readyby
