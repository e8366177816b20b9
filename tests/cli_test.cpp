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
