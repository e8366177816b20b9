#include <catch2/catch.hpp>

#include <array>
#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <string>
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
