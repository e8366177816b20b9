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

const char kRecordUsage[] =
    "usage: readyby record LOG... --plan PLAN [--db FILE] [--map FIELD=COLUMN,...]\n"
    "                      [--map-status VALUE=ok|failed|skip,...]\n"
    "  Records landing logs (CSV with a header row, or JSON Lines) into the history\n"
    "  database (default readyby.db). Columns: node, landed_at, data_through, and\n"
    "  optionally scheduled_at, rows, status (ok|failed). --map renames columns,\n"
    "  e.g. --map landed_at=load_end_ts,data_through=watermark; --map-status reads the\n"
    "  log's own status values, e.g. --map-status SUCCESS=ok,ERROR=failed,RUNNING=skip\n"
    "  (skip: the row is not a delivery and is left out). Every file is checked\n"
    "  first; any bad row rejects the whole command with PATH:LINE errors and nothing\n"
    "  is written. Each file is one transaction; recording a file again adds nothing.\n"
    "  Exit 0 when recorded, 2 on bad input.\n";
const char kNightlyUsage[] =
    "usage: readyby nightly PLAN [--db FILE] [--date YYYY-MM-DD] [--window N]\n"
    "                       [--format text|json|junit|metrics]\n"
    "  Evaluates the runs of one local date (default today in the plan's zone) with\n"
    "  the recorded landings: a node with recorded rows uses only them, others keep\n"
    "  their declared schedule. Reports landing drift and on-time rates over the last\n"
    "  N days (default 28). Default --db readyby.db, --format text.\n"
    "  Exit 0 when every run of the day is ok or degraded, 1 when some run fails,\n"
    "  2 on bad input.\n";
const char kForecastUsage[] =
    "usage: readyby forecast PLAN [--db FILE] [--from YYYY-MM-DD] [--days N] [--draws N] [--seed S]\n"
    "                        [--format text|json]\n"
    "       readyby forecast PLAN --backtest-from YYYY-MM-DD [--days N] [--db FILE] [--draws N] [--seed S]\n"
    "                        [--format text|json]\n"
    "  How often will each model run be on time, judged from how the feeds have really landed?\n"
    "  Samples every monitored feed's landings from its recorded history (landings before the\n"
    "  window) and evaluates every run with the nightly rules: per model and run time, the share of\n"
    "  runs on time with a 95% bootstrap interval, and the feed that most often makes them late.\n"
    "  --backtest-from fits on the history before the date and scores the forecast of the runs\n"
    "  from it on (to the last recorded landing, or --days) against what nightly finds, beside\n"
    "  the declared schedule: Brier score and calibration. Draws are independent across feeds\n"
    "  and deliveries. Defaults: --db readyby.db, --from today in the plan's zone, --days 28,\n"
    "  --draws 2000, --seed 20260101 (reproducible bit for bit), --format text.\n"
    "  Exit 0 on success, 2 on bad input.\n";
const char kCatalogUsage[] =
    "usage: readyby catalog validate [--registry DIR]...\n"
    "       readyby catalog search TEXT [--setting S] [--outcome C] [--limit N] [--format text|json] [--registry DIR]...\n"
    "       readyby catalog show ID [--registry DIR]...\n"
    "  validate checks every vocabulary and entry file and reports every error as PATH:LINE:COL.\n"
    "  search ranks entries by relevance to TEXT (BM25); --setting takes a setting id, --outcome a\n"
    "  concept id or text (narrower concepts included). show prints one entry.\n"
    "  --registry layers a local registry folder over the shipped one (repeatable).\n"
    "  Exit 0 on success, 2 on invalid input.\n";
const char kReuseUsage[] =
    "usage: readyby reuse PROPOSAL [--registry DIR]... [--format text|json]\n"
    "  Has an established score, or an in-house model, already covered this proposal? Matches the\n"
    "  proposal's outcome, settings, population, time point and horizon against every catalogue\n"
    "  entry and recommends reuse, adapt or build, criterion by criterion.\n"
    "  --registry layers a local registry folder over the shipped one (repeatable).\n"
    "  Exit 0 on success, 2 on invalid input.\n";
const char kIntakeUsage[] =
    "usage: readyby intake PROPOSAL [--from YYYY-MM-DD] [--days N] [--registry DIR]... [--db FILE]\n"
    "                      [--format text|json|markdown]\n"
    "  One screening report for a proposed model: will its data be there in time (the\n"
    "  proposal's plan and model, checked over [from, from+days)), has an established score\n"
    "  already covered it, can those scores run on time on this plan, and the recommendation:\n"
    "  reuse-and-validate, fix-data-plan-first, close-gaps-or-build or build.\n"
    "  With --db (a landing history, see record), also forecasts from how the feeds have really\n"
    "  landed the share of runs on which the model's, and each candidate score's, inputs are fresh.\n"
    "  The proposal must name a plan and a model. Defaults: --from today in the model's zone,\n"
    "  --days 28, --format text (markdown is made to paste into a review ticket).\n"
    "  Exit 0 when every run is ok or degraded, 1 when some run fails, 2 on bad input.\n";
