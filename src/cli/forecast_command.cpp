// `readyby forecast PLAN --db FILE [--from D] [--days N] [--draws N] [--seed S]
//  [--backtest-from D] [--format text|json]`: how often each model run will
// be on time, judged from the recorded landing history; or a backtest of
// that forecast against what happened.

#include <cerrno>
#include <cstdlib>
#include <iostream>

#include "cli/commands.h"
#include "cli/options.h"
#include "forecast/backtest.h"
#include "forecast/forecast.h"
#include "history/store.h"
#include "report/forecast_report.h"

namespace readyby {

namespace {

struct ForecastCliOptions {
  std::string plan_path;
  std::string db_path = "readyby.db";
  std::optional<LocalDays> from;
  std::optional<LocalDays> backtest_from;
  int days = 28;
  bool days_given = false;
  ForecastOptions forecast;
  std::string format = "text";
};

std::optional<uint64_t> parse_seed(const std::optional<std::string>& text) {
  if (!text || text->empty() || text->size() > 20) return std::nullopt;
  for (char c : *text) {
    if (c < '0' || c > '9') return std::nullopt;
  }
  errno = 0;
  const unsigned long long v = std::strtoull(text->c_str(), nullptr, 10);
  if (errno == ERANGE) return std::nullopt;
  return static_cast<uint64_t>(v);
}

std::string parse_forecast_args(const std::vector<std::string>& args, ForecastCliOptions* o) {
  ArgTable table{window_rules(&o->from, &o->days), one_file("forecast", "PLAN", &o->plan_path)};
  // --days also says that the window was chosen (a backtest otherwise runs to the end of the history).
  OptionRule& days = table.options[1];
  days.take = [o, inner = days.take](const std::optional<std::string>& v) {
    o->days_given = true;
    return inner(v);
  };
  table.options.push_back(format_rule({"text", "json"}, &o->format));
  table.options.push_back(path_rule("--db", "a FILE", &o->db_path));
  table.options.push_back(number_rule("--draws", 1, 1000000, "--draws needs a whole number from 1 to 1000000",
                                      [o](long n) { o->forecast.draws = static_cast<int>(n); }));
  table.options.push_back({"--seed", true, [o](const std::optional<std::string>& v) {
                             std::optional<uint64_t> seed = parse_seed(v);
                             if (!seed) return std::string("--seed needs a whole number from 0 to 18446744073709551615");
                             o->forecast.seed = *seed;
                             return std::string();
                           }});
  table.options.push_back({"--backtest-from", true, [o](const std::optional<std::string>& v) {
                             if (!v || !(o->backtest_from = parse_date(*v))) {
                               return std::string("--backtest-from needs a date YYYY-MM-DD");
                             }
                             return std::string();
                           }});
  if (std::string error = parse_args(args, table); !error.empty()) return error;
  if (o->plan_path.empty()) return "forecast needs a PLAN file";
  if (o->backtest_from && o->from) return "--backtest-from and --from do not go together (the backtest starts at its date)";
  return "";
}

}  // namespace

int cmd_forecast(const std::vector<std::string>& args) {
  const Command& self = command_named("forecast");
  if (wants_help(args, self.usage)) return kExitOk;
  ForecastCliOptions o;
  std::string problem = parse_forecast_args(args, &o);
  if (!problem.empty()) return usage_error(problem, self.usage);
  std::optional<Plan> loaded = load_plan_or_report(o.plan_path);
  if (!loaded) return kExitBadInput;
  const Plan& plan = *loaded;
  std::string error;
  std::unique_ptr<HistoryStore> store = HistoryStore::open(o.db_path, HistoryStore::Mode::existing, &error);
  if (!store) {
    std::cerr << "readyby: " << error << "\n";
    return kExitBadInput;
  }
  std::optional<History> history = store->read(plan, from_unix(0), &error);
  if (!history) {
    std::cerr << "readyby: " << o.db_path << ": " << error << "\n";
    return kExitBadInput;
  }
  store.reset();

  if (o.backtest_from) {
    if (!o.days_given) {
      std::optional<LocalDays> last = last_history_date(plan, *history);
      if (!last || *last < *o.backtest_from) {
        std::cerr << "readyby: " << o.db_path << " holds no landing on or after " << format_date(*o.backtest_from)
                  << " to score a backtest against\n";
        return kExitBadInput;
      }
      o.days = static_cast<int>((*last - *o.backtest_from).count()) + 1;
    }
    BacktestReport report = backtest(plan, *history, *o.backtest_from, o.days, o.forecast);
    if (report.runs.empty()) {
      std::cerr << "readyby: no model runs with local dates from " << format_date(*o.backtest_from) << " over "
                << o.days << " days\n";
      return kExitBadInput;
    }
    if (o.format == "json") write_backtest_json(std::cout, plan, report);
    else write_backtest_text(std::cout, plan, report);
    std::cout.flush();
    return kExitOk;
  }
  if (!o.from) o.from = today_in(*plan.zone);
  ForecastReport report = forecast_plan(plan, *history, *o.from, o.days, o.forecast);
  if (o.format == "json") write_forecast_json(std::cout, plan, report);
  else write_forecast_text(std::cout, plan, report);
  std::cout.flush();
  return kExitOk;
}

}  // namespace readyby
