#include <catch2/catch.hpp>

#include <string>
#include <vector>

#include "history_helpers.h"

using readyby_test::RunResult;
using readyby_test::run_readyby;
using readyby_test::TempDir;

namespace {

const std::string kSource = READYBY_SOURCE_DIR;
const std::string kPlan = kSource + "/pipelines/larkspur.plan.yaml";

// Records the demo's fictional landing logs into a fresh database in `dir`.
std::string demo_db(const TempDir& dir) {
  const std::string db = dir.file("history.db");
  const std::string logs = kSource + "/pipelines/landing-logs/";
  RunResult r = run_readyby(dir, {"record", logs + "feeds-2026-01.csv", logs + "feeds-2026-02.csv",
                                  logs + "feeds-2026-03.csv", "--plan", kPlan, "--db", db});
  REQUIRE(r.status == 0);
  r = run_readyby(dir, {"record", logs + "integration-server.jsonl", "--plan", kPlan, "--db", db, "--map",
                        "node=task,landed_at=load_end_ts,data_through=watermark,status=state"});
  REQUIRE(r.status == 0);
  return db;
}

}  // namespace

TEST_CASE("forecast: the same seed gives byte-identical JSON, another seed other numbers") {
  TempDir dir;
  const std::string db = demo_db(dir);
  const std::vector<std::string> args = {"forecast", kPlan,   "--db",     db,        "--from", "2026-03-04",
                                         "--days",   "28",    "--draws",  "400",     "--format", "json"};
  RunResult a = run_readyby(dir, args);
  RunResult b = run_readyby(dir, args);
  INFO(a.err);
  REQUIRE(a.status == 0);
  CHECK(a.out == b.out);
  std::vector<std::string> seeded = args;
  seeded.insert(seeded.end(), {"--seed", "20260101"});
  CHECK(run_readyby(dir, seeded).out == a.out);  // the documented default
  seeded.back() = "7";
  RunResult other = run_readyby(dir, seeded);
  CHECK(other.status == 0);
  CHECK(other.out != a.out);
  // The keys the issue lists, and the statement about independence.
  for (const char* key : {"\"plan\": \"larkspur\"", "\"from\": \"2026-03-04\"", "\"days\": 28", "\"draws\": 400",
                          "\"seed\": 20260101", "\"forecasts\": [", "\"model\": \"readmit_risk\"", "\"at\": \"0 7 * * *\"",
                          "\"runs\": 20", "\"probability\": ", "\"interval\": [", "\"most_often_late\": {\"node\": ",
                          "\"nodes\": [", "\"node\": \"lab_results\"", "\"landings\": 60", "\"missing_rate\": ",
                          "\"p50_offset_seconds\": ", "\"p90_offset_seconds\": ", "\"by_weekday\": ", "\"notes\": [",
                          "Draws are independent across feeds", "\"unmonitored\": [\"adt_events\"]"}) {
    INFO(key);
    CHECK(a.out.find(key) != std::string::npos);
  }
}

TEST_CASE("forecast: text report, backtest and bad input") {
  TempDir dir;
  const std::string db = demo_db(dir);
  RunResult text = run_readyby(dir, {"forecast", kPlan, "--db", db, "--from", "2026-03-04", "--draws", "200"});
  INFO(text.err);
  REQUIRE(text.status == 0);
  CHECK(text.out.find("readmit_risk") != std::string::npos);
  CHECK(text.out.find("what the forecast stands on") != std::string::npos);
  CHECK(text.out.find("! social_needs: only 9 landings recorded (fewer than 20)") != std::string::npos);
  CHECK(text.out.find("No landings recorded for adt_events") != std::string::npos);

  RunResult backtest =
      run_readyby(dir, {"forecast", kPlan, "--db", db, "--backtest-from", "2026-02-26", "--format", "json"});
  INFO(backtest.err);
  REQUIRE(backtest.status == 0);
  for (const char* key : {"\"backtest_from\": \"2026-02-26\"", "\"to\": \"2026-03-03\"", "\"forecast\": {\"brier\": ",
                          "\"baseline\": {\"brier\": 0.4000", "\"calibration\": [", "\"independence\": {",
                          "\"strongest_pair\": {"}) {
    INFO(key);
    CHECK(backtest.out.find(key) != std::string::npos);
  }

  struct Bad {
    std::vector<std::string> args;
    const char* message;
  };
  const Bad bad[] = {
      {{"forecast", kPlan, "--db", db, "--draws", "0"}, "--draws needs a whole number from 1 to 1000000"},
      {{"forecast", kPlan, "--db", db, "--seed", "-3"}, "--seed needs a whole number"},
      {{"forecast", kPlan, "--db", db, "--format", "xml"}, "--format must be text or json"},
      {{"forecast", kPlan, "--db", db, "--backtest-from", "2026-04-01"}, "holds no landing on or after 2026-04-01"},
      {{"forecast", kPlan, "--db", db, "--backtest-from", "2026-02-01", "--from", "2026-02-01"}, "do not go together"},
      {{"forecast", kPlan, "--db", dir.file("missing.db")}, "missing.db"},
      {{"forecast"}, "forecast needs a PLAN file"},
      {{"forecast", kPlan, "--db", db, "--window", "3"}, "unknown option '--window'"},
  };
  for (const Bad& b : bad) {
    INFO(b.args.back());
    RunResult r = run_readyby(dir, b.args);
    CHECK(r.status == 2);
    CHECK(r.err.find(b.message) != std::string::npos);
    CHECK(r.out.empty());
  }
}

TEST_CASE("intake with a landing history reports the forecast share of the model's and the candidates' runs") {
  TempDir dir;
  const std::string db = demo_db(dir);
  const std::vector<std::string> env = {"READYBY_CACHE_DIR=" + dir.file("cache")};
  const std::string proposal = kSource + "/pipelines/readmit-30d.proposal.yaml";
  RunResult text = run_readyby(dir, {"intake", proposal, "--from", "2026-02-22", "--days", "14", "--db", db}, env);
  INFO(text.err);
  REQUIRE(text.status <= 1);
  CHECK(text.out.find("forecast from the landing history (2000 draws, seed 20260101") != std::string::npos);
  CHECK(text.out.find("readmit_risk's runs would have every input fresh on about") != std::string::npos);
  CHECK(text.out.find("LACE index [lace-index]: its 4 inputs would all be fresh on about") != std::string::npos);
  RunResult json =
      run_readyby(dir, {"intake", proposal, "--from", "2026-02-22", "--days", "14", "--db", db, "--format", "json"}, env);
  CHECK(json.out.find("\"forecast\": {\"draws\": 2000") != std::string::npos);
  CHECK(json.out.find("{\"id\": \"lace-index\"") != std::string::npos);
  RunResult markdown = run_readyby(
      dir, {"intake", proposal, "--from", "2026-02-22", "--days", "14", "--db", db, "--format", "markdown"}, env);
  CHECK(markdown.out.find("#### Forecast from the landing history") != std::string::npos);
  // Without --db there is no forecast.
  RunResult plain = run_readyby(dir, {"intake", proposal, "--from", "2026-02-22", "--days", "14", "--format", "json"}, env);
  CHECK(plain.out.find("\"forecast\": null") != std::string::npos);
}
