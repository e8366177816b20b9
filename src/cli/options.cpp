#include "cli/options.h"

#include <unistd.h>

#include <cstdlib>

#include <iostream>

#include "cli/commands.h"
#include "plan/plan_loader.h"

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

bool use_colour() {
  const char* no_colour = std::getenv("NO_COLOR");
  if (no_colour && *no_colour) return false;
  const char* term = std::getenv("TERM");
  if (term && std::string_view(term) == "dumb") return false;
  return isatty(STDOUT_FILENO) != 0;
}

}  // namespace readyby
