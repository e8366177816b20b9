#include <catch2/catch.hpp>

#include "plan_fixture.h"

#include "history/landing_log.h"
#include "plan/plan_loader.h"
#include "time/zone.h"

using namespace readyby;

namespace {

const char kPlan[] = R"(plan: tiny
title: Tiny plan for landing log tests (fictional)
timezone: America/Chicago
sources:
  lab_batch:
    schedule: "0 1 * * *"
    lands_after: PT40M
jobs:
  labs_clean:
    inputs: [lab_batch]
features:
  creat:
    inputs: [labs_clean]
    max_age: PT30H
models:
  m:
    features: [creat]
    runs:
      - at: "0 7 * * *"
)";

Plan tiny_plan() {
  return readyby::testing::plan_from_text(kPlan);
}

std::vector<std::string> errors_of(const LandingLog& log) {
  std::vector<std::string> out;
  for (const LogError& e : log.errors) out.push_back(e.str());
  return out;
}

}  // namespace

TEST_CASE("a CSV landing log is read row by row") {
  Plan plan = tiny_plan();
  LandingLog log = parse_landing_log(
      "node,landed_at,data_through,scheduled_at,rows,status,comment\n"
      "lab_batch,2026-03-02T01:38:00-06:00,2026-03-02T00:00:00-06:00,2026-03-02T01:00:00-06:00,120,ok,\"a, b\"\n"
      "\n"
      "labs_clean,2026-03-02T07:55:00Z,2026-03-02T06:00:00Z,,,failed,\r\n"
      "lab_batch,\"2026-03-03T01:39:00-06:00\",2026-03-03T00:00:00-06:00,,,,\"say \"\"hi\"\"\"\n",
      "feeds.csv", plan, ColumnMap());
  INFO(errors_of(log).size());
  REQUIRE(log.errors.empty());
  REQUIRE(log.rows.size() == 3);
  CHECK(log.rows[0].line == 2);
  CHECK(log.rows[0].node == plan.find_node("lab_batch"));
  CHECK(format_rfc3339(log.rows[0].landed_at, nullptr) == "2026-03-02T07:38:00Z");
  CHECK(format_rfc3339(*log.rows[0].scheduled_at, nullptr) == "2026-03-02T07:00:00Z");
  CHECK(*log.rows[0].rows == 120);
  CHECK(log.rows[1].line == 4);
  CHECK(log.rows[1].node == plan.find_node("labs_clean"));
  CHECK(log.rows[1].status == LandingStatus::failed);
  CHECK_FALSE(log.rows[1].scheduled_at);
  CHECK_FALSE(log.rows[1].rows);
  CHECK(log.rows[2].status == LandingStatus::ok);  // empty status: ok
}

TEST_CASE("a JSON Lines landing log, with a column map") {
  Plan plan = tiny_plan();
  std::string error;
  std::optional<ColumnMap> map = parse_column_map("landed_at=load_end_ts,data_through=watermark", &error);
  REQUIRE(map);
  LandingLog log = parse_landing_log(
      "{\"node\": \"lab_batch\", \"load_end_ts\": \"2026-03-02T01:38:00-06:00\", "
      "\"watermark\": \"2026-03-02T00:00:00-06:00\", \"rows\": 12, \"status\": null, \"extra\": true}\n"
      "{\"node\":\"lab\\u005fbatch\",\"load_end_ts\":\"2026-03-03T01:38:00-06:00\",\"watermark\":\"2026-03-03T00:00:00-06:00\"}\n",
      "export.jsonl", plan, *map);
  REQUIRE(errors_of(log).empty());
  REQUIRE(log.rows.size() == 2);
  CHECK(*log.rows[0].rows == 12);
  CHECK(log.rows[0].status == LandingStatus::ok);
  CHECK(log.rows[1].node == plan.find_node("lab_batch"));
  CHECK(log.rows[1].line == 2);
}

