// `readyby record LOG... --plan PLAN [--db FILE] [--map ...] [--map-status ...]`: validate every
// landing log against the plan, then record each file in its own transaction.
// Any bad row in any file rejects the whole command before anything is written.

#include <iostream>

#include "cli/commands.h"
#include "cli/options.h"
#include "history/landing_log.h"
#include "history/store.h"
#include "plan/plan_loader.h"

namespace readyby {

namespace {

struct RecordOptions {
  std::vector<std::string> logs;
  std::string plan_path;
  std::string db_path = "readyby.db";
  ColumnMap map;
};

const Command& record_command() { return command_named("record"); }

std::string parse_record_args(const std::vector<std::string>& args, RecordOptions* o) {
  ArgTable table{{path_rule("--plan", "a PLAN file", &o->plan_path), path_rule("--db", "a FILE", &o->db_path)},
                 [o](const std::string& log) {
                   o->logs.push_back(log);
                   return std::string();
                 },
                 true};  // "-" is a file name here, not an option
  table.options.push_back({"--map", true, [o](const std::optional<std::string>& v) {
                             if (!v) return std::string("--map needs FIELD=COLUMN pairs");
                             std::string problem;
                             std::optional<ColumnMap> map = parse_column_map(*v, &problem);
                             if (!map) return problem;
                             o->map.column = map->column;
                             return std::string();
                           }});
  table.options.push_back({"--map-status", true, [o](const std::optional<std::string>& v) {
                             if (!v) return std::string("--map-status needs VALUE=ok|failed|skip pairs");
                             std::string problem;
                             if (!parse_status_map(*v, &o->map, &problem)) return problem;
                             return std::string();
                           }});
  if (std::string error = parse_args(args, table); !error.empty()) return error;
  if (o->logs.empty()) return "record needs at least one LOG file";
  if (o->plan_path.empty()) return "record needs --plan PLAN (the plan whose nodes the logs name)";
  return "";
}

}  // namespace

int cmd_record(const std::vector<std::string>& args) {
  const Command& self = record_command();
  if (wants_help(args, self.usage)) return kExitOk;
  RecordOptions o;
  std::string problem = parse_record_args(args, &o);
  if (!problem.empty()) return usage_error(problem, self.usage);
  std::optional<Plan> loaded = load_plan_or_report(o.plan_path);
  if (!loaded) return kExitBadInput;
  const Plan& plan = *loaded;

  // Validate every file before writing anything.
  std::vector<LandingLog> logs;
  size_t bad = 0;
  for (const std::string& path : o.logs) {
    logs.push_back(read_landing_log(path, plan, o.map));
    for (const LogError& e : logs.back().errors) std::cerr << e.str() << "\n";
    bad += logs.back().errors.empty() ? 0 : 1;
  }
  if (bad > 0) {
    std::cerr << "readyby: nothing recorded: " << bad << " of " << o.logs.size() << " file"
              << (o.logs.size() == 1 ? "" : "s") << " had errors\n";
    return kExitBadInput;
  }

  std::string error;
  std::unique_ptr<HistoryStore> store = HistoryStore::open(o.db_path, HistoryStore::Mode::create, &error);
  if (!store) {
    std::cerr << "readyby: " << error << "\n";
    return kExitBadInput;
  }
  for (size_t i = 0; i < logs.size(); ++i) {
    std::optional<int64_t> added = store->record(plan, logs[i].rows, &error);
    if (!added) {
      std::cerr << "readyby: " << o.logs[i] << ": not recorded (nothing of this file was written): " << error << "\n";
      return kExitBadInput;
    }
    std::cout << o.logs[i] << ": " << logs[i].rows.size() << " row" << (logs[i].rows.size() == 1 ? "" : "s") << ", "
              << *added << " new";
    if (logs[i].skipped > 0) std::cout << " (" << logs[i].skipped << " skipped by --map-status)";
    std::cout << std::endl;  // flushed: progress for whoever watches
  }
  int64_t total = store->row_count(&error);
  if (total >= 0) std::cout << o.db_path << ": " << total << " landing rows recorded in all\n";
  return kExitOk;
}

}  // namespace readyby
