#include <catch2/catch.hpp>

#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <sstream>
#include <string>

#include "run_binary.h"

// The what-if, margins and impact commands as a user meets them, on the
// fictional demo plan: exit statuses, messages, and the JSON documents.

namespace {

using readyby::testing::Outcome;

Outcome run(const std::string& args) {
  return readyby::testing::run_shell(std::string("NO_COLOR=1 ") + READYBY_BINARY + " " + args + " 2>&1");
}
Outcome run_stdout(const std::string& args) {
  return readyby::testing::run_shell(std::string("NO_COLOR=1 ") + READYBY_BINARY + " " + args + " 2>/dev/null");
}

const std::string kDemo = std::string(READYBY_SOURCE_DIR) + "/pipelines/larkspur.plan.yaml";
const std::string kWindow = " --from 2026-02-22 --days 28";

std::string read_all(const std::string& path) {
  std::ifstream in(path);
  std::stringstream s;
  s << in.rdbuf();
  return s.str();
}

std::string temp_path(const char* name) {
  return std::string(std::getenv("TMPDIR") ? std::getenv("TMPDIR") : "/tmp") + "/" + name;
}

}  // namespace

TEST_CASE("what-if: exit statuses and messages") {
  struct Case {
    std::string args;
    int status;
    std::string expected;  // a line the output must contain
  } cases[] = {
      // The later start of hie_merge clears the ten failing readmit_risk runs.
      {"--schedule 'hie_merge=45 3 * * *'", 0, "    fail -> ok: 10 runs"},
      {"--delay lab_results=PT2H", 1, "  readmit_risk     ok 10 -> 0, degraded 0, failed 10 -> 20"},
      {"--delay lab_results=-PT10M --delay lab_results=PT10M", 0, "no run changes status"},
      {"--fail social_needs", 0, "    ok -> degraded: 10 runs"},
      // Weekend runs at 09:00 are new runs, and they fail: exit 1.
      {"--runs 'readmit_risk=0 9 * * *'", 1, "ok 10 -> 14, degraded 0, failed 10 -> 14 (runs 20 -> 28)"},
      {"--max-age discharge_labs=PT1H", 1, "    ok -> fail: 10 runs"},
      {"--delay lab_result=PT1H", 2,
       "error: --delay lab_result=PT1H: no node 'lab_result' in the plan (did you mean 'lab_results'?)"},
      {"--delay lab_results=PT1X", 2, "error: --delay lab_results=PT1X: bad duration 'PT1X' for the delay of 'lab_results'"},
      {"--schedule 'hie_merge=0 25 * * *'", 2, "error: --schedule hie_merge=0 25 * * *: bad cron '0 25 * * *'"},
      {"--delay lab_results=-PT1H", 2, "would make the lands_after of source 'lab_results' negative (it is PT40M)"},
      {"--max-age labs_clean=PT1H", 2, "max_age applies to features; 'labs_clean' is a job"},
      {"", 2, "what-if needs at least one edit"},
      {"--delay", 2, "--delay needs a value"},
  };
  for (const Case& c : cases) {
    INFO(c.args);
    Outcome o = run("what-if " + kDemo + kWindow + " " + c.args);
    INFO(o.out);
    CHECK(o.status == c.status);
    CHECK(o.out.find(c.expected) != std::string::npos);
  }
  CHECK(run("what-if --help").status == 0);
}

TEST_CASE("what-if --format json: 'after' is exactly check on the plan with the edit written in") {
  // The edit written into a copy of the file by hand: lab_results lands 2h later.
  std::string text = read_all(kDemo);
  const std::string before = "    schedule: \"0 1 * * *\"\n    lands_after: PT40M\n";
  size_t at = text.find(before);
  REQUIRE(at != std::string::npos);
  REQUIRE(text.find(before, at + 1) == std::string::npos);
  text.replace(at, before.size(), "    schedule: \"0 1 * * *\"\n    lands_after: PT2H40M\n");
  std::string edited_path = temp_path("readyby_what_if_edited.plan.yaml");
  std::ofstream(edited_path) << text;

  Outcome what_if = run_stdout("what-if " + kDemo + kWindow + " --delay lab_results=PT2H --format json");
  Outcome check = run_stdout("check " + edited_path + kWindow + " --format json");
  std::remove(edited_path.c_str());
  CHECK(what_if.status == 1);
  CHECK(what_if.out.starts_with(
      "{\"edits\": [{\"edit\": \"delay\", \"target\": \"lab_results\", \"seconds\": 7200, \"text\": \"delay "
      "lab_results=PT2H\"}],\n \"after\": "));
  size_t after_start = what_if.out.find("\"after\": ") + 9;
  size_t after_end = what_if.out.find("\n, \"changed\": [");
  REQUIRE(after_end != std::string::npos);
  CHECK(what_if.out.substr(after_start, after_end - after_start) + "\n" == check.out);
  CHECK(what_if.out.find(
            "{\"model\": \"readmit_risk\", \"at\": \"2026-02-23T07:00:00-06:00\", \"before\": \"ok\", \"after\": \"fail\"}") !=
        std::string::npos);
}

TEST_CASE("margins and impact on the demo plan") {
  Outcome margins = run("margins " + kDemo + kWindow);
  INFO(margins.out);
  CHECK(margins.status == 1);  // as check: some runs of the window fail
  CHECK(margins.out.find("\n  adt_events            10m         binding run discharge_delay 2026-02-22 06:30 -06:00 "
                         "(lands 10m before it must)\n") != std::string::npos);
  CHECK(margins.out.find("\n  claims_weekly         3d 23h 15m  binding run readmit_risk 2026-02-26 07:00 -06:00") !=
        std::string::npos);
  CHECK(margins.out.find("no run that is ok today depends on 1 node (any delay changes nothing):\n  nurse_staffing\n") !=
        std::string::npos);
  Outcome json = run_stdout("margins " + kDemo + kWindow + " --format json");
  CHECK(json.out.starts_with("{\"margins\": [\n  {\"node\": \"adt_events\", \"margin_seconds\": 600, \"binding\": "
                             "{\"model\": \"discharge_delay\", \"at\": \"2026-02-22T06:30:00-06:00\"}},"));
  CHECK(json.out.ends_with("{\"node\": \"nurse_staffing\", \"margin_seconds\": null, \"binding\": null}]}\n"));
  // --verify re-evaluates every cone and finds the same margins.
  CHECK(run_stdout("margins " + kDemo + kWindow + " --format json --verify").out == json.out);

  Outcome impact = run("impact " + kDemo + kWindow);
  INFO(impact.out);
  CHECK(impact.status == 1);
  CHECK(impact.out.find("4 single points of failure (its failure fails runs of two or more models):\n  lab_results, "
                        "adt_events, labs_clean, admission_source") != std::string::npos);
  Outcome impact_json = run_stdout("impact " + kDemo + kWindow + " --format json");
  CHECK(impact_json.out.starts_with(
      "{\"impact\": [\n  {\"node\": \"lab_results\", \"failed_runs\": 33, \"degraded_runs\": 0, \"models\": "
      "[{\"model\": \"readmit_risk\", \"fail\": 10, \"degrade\": 0}, {\"model\": \"discharge_delay\", \"fail\": 23, "
      "\"degrade\": 0}]},"));
  CHECK(run("impact " + kDemo + " --days 0").status == 2);
  CHECK(run("margins").status == 2);
}