TEST_CASE("every bad row is reported as PATH:LINE and the file yields no rows") {
  Plan plan = tiny_plan();
  LandingLog log = parse_landing_log(
      "node,landed_at,data_through,status,rows\n"
      "lab_batch,2026-03-02T01:38:00-06:00,2026-03-02T00:00:00-06:00,ok,1\n"
      "lab_bacth,2026-03-02T01:38:00-06:00,2026-03-02T00:00:00-06:00,ok,1\n"
      "lab_batch,2026-03-02 01:38,2026-03-02T00:00:00-06:00,ok,1\n"
      "lab_batch,2026-03-02T01:38:00-06:00,2026-03-02T02:00:00-06:00,ok,1\n"
      "lab_batch,2026-03-02T01:38:00-06:00,2026-03-02T00:00:00-06:00,done,1\n"
      "lab_batch,2026-03-02T01:38:00-06:00,2026-03-02T00:00:00-06:00,ok,-4\n"
      "lab_batch,,2026-03-02T00:00:00-06:00,ok,1\n"
      "lab_batch,2026-03-02T01:38:00-06:00\n",
      "feeds.csv", plan, ColumnMap());
  const std::vector<std::string> expected = {
      "feeds.csv:3: error: unknown node 'lab_bacth' (did you mean 'lab_batch'?) in plan tiny",
      "feeds.csv:4: error: bad landed_at '2026-03-02 01:38': expected an RFC 3339 date-time with offset, e.g. "
      "2026-03-08T06:00:00-05:00",
      // Times as written in the file, with their own offsets.
      "feeds.csv:5: error: data_through 2026-03-02T02:00:00-06:00 is after landed_at 2026-03-02T01:38:00-06:00 (a "
      "delivery cannot hold data from after it landed)",
      "feeds.csv:6: error: bad status 'done': expected ok or failed; map the log's own values with --map-status, "
      "e.g. --map-status 'done=ok'",
      "feeds.csv:7: error: bad rows '-4': expected a whole number >= 0",
      "feeds.csv:8: error: missing landed_at",
      "feeds.csv:9: error: expected 5 fields as in the header, found 2",
  };
  CHECK(errors_of(log) == expected);
  CHECK(log.rows.empty());
}

TEST_CASE("structural problems of a log") {
  Plan plan = tiny_plan();
  struct Case {
    const char* name;
    const char* path;
    const char* text;
    const char* expected;
  };
  const Case cases[] = {
      {"missing column", "a.csv", "node,landed_at\n",
       "a.csv:1: error: missing column 'data_through' (the header has: node, landed_at); if the log names it "
       "differently, map it with --map data_through=COLUMN"},
      {"empty csv", "a.csv", "\n\n", "a.csv: error: empty landing log: expected a header row naming node, landed_at, data_through"},
      {"unterminated quote", "a.csv", "node,landed_at,data_through\n\"lab_batch,x,y\n",
       "a.csv:2: error: unterminated quoted field"},
      {"not an object", "a.jsonl", "[1, 2]\n", "a.jsonl:1: error: not a JSON object: expected a JSON object ('{') at column 1"},
      {"nested value", "a.jsonl", "{\"node\": {\"id\": 1}}\n",
       "a.jsonl:1: error: not a JSON object: value of 'node' must be a string, number, boolean or null at column 10"},
      {"missing node", "a.jsonl",
       "{\"landed_at\": \"2026-03-02T01:38:00-06:00\", \"data_through\": \"2026-03-02T00:00:00-06:00\"}\n",
       "a.jsonl:1: error: missing column 'node' (this line has: landed_at, data_through); if the log names it "
       "differently, map it with --map node=COLUMN"},
      {"null node", "a.jsonl",
       "{\"node\": null, \"landed_at\": \"2026-03-02T01:38:00-06:00\", \"data_through\": \"2026-03-02T00:00:00-06:00\"}\n",
       "a.jsonl:1: error: missing node"},
  };
  for (const Case& c : cases) {
    INFO(c.name);
    LandingLog log = parse_landing_log(c.text, c.path, plan, ColumnMap());
    REQUIRE_FALSE(log.errors.empty());
    CHECK(log.errors[0].str() == c.expected);
    CHECK(log.rows.empty());
  }
}

