#include <catch2/catch.hpp>

#include <array>
#include <cstdio>
#include <cstdlib>
#include <fstream>
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
  // whose text needs escaping: control characters and quotes in a title,
  // non-ASCII text.
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

  // A plan and a proposal whose titles carry ESC, BEL, a tab, quotes, a
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
                         R"Y(title: "Larkspur \e[31m\a \"quoted\" back\\slash\ttab caf\u00e9 \u2192 (fictional example)")Y"));
  std::string proposal_text = readyby_test::read_text(source + "/pipelines/readmit-30d.proposal.yaml");
  proposal_text = replace_line(proposal_text, "title: ", R"Y(title: "Readmission \e[1m\a \"30d\" caf\u00e9 (fictional example)")Y");
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
  json_of("reuse " + source + "/pipelines/readmit-30d.proposal.yaml --format json");
  std::string reuse = json_of("reuse " + proposal + " --format json");
  CHECK(reuse.find("\\u001b[1m\\u0007") != std::string::npos);
  json_of("intake " + source + "/pipelines/readmit-30d.proposal.yaml" + window + " --format json");
  CHECK(json_of("intake " + proposal + window + " --format json").find("\\u001b[1m\\u0007") != std::string::npos);
}
