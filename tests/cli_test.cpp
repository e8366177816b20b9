#include <catch2/catch.hpp>

#include <unistd.h>

#include <array>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <sstream>
#include <string>
#include "history_helpers.h"
#include "json_check.h"
#include "run_binary.h"

// The command line as a user meets it: exit statuses and streams.

namespace {

using readyby::testing::Outcome;

Outcome run(const std::string& args) {
  return readyby::testing::run_shell(std::string("NO_COLOR=1 ") + READYBY_BINARY + " " + args + " 2>&1");
}

const std::string kDemo = std::string(READYBY_SOURCE_DIR) + "/pipelines/larkspur.plan.yaml";

}  // namespace

TEST_CASE("exit statuses: 0 valid / all ok, 1 some run fails, 2 bad input or usage") {
  CHECK(run("validate " + kDemo).status == 0);
  CHECK(run("check " + kDemo + " --from 2026-02-22 --days 28").status == 1);
  CHECK(run("check " + kDemo + " --from 2026-04-06 --days 5 --format json").status == 1);
  Outcome bad_option = run("check " + kDemo + " --days zero");
  CHECK(bad_option.status == 2);
  CHECK(bad_option.out.find("--days needs a whole number") != std::string::npos);
  CHECK(run("check /nonexistent/plan.yaml").status == 2);
  Outcome typo = run("chek");
  CHECK(typo.status == 2);
  CHECK(typo.out.find("unknown command 'chek' (did you mean 'check'?)") != std::string::npos);
  CHECK(run("help").status == 0);
  CHECK(run("check --help").status == 0);
}

TEST_CASE("validate prints every error with the source line and a caret, exit 2") {
  std::string path = std::string(std::getenv("TMPDIR") ? std::getenv("TMPDIR") : "/tmp") + "/readyby_cli_bad.yaml";
  std::ofstream(path) << "plan: x\ntimezone: Etc/UTC\nmodels:\n  m:\n    features: [nope]\n    runs:\n      - at: \"0 6 * * *\"\n";
  Outcome o = run("validate " + path);
  CHECK(o.status == 2);
  CHECK(o.out.find(path + ":5:16: error: unknown feature 'nope'\n      features: [nope]\n                 ^\n") !=
        std::string::npos);
  std::remove(path.c_str());
}

TEST_CASE("check --run explains one run step by step") {
  Outcome o = run("check " + kDemo + " --run discharge_delay@2026-03-08T06:30");
  CHECK(o.status == 1);
  CHECK(o.out.find("run of model discharge_delay at 2026-03-08 06:30 -05:00: fail") != std::string::npos);
  CHECK(o.out.find("census_snapshot             job      2026-03-08 04:45 -05:00") != std::string::npos);
  Outcome json = run("check " + kDemo + " --run discharge_delay@2026-03-08T06:30 --format json");
  CHECK(json.out.find(R"({"node": "census_snapshot", "kind": "job", "ready_at": "2026-03-08T04:45:00-05:00")") !=
        std::string::npos);
  CHECK(run("check " + kDemo + " --run nobody@2026-03-08T06:30").status == 2);
}