TEST_CASE("column maps and format detection") {
  std::string error;
  std::optional<ColumnMap> map = parse_column_map("node=task,status=state", &error);
  REQUIRE(map);
  CHECK((*map)[LogField::node] == "task");
  CHECK((*map)[LogField::landed_at] == "landed_at");
  CHECK((*map)[LogField::status] == "state");
  CHECK_FALSE(parse_column_map("landedat=load_end_ts", &error));
  CHECK(error == "--map: unknown field 'landedat' (did you mean 'landed_at'?); fields are node, landed_at, "
                 "data_through, scheduled_at, rows, status");
  CHECK_FALSE(parse_column_map("node=a,node=b", &error));
  CHECK(error == "--map: field 'node' is mapped twice");
  CHECK_FALSE(parse_column_map("node", &error));
  CHECK(detect_log_format("x.jsonl", "node,a") == LogFormat::json_lines);
  CHECK(detect_log_format("x.csv", "{") == LogFormat::csv);
  CHECK(detect_log_format("x.log", "  {\"node\": 1}") == LogFormat::json_lines);
  CHECK(detect_log_format("x.log", "node,landed_at") == LogFormat::csv);
}

// Regression: a UTF-8 byte order mark (as spreadsheet programs write it) made
// the first column "\xEF\xBB\xBFnode", so every row was "missing node"; and a
// leap second (RFC 3339 §5.6: time-second 60) rejected the whole file.
TEST_CASE("a byte order mark and a leap second are accepted") {
  Plan plan = tiny_plan();
  LandingLog log = parse_landing_log(
      "\xEF\xBB\xBFnode,landed_at,data_through\n"
      "lab_batch,2016-12-31T23:59:60Z,2016-12-31T06:00:00Z\n",
      "bom.csv", plan, ColumnMap());
  INFO(errors_of(log).size());
  REQUIRE(log.errors.empty());
  REQUIRE(log.rows.size() == 1);
  CHECK(format_rfc3339(log.rows[0].landed_at, nullptr) == "2016-12-31T23:59:59Z");
}

// Regression: 100,000 rows naming an unknown node took 9.7 s, one
// did-you-mean search per row. The suggestion is computed once per name (the
// result is the same for every row).
TEST_CASE("every row of an unknown node gets the same suggestion") {
  Plan plan = tiny_plan();
  std::string text = "node,landed_at,data_through\n";
  for (int i = 0; i < 3; ++i) text += "lab_bach,2026-03-02T07:38:00Z,2026-03-02T06:00:00Z\n";
  LandingLog log = parse_landing_log(text, "typo.csv", plan, ColumnMap());
  REQUIRE(log.errors.size() == 3);
  for (const LogError& e : log.errors) {
    CHECK(e.str().find("unknown node 'lab_bach' (did you mean 'lab_batch'?) in plan tiny") != std::string::npos);
  }
}

TEST_CASE("a log with its own column names: the missing columns are named with the columns it has") {
  Plan plan = tiny_plan();
  const std::string csv =
      "task,load_end_ts,watermark,state\n"
      "lab_batch,2026-03-02T01:38:00-06:00,2026-03-02T00:00:00-06:00,SUCCESS\n";
  LandingLog log = parse_landing_log(csv, "export.csv", plan, ColumnMap());
  const std::vector<std::string> expected = {
      "export.csv:1: error: missing column 'node' (the header has: task, load_end_ts, watermark, state); if the log "
      "names it differently, map it with --map node=COLUMN",
      "export.csv:1: error: missing column 'landed_at' (the header has: task, load_end_ts, watermark, state); if the "
      "log names it differently, map it with --map landed_at=COLUMN",
      "export.csv:1: error: missing column 'data_through' (the header has: task, load_end_ts, watermark, state); if "
      "the log names it differently, map it with --map data_through=COLUMN",
  };
  CHECK(errors_of(log) == expected);
  // A mapped column that is not there says what it was mapped to.
  std::string error;
  std::optional<ColumnMap> map = parse_column_map("node=job,landed_at=load_end_ts,data_through=watermark", &error);
  REQUIRE(map);
  log = parse_landing_log(csv, "export.csv", plan, *map);
  REQUIRE(log.errors.size() == 1);
  CHECK(log.errors[0].str() ==
        "export.csv:1: error: missing column 'job' (mapped to node) (the header has: task, load_end_ts, watermark, "
        "state); if the log names it differently, map it with --map node=COLUMN");
  // JSON Lines: the hint once per field, then the short form.
  log = parse_landing_log("{\"task\": \"lab_batch\", \"landed_at\": \"2026-03-02T01:38:00-06:00\", "
                          "\"data_through\": \"2026-03-02T00:00:00-06:00\"}\n"
                          "{\"task\": \"lab_batch\", \"landed_at\": \"2026-03-03T01:38:00-06:00\", "
                          "\"data_through\": \"2026-03-03T00:00:00-06:00\"}\n",
                          "export.jsonl", plan, ColumnMap());
  const std::vector<std::string> expected_jsonl = {
      "export.jsonl:1: error: missing column 'node' (this line has: task, landed_at, data_through); if the log "
      "names it differently, map it with --map node=COLUMN",
      "export.jsonl:2: error: missing column 'node'",
  };
  CHECK(errors_of(log) == expected_jsonl);
}