const char kWhatIfUsage[] =
    "usage: readyby what-if PLAN [--delay NODE=DUR]... [--fail NODE]... [--schedule NODE=CRON]...\n"
    "                       [--runs MODEL=CRON]... [--max-age FEATURE=DUR]...\n"
    "                       [--from YYYY-MM-DD] [--days N] [--format text|json]\n"
    "  Checks the plan with edits applied and lists the runs whose status changes.\n"
    "  --delay: every landing of NODE happens DUR later (ISO 8601; -PT10M is earlier);\n"
    "  --fail: NODE never lands; --schedule: a source's schedule or a job's or feature's\n"
    "  cron trigger replaced (NODE=inputs: triggered by its inputs); --runs: a model's\n"
    "  run times replaced; --max-age: a feature's max_age replaced. Edits apply in order.\n"
    "  Defaults: --from today in the plan's zone, --days 28, --format text.\n"
    "  Exit 1 when an edit makes some run fail that did not fail before, else 0;\n"
    "  2 on bad input.\n";
const char kMarginsUsage[] =
    "usage: readyby margins PLAN [--from YYYY-MM-DD] [--days N] [--format text|json] [--verify]\n"
    "  For every node: how much later (whole minutes) every landing could be without any\n"
    "  run that is ok today degrading or failing, and the run that binds it. Smallest first.\n"
    "  Each margin is re-checked on its binding run; --verify re-evaluates every node's\n"
    "  downstream cone at its margin and one minute more (slower).\n"
    "  Defaults: --from today in the plan's zone, --days 28, --format text.\n"
    "  Exit 0, or 1 when some run of the window fails (as check); 2 on bad input.\n";
const char kImpactUsage[] =
    "usage: readyby impact PLAN [--from YYYY-MM-DD] [--days N] [--format text|json]\n"
    "  For every node: the runs, per model, that fail or degrade when the node never\n"
    "  lands, ranked; nodes whose loss fails runs of two or more models are called\n"
    "  single points of failure. Defaults as for check. Exit 0, or 1 when some run of\n"
    "  the window fails (as check); 2 on bad input.\n";

const char kReportUsage[] =
    "usage: readyby report PLAN [--from YYYY-MM-DD] [--days N] [--db FILE [--date YYYY-MM-DD]]\n"
    "                      [--proposal FILE [--registry DIR]...] --out FILE.html\n"
    "  Writes one self-contained HTML page (inline CSS and SVG, nothing fetched, no script):\n"
    "  per model a calendar of the runs of [from, from+days), a timeline of each failing or\n"
    "  degraded pattern's chain with its fix, and the upstream lineage; with --db the landing\n"
    "  offsets per monitored source and on-time rates over the 28 days to --date; with\n"
    "  --proposal the intake screening of a proposal for a model of PLAN, with its cautions.\n"
    "  Defaults as for check and nightly. The page is written to a temporary file and renamed.\n"
    "  Exit 0 when every run is ok or degraded, 1 when some run fails, 2 on bad input.\n";

}  // namespace

const std::vector<Command>& command_table() {
  static const std::vector<Command> kTable = {
      {"validate", "check a data plan file and report every error", kValidateUsage, cmd_validate},
      {"check", "will every feature be fresh by every model run?", kCheckUsage, cmd_check},
      {"record", "record landing logs into the history database", kRecordUsage, cmd_record},
      {"nightly", "check one day's runs against what actually landed", kNightlyUsage, cmd_nightly},
      {"forecast", "how often will each run be on time, judged from the landing history?", kForecastUsage,
       cmd_forecast},
      {"catalog", "validate, search and show the catalogue of published scores", kCatalogUsage, cmd_catalog},
      {"reuse", "has an established score already covered this proposal?", kReuseUsage, cmd_reuse},
      {"intake", "screen a proposed model: data timing, established scores, recommendation", kIntakeUsage, cmd_intake},
      {"what-if", "check the plan with edits (delay, fail, schedule, runs, max-age) and list what changes", kWhatIfUsage, cmd_what_if},
      {"margins", "how much later each node could land before an ok run degrades or fails", kMarginsUsage, cmd_margins},
      {"impact", "which runs fail or degrade when a node never lands; single points of failure", kImpactUsage, cmd_impact},
      {"report", "write an HTML page of calendars, chain timelines, lineage and history", kReportUsage, cmd_report},
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

void print_overview(FILE* out) {
  std::fprintf(out, "%s: is the data there in time, and has a published score already covered it?\n\n", kVersion);
  std::fprintf(out, "usage: readyby COMMAND [ARGS]\n\ncommands:\n");
  for (const Command& c : command_table()) std::fprintf(out, "  %-10s %s\n", c.name, c.summary);
  std::fprintf(out, "\n'readyby COMMAND --help' shows a command's options.\n");
}

int cmd_help(const std::vector<std::string>& args) {
  if (wants_help(args, kHelpUsage)) return kExitOk;
  if (args.size() > 1) return usage_error("help takes at most one COMMAND", kHelpUsage);
  if (!args.empty()) {
    std::vector<std::string> names;
    for (const Command& c : command_table()) {
      if (args[0] == c.name) {
        std::fputs(c.usage, stdout);
        return kExitOk;
      }
      names.emplace_back(c.name);
    }
    return usage_error("no command '" + args[0] + "'" + did_you_mean(args[0], names), kHelpUsage);
  }
  print_overview(stdout);
  return kExitOk;
}

}  // namespace

int run_cli(const std::vector<std::string>& args) {
  if (args.empty()) {  // a command is required: the overview, as a usage error
    print_overview(stderr);
    return kExitBadInput;
  }
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
