// `readyby nightly PLAN [--db FILE] [--date D] [--window N] [--format F]`:
// the day's runs against what actually landed, with drift and on-time rates.

#include <chrono>
#include <cstdlib>
#include <iostream>

#include "cli/commands.h"
#include "cli/options.h"
#include "history/nightly.h"
#include "history/store.h"
#include "plan/plan_loader.h"
#include "report/nightly_report.h"

namespace readyby {

namespace {

struct NightlyOptions {
  std::string plan_path;
  std::string db_path = "readyby.db";
  std::optional<LocalDays> date;
  int window = 28;
  std::string format = "text";
};

const Command& nightly_command() { return command_named("nightly"); }

std::string parse_nightly_args(const std::vector<std::string>& args, NightlyOptions* o) {
  ArgTable table{{path_rule("--db", "a FILE", &o->db_path), date_rule("--date", &o->date),
                  format_rule({"text", "json", "junit", "metrics"}, &o->format)},
                 one_file("nightly", "PLAN", &o->plan_path)};
  table.options.push_back(number_rule("--window", 1, 366, "--window needs a whole number of days from 1 to 366",
                                      [o](long n) { o->window = static_cast<int>(n); }));
  if (std::string error = parse_args(args, table); !error.empty()) return error;
  if (o->plan_path.empty()) return "nightly needs a PLAN file";
  return "";
}

}  // namespace

int cmd_nightly(const std::vector<std::string>& args) {
  const Command& self = nightly_command();
  if (wants_help(args, self.usage)) return kExitOk;
  NightlyOptions o;
  std::string problem = parse_nightly_args(args, &o);
  if (!problem.empty()) return usage_error(problem, self.usage);
  std::optional<Plan> loaded = load_plan_or_report(o.plan_path);
  if (!loaded) return kExitBadInput;
  const Plan& plan = *loaded;
  if (!o.date) o.date = today_in(*plan.zone);
  std::string error;
  std::unique_ptr<HistoryStore> store = HistoryStore::open(o.db_path, HistoryStore::Mode::read_only, &error);
  if (!store) {
    std::cerr << "readyby: " << error << "\n";
    return kExitBadInput;
  }
  std::vector<std::optional<Instant>> first;
  std::optional<History> history = store->read(plan, history_needed_since(plan, *o.date, o.window), &error, &first);
  if (!history) {
    std::cerr << "readyby: " << o.db_path << ": " << error << "\n";
    return kExitBadInput;
  }
  store.reset();
  NightlyReport report = evaluate_nightly(plan, *history, first, *o.date, o.window);
  report.evaluated_at = std::chrono::time_point_cast<Seconds>(std::chrono::system_clock::now());
  if (o.format != "text") {  // the text report shows them in place
    for (const SilentNode& q : report.silent) std::cerr << "readyby: warning: " << silent_warning(plan, q, plan.zone) << "\n";
  }
  if (o.format == "json") write_nightly_json(std::cout, plan, report);
  else if (o.format == "junit") write_nightly_junit(std::cout, plan, report);
  else if (o.format == "metrics") write_nightly_metrics(std::cout, plan, report);
  else write_nightly_text(std::cout, plan, report);
  std::cout.flush();
  return report.ok() ? kExitOk : kExitFindings;
}

}  // namespace readyby