TEST_CASE("status values of another system are mapped to ok, failed or skip") {
  Plan plan = tiny_plan();
  ColumnMap map;
  std::string error;
  REQUIRE(parse_status_map("SUCCESS=ok,ERROR=failed,RUNNING=skip,ok=failed", &map, &error));
  LandingLog log = parse_landing_log(
      "node,landed_at,data_through,status\n"
      "lab_batch,2026-03-02T01:38:00-06:00,2026-03-02T00:00:00-06:00,SUCCESS\n"
      "lab_batch,2026-03-03T01:38:00-06:00,2026-03-03T00:00:00-06:00,ERROR\n"
      "lab_batch,,,RUNNING\n"                                               // skipped unchecked
      "lab_batch,2026-03-04T01:38:00-06:00,2026-03-04T00:00:00-06:00,ok\n"  // remapped: failed
      "lab_batch,2026-03-05T01:38:00-06:00,2026-03-05T00:00:00-06:00,failed\n"
      "lab_batch,2026-03-06T01:38:00-06:00,2026-03-06T00:00:00-06:00,\n",
      "feeds.csv", plan, map);
  INFO(errors_of(log).size());
  REQUIRE(log.errors.empty());
  CHECK(log.skipped == 1);
  REQUIRE(log.rows.size() == 5);
  const LandingStatus expected[] = {LandingStatus::ok, LandingStatus::failed, LandingStatus::failed,
                                    LandingStatus::failed, LandingStatus::ok};
  for (size_t i = 0; i < 5; ++i) {
    INFO(i);
    CHECK(log.rows[i].status == expected[i]);
  }
  // A value that is neither mapped nor ok/failed.
  log = parse_landing_log("node,landed_at,data_through,status\n"
                          "lab_batch,2026-03-02T01:38:00-06:00,2026-03-02T00:00:00-06:00,Success\n",
                          "feeds.csv", plan, map);
  CHECK(errors_of(log) ==
        std::vector<std::string>{"feeds.csv:2: error: bad status 'Success': expected ok or failed or a value given "
                                 "to --map-status"});
  // JSON Lines rows to skip need not have the required keys.
  log = parse_landing_log("{\"node\": \"lab_batch\", \"status\": \"RUNNING\"}\n", "x.jsonl", plan, map);
  CHECK(log.errors.empty());
  CHECK(log.skipped == 1);

  struct Bad {
    const char* spec;
    const char* error;
  };
  const Bad bad[] = {
      {"SUCCESS", "--map-status expects VALUE=ok|failed|skip pairs separated by commas, got 'SUCCESS'"},
      {"=ok", "--map-status expects VALUE=ok|failed|skip pairs separated by commas, got '=ok'"},
      {"SUCCESS=good", "--map-status: 'good' for value 'SUCCESS' must be ok, failed or skip"},
      {"DONE=fialed", "--map-status: 'fialed' for value 'DONE' must be ok, failed or skip (did you mean 'failed'?)"},
      {"A=ok,A=failed", "--map-status: value 'A' is mapped twice"},
  };
  for (const Bad& b : bad) {
    INFO(b.spec);
    ColumnMap m;
    CHECK_FALSE(parse_status_map(b.spec, &m, &error));
    CHECK(error == b.error);
  }
}
