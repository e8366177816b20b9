#include "cli/options.h"

#include <unistd.h>

#include <algorithm>
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

namespace {

// Edit distance where swapping two neighbouring characters costs 1, like an
// insertion, deletion or substitution (the optimal string alignment
// distance): "--fromat" is one step from "--format", two from "--from".
size_t typo_distance(std::string_view a, std::string_view b) {
  std::vector<std::vector<size_t>> d(a.size() + 1, std::vector<size_t>(b.size() + 1));
  for (size_t i = 0; i <= a.size(); ++i) d[i][0] = i;
  for (size_t j = 0; j <= b.size(); ++j) d[0][j] = j;
  for (size_t i = 1; i <= a.size(); ++i) {
    for (size_t j = 1; j <= b.size(); ++j) {
      d[i][j] = std::min({d[i - 1][j] + 1, d[i][j - 1] + 1, d[i - 1][j - 1] + (a[i - 1] == b[j - 1] ? 0 : 1)});
      if (i > 1 && j > 1 && a[i - 1] == b[j - 2] && a[i - 2] == b[j - 1]) d[i][j] = std::min(d[i][j], d[i - 2][j - 2] + 1);
    }
  }
  return d[a.size()][b.size()];
}

}  // namespace

std::string unknown_option(const std::string& arg, const std::vector<std::string_view>& names) {
  const std::string name = arg.substr(0, std::min(arg.find('='), size_t{64}));
  const size_t limit = std::max<size_t>(2, name.size() / 3);  // as util/text.h's nearest()
  size_t best = limit + 1;
  std::string found;
  auto consider = [&](std::string_view k) {
    const size_t d = typo_distance(name, k);
    if (d < best) best = d, found = std::string(k);
  };
  consider("--help");
  for (std::string_view k : names) consider(k);
  return "unknown option '" + arg + "'" + (found.empty() ? "" : " (did you mean '" + found + "'?)");
}

std::string unknown_option(const std::string& arg, const char* usage) {
  std::vector<std::string> known;
  std::string_view text(usage);
  for (size_t at = text.find("--"); at != std::string_view::npos; at = text.find("--", at + 2)) {
    size_t end = at + 2;
    while (end < text.size() && ((text[end] >= 'a' && text[end] <= 'z') || text[end] == '-')) ++end;
    std::string name(text.substr(at, end - at));
    if (name.size() > 2 && std::find(known.begin(), known.end(), name) == known.end()) known.push_back(name);
    at = end - 2;
  }
  return unknown_option(arg, std::vector<std::string_view>(known.begin(), known.end()));
}

std::string parse_args(const std::vector<std::string>& args, const ArgTable& table) {
  for (size_t i = 0; i < args.size(); ++i) {
    const std::string& a = args[i];
    if (!a.starts_with("-") || (a == "-" && table.dash_is_positional)) {
      if (std::string error = table.positional(a); !error.empty()) return error;
      continue;
    }
    const OptionRule* rule = nullptr;
    for (const OptionRule& r : table.options) {
      if (is_option(a, r.name)) rule = &r;
    }
    if (!rule) {
      std::vector<std::string_view> names;
      for (const OptionRule& r : table.options) names.push_back(r.name);
      return unknown_option(a, names);
    }
    std::optional<std::string> value;
    if (rule->takes_value) {
      value = option_value(args, &i, rule->name);
    } else if (a != rule->name) {
      return std::string(rule->name) + " takes no value";
    }
    if (std::string error = rule->take(value); !error.empty()) return error;
  }
  return "";
}

std::vector<OptionRule> window_rules(std::optional<LocalDays>* from, int* days) {
  return {
      {"--from", true,
       [from](const std::optional<std::string>& v) -> std::string {
         if (!v || !(*from = parse_date(*v))) return "--from needs a date YYYY-MM-DD";
         if (std::string bad = unsupported_date(**from); !bad.empty()) return "--from " + bad;
         return "";
       }},
      number_rule("--days", 1, 3660, "--days needs a whole number from 1 to 3660",
                  [days](long n) { *days = static_cast<int>(n); }),
  };
}

OptionRule format_rule(std::vector<std::string> allowed, std::string* format) {
  return {"--format", true, [allowed = std::move(allowed), format](const std::optional<std::string>& v) {
            for (const std::string& a : allowed) {
              if (v && *v == a) {
                *format = a;
                return std::string();
              }
            }
            std::string list;
            for (size_t k = 0; k < allowed.size(); ++k) {
              list += (k == 0 ? "" : k + 1 == allowed.size() ? " or " : ", ") + allowed[k];
            }
            return "--format must be " + list;
          }};
}

OptionRule path_rule(std::string_view name, std::string what, std::string* path) {
  return {name, true, [name, what = std::move(what), path](const std::optional<std::string>& v) {
            if (!v || v->empty()) return std::string(name) + " needs " + what;
            *path = *v;
            return std::string();
          }};
}

OptionRule number_rule(std::string_view name, long lo, long hi, std::string error, std::function<void(long)> set) {
  return {name, true, [lo, hi, error = std::move(error), set = std::move(set)](const std::optional<std::string>& v) {
            std::optional<long> n = whole_number(v, lo, hi);
            if (!n) return error;
            set(*n);
            return std::string();
          }};
}

OptionRule date_rule(std::string_view name, std::optional<LocalDays>* date) {
  return {name, true, [name, date](const std::optional<std::string>& v) {
            if (!v || !(*date = parse_date(*v))) return std::string(name) + " needs a date YYYY-MM-DD";
            if (std::string bad = unsupported_date(**date); !bad.empty()) return std::string(name) + " " + bad;
            return std::string();
          }};
}

OptionRule registry_rule(std::vector<std::string>* registries) {
  return {"--registry", true, [registries](const std::optional<std::string>& v) {
            if (!v || v->empty()) return std::string("--registry needs a folder");
            registries->push_back(*v);
            return std::string();
          }};
}

std::function<std::string(const std::string&)> one_file(std::string command, std::string what, std::string* path) {
  return [command = std::move(command), what = std::move(what), path](const std::string& arg) {
    if (!path->empty()) return command + " takes one " + what + " file";
    *path = arg;
    return std::string();
  };
}

std::string name_list(const std::vector<std::string>& names, size_t at_most) {
  std::string out;
  for (size_t i = 0; i < names.size() && i < at_most; ++i) out += (i ? ", " : "") + names[i];
  if (names.size() > at_most) out += " and " + std::to_string(names.size() - at_most) + " more";
  return out;
}

const Command& command_named(std::string_view name) {
  for (const Command& c : command_table()) {
    if (name == c.name) return c;
  }
  return command_table().front();
}

std::optional<Plan> load_plan_or_report(const std::string& path) {
  PlanLoadResult loaded = load_plan_file(path);
  std::cerr << loaded.rendered;  // the errors, or the warnings of a valid plan
  return std::move(loaded.plan);
}

std::optional<long> whole_number(const std::optional<std::string>& text, long lo, long hi) {
  if (!text || text->empty()) return std::nullopt;
  char* end = nullptr;
  long n = std::strtol(text->c_str(), &end, 10);
  if (*end || n < lo || n > hi) return std::nullopt;
  return n;
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