TEST_CASE("every --format json output is one valid JSON document") {
  // Checked with a real parser (json_check.h), on the demo and on inputs
  // whose text needs escaping: quotes, a backslash, tab and line breaks in
  // titles (YAML text values may hold no other control characters), control
  // characters in a search text from the command line, non-ASCII text.
  readyby_test::TempDir dir;
  const std::string source = READYBY_SOURCE_DIR;
  const std::string env = "NO_COLOR=1 READYBY_CACHE_DIR='" + dir.file("cache") + "' READYBY_REGISTRY='" + source +
                          "/registries' ";
  // Exit 0 or 1 (some run fails, or the proposal is at risk): an answer, not an error.
  auto json_of = [&](const std::string& args) {
    Outcome o = readyby::testing::run_shell(env + READYBY_BINARY + " " + args + " 2>" + dir.file("stderr"));
    INFO(args << "\n" << readyby_test::read_text(dir.file("stderr")) << o.out.substr(0, 2000));
    CHECK((o.status == 0 || o.status == 1));
    readyby::testing::JsonCheck check = readyby::testing::check_json(o.out);
    INFO(check.error);
    CHECK(check.ok);
    return o.out;
  };

  // A plan and a proposal whose titles carry a tab, a line break, quotes, a
  // backslash and non-ASCII text (YAML double-quoted escapes).
  auto replace_line = [](std::string text, const std::string& prefix, const std::string& line) {
    size_t at = text.find("\n" + prefix) + 1;
    REQUIRE(at != 0);
    text.replace(at, text.find('\n', at) - at, line);
    return text;
  };
  const std::string plan = dir.file("escapes.plan.yaml");
  readyby_test::write_text(
      plan, replace_line(readyby_test::read_text(kDemo), "title: ",
                         R"Y(title: "Larkspur \"quoted\" back\\slash\ttab\nline caf\u00e9 \u2192 (fictional example)")Y"));
  std::string proposal_text = readyby_test::read_text(source + "/pipelines/readmit-30d.proposal.yaml");
  proposal_text = replace_line(proposal_text, "title: ", R"Y(title: "Readmission\t\"30d\"\nback\\slash caf\u00e9 (fictional example)")Y");
  proposal_text = replace_line(proposal_text, "plan: ", "plan: escapes.plan.yaml");
  const std::string proposal = dir.file("escapes.proposal.yaml");
  readyby_test::write_text(proposal, proposal_text);
  REQUIRE(readyby::testing::run_shell(READYBY_BINARY + std::string(" validate ") + plan).status == 0);

  const std::string window = " --from 2026-02-22 --days 28";
  for (const std::string& p : {kDemo, plan}) {
    json_of("check " + p + window + " --format json");
    json_of("check " + p + " --run discharge_delay@2026-03-08T06:30 --format json");
  }

  // nightly reads a history database: record the demo logs first.
  std::string record = "record";
  for (const char* f : {"feeds-2026-01.csv", "feeds-2026-02.csv", "feeds-2026-03.csv"}) {
    record += " " + source + "/pipelines/landing-logs/" + f;
  }
  REQUIRE(readyby::testing::run_shell(env + READYBY_BINARY + " " + record + " --plan " + plan + " --db " +
                                      dir.file("h.db") + " >/dev/null 2>&1")
              .status == 0);
  json_of("nightly " + plan + " --db " + dir.file("h.db") + " --date 2026-03-03 --format json");
  json_of("nightly " + plan + " --db " + dir.file("h.db") + " --date 2026-02-10 --format json");

  json_of("catalog search pneumonia severity --format json");
  json_of("catalog search \"caf\xc3\xa9 \\\" quote\" --format json");  // nothing found: still JSON
  std::string search = json_of("catalog search '\x1b[31m pneumonia \x07\x01' --format json");
  CHECK(search.find("\\u001b[31m pneumonia \\u0007\\u0001") != std::string::npos);
  json_of("reuse " + source + "/pipelines/readmit-30d.proposal.yaml --format json");
  std::string reuse = json_of("reuse " + proposal + " --format json");
  CHECK(reuse.find("\"Readmission\\t\\\"30d\\\"\\nback\\\\slash caf\xc3\xa9 (fictional example)\"") != std::string::npos);
  json_of("intake " + source + "/pipelines/readmit-30d.proposal.yaml" + window + " --format json");
  CHECK(json_of("intake " + proposal + window + " --format json").find("Readmission\\t\\\"30d\\\"\\nback") != std::string::npos);
}

// Regression: windows far in the future ran on frozen zone tables or printed
// years that RFC 3339 cannot hold; they are refused with a clear message.
TEST_CASE("windows outside the supported dates are refused") {
  Outcome far = run("check " + kDemo + " --from 2300-01-01 --days 1");
  CHECK(far.status == 2);
  CHECK(far.out.find("--from 2300-01-01 is outside the supported dates 1900-01-01 to 2180-12-31") != std::string::npos);
  Outcome run_far = run("check " + kDemo + " --run discharge_delay@9999-01-01T06:30");
  CHECK(run_far.status == 2);
  CHECK(run_far.out.find("--run 9999-01-01 is outside the supported dates") != std::string::npos);
  // 2040 is inside, with daylight saving in July (see zone_test).
  Outcome summer = run("check " + kDemo + " --from 2040-07-02 --days 1 --format json");
  CHECK(summer.out.find("\"at\": \"2040-07-02T06:30:00-05:00\"") != std::string::npos);
}

// Regression: a filesystem error (here a symbolic-link loop where a registry
// subfolder should be) threw out of main and aborted the process (status
// 134). It is now handled where it happens; anything that still escaped a
// command would be one line on stderr and status 2, never an abort.
TEST_CASE("a filesystem error in a registry folder does not abort") {
  std::string dir = std::string(std::getenv("TMPDIR") ? std::getenv("TMPDIR") : "/tmp") + "/readyby_cli_loop_registry";
  std::system(("rm -rf " + dir + " && mkdir -p " + dir + " && ln -s vocabulary " + dir + "/vocabulary").c_str());
  Outcome o = run("catalog validate --registry " + dir);
  CHECK(o.status != 134);
  CHECK((o.status == 0 || o.status == 2));
  std::system(("rm -rf " + dir).c_str());
}

// Regression: `validate > /dev/full` exited 0, so a scheduler published an
// empty report. A failed write is now "cannot write output", status 2.
TEST_CASE("output that cannot be written is an error") {
  Outcome full = readyby::testing::run_shell(std::string(READYBY_BINARY) + " validate " + kDemo + " 2>&1 >/dev/full");
  CHECK(full.status == 2);
  CHECK(full.out.find("readyby: cannot write output: No space left on device") != std::string::npos);
  Outcome json = readyby::testing::run_shell(std::string(READYBY_BINARY) + " check " + kDemo +
                                             " --from 2026-02-22 --days 28 --format json 2>&1 >/dev/full");
  CHECK(json.status == 2);
  CHECK(json.out.find("cannot write output") != std::string::npos);
}

namespace {

// stdout and stderr apart.
struct Streams {
  int status = -1;
  std::string out, err;
};

Streams run_apart(const std::string& args) {
  const char* tmp = std::getenv("TMPDIR") ? std::getenv("TMPDIR") : "/tmp";
  // A name of this process's own: ctest runs test cases in parallel processes.
  static int counter = 0;
  const std::string err_path = std::string(tmp) + "/readyby_cli_stderr-" + std::to_string(::getpid()) + "-" +
                               std::to_string(++counter) + ".txt";
  Outcome o = readyby::testing::run_shell(std::string("NO_COLOR=1 ") + READYBY_BINARY + " " + args + " 2>" + err_path);
  Streams s{o.status, o.out, ""};
  std::ifstream in(err_path);
  s.err.assign(std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>());
  std::remove(err_path.c_str());
  return s;
}

}  // namespace

TEST_CASE("readyby with no command prints the overview to stderr and exits 2; help --help works") {
  Streams bare = run_apart("");
  CHECK(bare.status == 2);
  CHECK(bare.out.empty());
  CHECK(bare.err.find("usage: readyby COMMAND [ARGS]") != std::string::npos);
  Streams help = run_apart("help --help");
  CHECK(help.status == 0);
  CHECK(help.out == "usage: readyby help [COMMAND]\n");
  Streams nosuch = run_apart("help chek");
  CHECK(nosuch.status == 2);
  CHECK(nosuch.err.find("readyby: no command 'chek' (did you mean 'check'?)") != std::string::npos);
}

TEST_CASE("unknown options are named, with the nearest option of the command") {
  struct Case {
    std::string args, message;
  };
  const Case cases[] = {
      {"check " + kDemo + " --frmo 2026-03-01", "readyby: unknown option '--frmo' (did you mean '--from'?)\n"},
      {"check " + kDemo + " --fromat=json", "readyby: unknown option '--fromat=json' (did you mean '--format'?)\n"},
      {"validate " + kDemo + " --format json", "readyby: unknown option '--format'\n"},
      {"validate --hlep " + kDemo, "readyby: unknown option '--hlep' (did you mean '--help'?)\n"},
      {"nightly " + kDemo + " --windw 3", "readyby: unknown option '--windw' (did you mean '--window'?)\n"},
      {"record a.csv --plan " + kDemo + " --mapstatus A=ok",
       "readyby: unknown option '--mapstatus' (did you mean '--map-status'?)\n"},
      {"record a.csv --plan " + kDemo + " --mpa x=y", "readyby: unknown option '--mpa' (did you mean '--map'?)\n"},
      {"intake p.yaml --dyas 3", "readyby: unknown option '--dyas' (did you mean '--days'?)\n"},
      {"catalog search sepsis --limt 3", "readyby: unknown option '--limt' (did you mean '--limit'?)\n"},
      {"catalog show --registy x lace", "readyby: unknown option '--registy' (did you mean '--registry'?)\n"},
      {"reuse p.yaml --xyz", "readyby: unknown option '--xyz'\n"},
      // Every command parses through one option table (cli/options.h), so
      // these get the nearest option too.
      {"margins " + kDemo + " --verfy", "readyby: unknown option '--verfy' (did you mean '--verify'?)\n"},
      {"impact " + kDemo + " --verify", "readyby: unknown option '--verify'\n"},
      {"what-if " + kDemo + " --dealy lab_results=PT1H", "readyby: unknown option '--dealy' (did you mean '--delay'?)\n"},
      {"report " + kDemo + " --outt r.html", "readyby: unknown option '--outt' (did you mean '--out'?)\n"},
      {"forecast " + kDemo + " --drwas 5", "readyby: unknown option '--drwas' (did you mean '--draws'?)\n"},
      {"margins " + kDemo + " --verify=yes", "readyby: --verify takes no value\n"},
  };
  for (const Case& c : cases) {
    INFO(c.args);
    Streams s = run_apart(c.args);
    CHECK(s.status == 2);
    CHECK(s.out.empty());
    CHECK(s.err.substr(0, s.err.find('\n') + 1) == c.message);
  }
  // Two PLAN files are still "exactly one".
  CHECK(run_apart("validate " + kDemo + " " + kDemo).err.starts_with("readyby: validate takes exactly one PLAN file"));
}

TEST_CASE("check --run with an unknown model lists the plan's models") {
  Streams s = run_apart("check " + kDemo + " --run nosuch@2026-03-08T06:30");
  CHECK(s.status == 2);
  CHECK(s.err.starts_with("readyby: no model 'nosuch' in " + kDemo + "; its models: readmit_risk, discharge_delay\n"));
  Streams typo = run_apart("check " + kDemo + " --run readmit_rsk@2026-03-08T06:30");
  CHECK(typo.err.starts_with("readyby: no model 'readmit_rsk' in " + kDemo +
                             " (did you mean 'readmit_risk'?); its models: readmit_risk, discharge_delay\n"));
}

TEST_CASE("validate: a legacy zone is a warning, the plan is valid, exit 0") {
  const char* tmp = std::getenv("TMPDIR") ? std::getenv("TMPDIR") : "/tmp";
  const std::string path = std::string(tmp) + "/readyby_cli_est.yaml";
  std::ofstream(path) << "plan: x\ntimezone: EST\nsources:\n  s:\n    schedule: \"0 1 * * *\"\nfeatures:\n"
                         "  f:\n    inputs: [s]\n    max_age: P1D\nmodels:\n  m:\n    features: [f]\n    runs:\n"
                         "      - at: \"0 6 * * *\"\n";
  Streams s = run_apart("validate " + path);
  CHECK(s.status == 0);
  CHECK(s.out == path + ": plan 'x' is valid: 1 sources, 0 jobs, 1 features, 1 models (1 warning)\n");
  CHECK(s.err.starts_with(path + ":2:11: warning: 'EST' is a legacy time zone name kept only for compatibility: "
                                 "UTC-05:00 all year, with no daylight saving; for US Eastern time use "
                                 "America/New_York, for UTC-05:00 all year America/Panama\n  timezone: EST\n"));
  // Commands that load the plan show the warning too, and still run.
  Streams check = run_apart("check " + path + " --from 2026-03-01 --days 1");
  CHECK(check.status == 0);
  CHECK(check.err.find("warning: 'EST' is a legacy time zone name") != std::string::npos);
  std::remove(path.c_str());
}

TEST_CASE("record: a log from another system, with its own columns and status values") {
  const char* tmp = std::getenv("TMPDIR") ? std::getenv("TMPDIR") : "/tmp";
  const std::string log = std::string(tmp) + "/readyby_cli_export.csv";
  const std::string db = std::string(tmp) + "/readyby_cli_export.db";
  std::remove(db.c_str());
  std::ofstream(log) << "task,load_end_ts,watermark,state\n"
                        "lab_results,2026-03-02T02:51:00-06:00,2026-03-02T00:00:00-06:00,SUCCESS\n"
                        "lab_results,2026-03-03T02:40:00-06:00,2026-03-03T00:00:00-06:00,RUNNING\n"
                        "lab_results,2026-03-03T02:55:00-06:00,2026-03-03T00:00:00-06:00,ERROR\n";
  // Without --map: the missing columns, the columns the file has and --map.
  Streams bare = run_apart("record " + log + " --plan " + kDemo + " --db " + db);
  CHECK(bare.status == 2);
  CHECK(bare.err.starts_with(log + ":1: error: missing column 'node' (the header has: task, load_end_ts, watermark, "
                                   "state); if the log names it differently, map it with --map node=COLUMN\n"));
  // Mapped, but SUCCESS is not a status readyby knows.
  const std::string map = " --map node=task,landed_at=load_end_ts,data_through=watermark,status=state";
  Streams unmapped = run_apart("record " + log + " --plan " + kDemo + " --db " + db + map);
  CHECK(unmapped.status == 2);
  CHECK(unmapped.err.starts_with(log + ":2: error: bad status 'SUCCESS': expected ok or failed; map the log's own "
                                       "values with --map-status, e.g. --map-status 'SUCCESS=ok'\n"));
  Streams ok = run_apart("record " + log + " --plan " + kDemo + " --db " + db + map +
                         " --map-status SUCCESS=ok,ERROR=failed,RUNNING=skip");
  CHECK(ok.status == 0);
  CHECK(ok.out.starts_with(log + ": 2 rows, 2 new (1 skipped by --map-status)\n"));
  std::remove(log.c_str());
  std::remove(db.c_str());
  std::remove((db + "-wal").c_str());
  std::remove((db + "-shm").c_str());
}

TEST_CASE("intake: long entry names and ids keep the candidate columns aligned") {
  namespace fs = std::filesystem;
  const fs::path dir = fs::path(std::getenv("TMPDIR") ? std::getenv("TMPDIR") : "/tmp") / "readyby_cli_long_names";
  fs::remove_all(dir);
  fs::create_directories(dir / "registry" / "local");
  std::ofstream(dir / "registry" / "local" / "lvmc-readmit-30d-discharge-cohort-with-a-very-long-identifier.yaml")
      << "id: lvmc-readmit-30d-discharge-cohort-with-a-very-long-identifier\n"
         "name: \"LVMC 30-day unplanned readmission model for adult medical and surgical inpatients\"\n"
         "kind: local\n"
         "summary: \"Larkspur Valley Medical Centre (fictional example): a model with a long name.\"\n"
         "outcome:\n  concept: readmission-30d\n"
         "horizon: P30D\npopulation:\n  age_min: 18\nsettings: [ward]\ntime_point: discharge\n"
         "inputs:\n  - element: util.length_of_stay_days\n    label: \"Length of stay\"\n"
         "owner: \"Analytics team\"\ngo_live: 2024-01-15\nstatus: live\nprovenance: from-memory\n";
  Outcome o = readyby::testing::run_shell(
      "NO_COLOR=1 READYBY_CACHE_DIR='" + (dir / "cache").string() + "' READYBY_REGISTRY='" + READYBY_SOURCE_DIR +
      "/registries' " + READYBY_BINARY + " intake " + READYBY_SOURCE_DIR +
      "/pipelines/readmit-30d.proposal.yaml --from 2026-03-09 --days 7 --registry '" + (dir / "registry").string() +
      "' 2>&1");
  INFO(o.out);
  // The candidate lines: "  #N NAME [ID] COVERAGE KIND", each column starting where the others do.
  std::vector<std::string> lines;
  std::istringstream in(o.out);
  for (std::string line; std::getline(in, line);) {
    if (line.starts_with("  #")) lines.push_back(line);
  }
  REQUIRE(lines.size() >= 3);
  bool long_one = false;
  for (const std::string& line : lines) {
    INFO(line);
    long_one = long_one || line.find("very-long-identifier") != std::string::npos;
    CHECK(line.find('[') == lines[0].find('['));
    // The coverage column: "covers" or "partly" (HOSPITAL predicts a narrower outcome).
    size_t coverage = line.find(" covers ") != std::string::npos ? line.find(" covers ") : line.find(" partly ");
    CHECK(coverage == lines[0].find(" covers "));
  }
  CHECK(long_one);
  fs::remove_all(dir);
}

TEST_CASE("nightly: silent nodes are warned about on stderr for machine formats; metrics say when they were made") {
  namespace fs = std::filesystem;
  const fs::path dir = fs::path(std::getenv("TMPDIR") ? std::getenv("TMPDIR") : "/tmp") / "readyby_cli_nightly";
  fs::remove_all(dir);
  fs::create_directories(dir);
  const std::string db = (dir / "h.db").string();
  const std::string logs = std::string(READYBY_SOURCE_DIR) + "/pipelines/landing-logs/";
  REQUIRE(run_apart("record " + logs + "feeds-2026-01.csv " + logs + "feeds-2026-02.csv " + logs +
                    "feeds-2026-03.csv --plan " + kDemo + " --db " + db)
              .status == 0);
  // The demo logs end on 2026-03-03: five days later every logged feed is silent.
  Streams metrics = run_apart("nightly " + kDemo + " --db " + db + " --date 2026-03-08 --format metrics");
  CHECK(metrics.status == 1);
  CHECK(metrics.err.find("readyby: warning: no landing of lab_results recorded for 3 days (last 2026-03-03 ") !=
        std::string::npos);
  CHECK(metrics.out.find("readyby_node_silent{plan=\"larkspur\",node=\"lab_results\"} 1\n") != std::string::npos);
  CHECK(metrics.out.find("readyby_nightly_last_evaluated_timestamp_seconds{plan=\"larkspur\"} ") != std::string::npos);
  // On the last day of the logs nothing is silent.
  Streams text = run_apart("nightly " + kDemo + " --db " + db + " --date 2026-03-03");
  CHECK(text.out.find("warning: no landing") == std::string::npos);
  CHECK(text.err.empty());
  fs::remove_all(dir);
}

TEST_CASE("check --run blames the step late on its own account and shows a verified fix") {
  // The stream adt_events landed long before census_snapshot started; the
  // snapshot's 02:30 start fell in the daylight-saving gap (tz database:
  // America/Chicago, 2026-03-08) and ran at 03:30: it is the cause.
  Outcome o = run("check " + kDemo + " --run discharge_delay@2026-03-08T06:30");
  CHECK(o.out.find("adt_events                  source   2026-03-07 17:35 -06:00  — before its data        -           -\n") !=
        std::string::npos);
  CHECK(o.out.find("census_snapshot             job      2026-03-08 04:45 -05:00  2026-03-08 04:30 -05:00  15m         -  ← cause") !=
        std::string::npos);
  CHECK(o.out.find("cause: job 'census_snapshot' starts at 03:30 (its 02:30 start falls in the daylight-saving gap that day)") !=
        std::string::npos);
  CHECK(o.out.find("fix: job 'census_snapshot' would have to start 15m earlier (\"30 2 * * *\" -> \"15 2 * * *\")") !=
        std::string::npos);
  CHECK(o.out.find("re-checked: the run of this pattern ok; no other run changes") != std::string::npos);
  Outcome json = run("check " + kDemo + " --run discharge_delay@2026-03-08T06:30 --format json");
  CHECK(json.out.find(R"("cause": {"node": "census_snapshot", "kind": "late-start")") != std::string::npos);
  CHECK(json.out.find(R"("edit": {"kind": "schedule", "node": "census_snapshot", "cron": "15 2 * * *", "text": "schedule census_snapshot=15 2 * * *"})") !=
        std::string::npos);
}

TEST_CASE("check --run at a time that is not a scheduled run says so and names the nearest runs") {
  Outcome o = run("check " + kDemo + " --run discharge_delay@2026-03-08T06:40");
  CHECK(o.out.find("note: 2026-03-08 06:40 is not a scheduled run of model discharge_delay (runs at \"30 6 * * *\"); "
                   "nearest scheduled runs: 2026-03-08 06:30 -05:00 before, 2026-03-09 06:30 -05:00 after") !=
        std::string::npos);
  CHECK(o.out.find("unscheduled run of model discharge_delay at 2026-03-08 06:40 -05:00") != std::string::npos);
  Outcome json = run("check " + kDemo + " --run discharge_delay@2026-03-08T06:40 --format json");
  CHECK(json.out.find(R"("scheduled": false, "previous_run": "2026-03-08T06:30:00-05:00", "next_run": "2026-03-09T06:30:00-05:00")") !=
        std::string::npos);
  Outcome scheduled = run("check " + kDemo + " --run discharge_delay@2026-03-09T06:30 --format json");
  CHECK(scheduled.out.find(R"("scheduled": true, "previous_run": null, "next_run": null)") != std::string::npos);
}
