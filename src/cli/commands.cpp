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
    "usage: readyby intake PROPOSAL [--from YYYY-MM-DD] [--days N] [--registry DIR]...\n"
    "                      [--format text|json|markdown]\n"
    "  One screening report for a proposed model: will its data be there in time (the\n"
    "  proposal's plan and model, checked over [from, from+days)), has an established score\n"
    "  already covered it, can those scores run on time on this plan, and the recommendation:\n"
    "  reuse-and-validate, fix-data-plan-first, close-gaps-or-build or build.\n"
    "  The proposal must name a plan and a model. Defaults: --from today in the model's zone,\n"
    "  --days 28, --format text (markdown is made to paste into a review ticket).\n"
    "  Exit 0 when every run is ok or degraded, 1 when some run fails, 2 on bad input.\n";

}  // namespace

const std::vector<Command>& command_table() {
  static const std::vector<Command> kTable = {
      {"validate", "check a data plan file and report every error", kValidateUsage, cmd_validate},
      {"check", "will every feature be fresh by every model run?", kCheckUsage, cmd_check},
      {"record", "record landing logs into the history database", kRecordUsage, cmd_record},
      {"nightly", "check one day's runs against what actually landed", kNightlyUsage, cmd_nightly},
      {"catalog", "validate, search and show the catalogue of published scores", kCatalogUsage, cmd_catalog},
      {"reuse", "has an established score already covered this proposal?", kReuseUsage, cmd_reuse},
      {"intake", "screen a proposed model: data timing, established scores, recommendation", kIntakeUsage, cmd_intake},
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
