#include <catch2/catch.hpp>

#include "plan_fixture.h"

#include <sqlite3.h>
#include <sys/stat.h>
#include <sys/wait.h>

#include <atomic>
#include <chrono>
#include <cstdlib>
#include <memory>
#include <thread>

#include "history/store.h"
#include "history_helpers.h"
#include "plan/plan_loader.h"
#include "time/zone.h"

using namespace readyby;
using readyby_test::TempDir;

namespace {

const char kPlan[] = R"(plan: tiny
title: Store tests (fictional)
timezone: Etc/UTC
sources:
  feed_a:
    schedule: "0 1 * * *"
    lands_after: PT30M
features:
  f_a:
    inputs: [feed_a]
    max_age: PT30H
models:
  m:
    features: [f_a]
    runs:
      - at: "0 6 * * *"
)";

Plan load() {
  return readyby::testing::plan_from_text(kPlan);
}

// `days` daily deliveries of feed_a starting 2026-01-01, as CSV.
std::string daily_log(int days, int first_day = 0) {
  std::string out = "node,landed_at,data_through,rows,status\n";
  for (int d = first_day; d < first_day + days; ++d) {
    Instant occurrence = *parse_rfc3339("2026-01-01T01:00:00Z") + Seconds(int64_t{d} * kSecondsPerDay);
    out += "feed_a," + format_rfc3339(occurrence + Seconds(25 * 60), nullptr) + "," +
           format_rfc3339(occurrence - Seconds(3600), nullptr) + ",100,ok\n";
  }
  return out;
}

// Runs one SQL query returning a single text or integer value, on a separate connection.
std::string query(const std::string& db_path, const char* sql) {
  sqlite3* db = nullptr;
  std::string out = "<error>";
  if (sqlite3_open_v2(db_path.c_str(), &db, SQLITE_OPEN_READONLY, nullptr) == SQLITE_OK) {
    sqlite3_stmt* st = nullptr;
    if (sqlite3_prepare_v2(db, sql, -1, &st, nullptr) == SQLITE_OK && sqlite3_step(st) == SQLITE_ROW) {
      const unsigned char* text = sqlite3_column_text(st, 0);
      out = text ? reinterpret_cast<const char*>(text) : "<null>";
    }
    sqlite3_finalize(st);
  }
  sqlite3_close(db);
  return out;
}

}  // namespace

TEST_CASE("store: schema migrations, WAL, and idempotent recording") {
  TempDir dir;
  Plan plan = load();
  const std::string db = dir.file("history.db");
  std::string error;
  LandingLog log = parse_landing_log(daily_log(10), "a.csv", plan, ColumnMap());
  REQUIRE(log.errors.empty());
  {
    auto store = HistoryStore::open(db, HistoryStore::Mode::create, &error);
    INFO(error);
    REQUIRE(store);
    CHECK(store->schema_version(&error) == current_schema_version());
    CHECK(*store->record(plan, log.rows, &error) == 10);
    CHECK(*store->record(plan, log.rows, &error) == 0);  // the same rows again: nothing added
    CHECK(store->row_count(&error) == 10);
  }
  CHECK(query(db, "PRAGMA journal_mode") == "wal");
  CHECK(query(db, "SELECT count(*) FROM schema_migrations") == std::to_string(current_schema_version()));
  CHECK(query(db, "SELECT description FROM schema_migrations WHERE version = 1") ==
        "landing deliveries, keyed by node, landed_at and data_through");
  // Reopening applies nothing new and keeps the rows.
  auto again = HistoryStore::open(db, HistoryStore::Mode::existing, &error);
  REQUIRE(again);
  CHECK(again->row_count(&error) == 10);
  std::vector<std::optional<Instant>> first;
  std::optional<History> history = again->read(plan, *parse_rfc3339("2026-01-05T00:00:00Z"), &error, &first);
  REQUIRE(history);
  REQUIRE((*history)[0]);
  CHECK((*history)[0]->size() == 6);  // data_through 01-05 00:00 .. 01-10 00:00
  CHECK(format_rfc3339(*first[0], nullptr) == "2026-01-01T00:00:00Z");
  CHECK_FALSE((*history)[1]);  // f_a: never recorded
}

TEST_CASE("store: refuses what is not its database") {
  TempDir dir;
  std::string error;
  CHECK_FALSE(HistoryStore::open(dir.file("missing.db"), HistoryStore::Mode::existing, &error));
  CHECK(error == "no history database at '" + dir.file("missing.db") + "' (record landing logs into it first)");

  readyby_test::write_text(dir.file("text.db"), "this is not a database, just some text that is long enough....");
  CHECK_FALSE(HistoryStore::open(dir.file("text.db"), HistoryStore::Mode::create, &error));
  CHECK(error.find("is not an SQLite database") != std::string::npos);

  sqlite3* db = nullptr;
  sqlite3_open(dir.file("other.db").c_str(), &db);
  sqlite3_exec(db, "CREATE TABLE patients (id INTEGER)", nullptr, nullptr, nullptr);
  sqlite3_close(db);
  CHECK_FALSE(HistoryStore::open(dir.file("other.db"), HistoryStore::Mode::create, &error));
  CHECK(error == "'" + dir.file("other.db") + "': an SQLite database with other tables, not a readyby history");

  {
    auto store = HistoryStore::open(dir.file("newer.db"), HistoryStore::Mode::create, &error);
    REQUIRE(store);
  }
  sqlite3_open(dir.file("newer.db").c_str(), &db);
  sqlite3_exec(db, "INSERT INTO schema_migrations VALUES (99, 'from the future', 'x')", nullptr, nullptr, nullptr);
  sqlite3_close(db);
  CHECK_FALSE(HistoryStore::open(dir.file("newer.db"), HistoryStore::Mode::existing, &error));
  CHECK(error.find("has schema version 99, newer than this readyby knows") != std::string::npos);
}

TEST_CASE("record: the whole command is rejected, nothing written, when a file has a bad row") {
  TempDir dir;
  readyby_test::write_text(dir.file("plan.yaml"), kPlan);
  readyby_test::write_text(dir.file("good.csv"), daily_log(3));
  readyby_test::write_text(dir.file("bad.csv"),
                           "node,landed_at,data_through\n"
                           "feed_a,2026-01-02T01:25:00Z,2026-01-02T00:00:00Z\n"
                           "feed_b,2026-01-03T01:25:00Z,2026-01-03T00:00:00Z\n"
                           "feed_a,2026-01-04T01:25:00Z,2026-01-04T03:00:00Z\n");
  auto r = readyby_test::run_readyby(dir, {"record", dir.file("good.csv"), dir.file("bad.csv"), "--plan",
                                           dir.file("plan.yaml"), "--db", dir.file("h.db")});
  CHECK(r.status == 2);
  CHECK(r.err == dir.file("bad.csv") + ":3: error: unknown node 'feed_b' (did you mean 'feed_a'?) in plan tiny\n" +
                     dir.file("bad.csv") +
                     ":4: error: data_through 2026-01-04T03:00:00Z is after landed_at 2026-01-04T01:25:00Z (a "
                     "delivery cannot hold data from after it landed)\n"
                     "readyby: nothing recorded: 1 of 2 files had errors\n");
  CHECK_FALSE(std::filesystem::exists(dir.file("h.db")));

  // With an existing database, it is left exactly as it was.
  auto first = readyby_test::run_readyby(
      dir, {"record", dir.file("good.csv"), "--plan", dir.file("plan.yaml"), "--db", dir.file("h.db")});
  REQUIRE(first.status == 0);
  auto again = readyby_test::run_readyby(dir, {"record", dir.file("bad.csv"), "--plan", dir.file("plan.yaml"),
                                               "--db", dir.file("h.db")});
  CHECK(again.status == 2);
  CHECK(query(dir.file("h.db"), "SELECT count(*) FROM landing") == "3");
}

TEST_CASE("record: recording the same files twice adds nothing (demo logs)") {
  TempDir dir;
  const std::string root = READYBY_SOURCE_DIR;
  const std::string plan = root + "/pipelines/larkspur.plan.yaml";
  std::vector<std::string> args = {"record"};
  for (const char* f : {"feeds-2026-01.csv", "feeds-2026-02.csv", "feeds-2026-03.csv"}) {
    args.push_back(root + "/pipelines/landing-logs/" + f);
  }
  for (const char* a : {"--plan", plan.c_str(), "--db"}) args.push_back(a);
  args.push_back(dir.file("demo.db"));
  auto first = readyby_test::run_readyby(dir, args);
  INFO(first.err);
  REQUIRE(first.status == 0);
  const std::string count = query(dir.file("demo.db"), "SELECT count(*) FROM landing");
  auto second = readyby_test::run_readyby(dir, args);
  REQUIRE(second.status == 0);
  INFO(second.out);
  size_t zero_new = 0;
  for (size_t pos = 0; (pos = second.out.find(" rows, 0 new\n", pos)) != std::string::npos; ++pos) ++zero_new;
  CHECK(zero_new == 3);
  CHECK(query(dir.file("demo.db"), "SELECT count(*) FROM landing") == count);
  CHECK(std::stoi(count) > 250);
  // The demo's late day exits 1 and names the chain.
  auto nightly = readyby_test::run_readyby(
      dir, {"nightly", plan, "--db", dir.file("demo.db"), "--date", "2026-03-03", "--format", "json"});
  CHECK(nightly.status == 1);
  CHECK(nightly.out.find("\"chain\": [\"lab_results\", \"labs_clean\", \"hie_merge\", \"outside_labs\"]") !=
        std::string::npos);
  CHECK(nightly.out.find("{\"source\": \"lab_results\"") != std::string::npos);
  const size_t lab = nightly.out.find("{\"source\": \"lab_results\"");
  CHECK(nightly.out.substr(lab, nightly.out.find('}', lab) - lab).find("\"drifting\": true") != std::string::npos);
}

TEST_CASE("record and nightly run concurrently on one database") {
  TempDir dir;
  readyby_test::write_text(dir.file("plan.yaml"), kPlan);
  readyby_test::write_text(dir.file("seed.csv"), daily_log(5));
  std::vector<std::string> files;
  for (int k = 0; k < 4; ++k) {
    files.push_back(dir.file("part" + std::to_string(k) + ".csv"));
    readyby_test::write_text(files.back(), daily_log(60, 5 + 60 * k));
  }
  REQUIRE(readyby_test::run_readyby(dir, {"record", dir.file("seed.csv"), "--plan", dir.file("plan.yaml"), "--db",
                                          dir.file("h.db")})
              .status == 0);
  std::vector<std::string> args = {"record"};
  args.insert(args.end(), files.begin(), files.end());
  for (const std::string& a : {std::string("--plan"), dir.file("plan.yaml"), std::string("--db"), dir.file("h.db")}) {
    args.push_back(a);
  }
  // About 240 rows at 2 ms each: the writer holds its transactions for ~0.5 s.
  pid_t writer = readyby_test::spawn_readyby(args, dir.file("w.out"), dir.file("w.err"),
                                             {"READYBY_TEST_SLOW_RECORD=2"});
  // A nightly run that ends before the writer has committed its last file ran
  // while the writer held or was about to take its write transaction.
  int during_recording = 0;
  for (int i = 0; i < 8; ++i) {
    auto r = readyby_test::run_readyby(
        dir, {"nightly", dir.file("plan.yaml"), "--db", dir.file("h.db"), "--date", "2026-01-04", "--window", "3"});
    INFO(r.err);
    CHECK((r.status == 0 || r.status == 1));
    CHECK(r.err.empty());
    if (readyby_test::read_text(dir.file("w.out")).find("part3.csv") == std::string::npos) ++during_recording;
  }
  CHECK(readyby_test::wait_for(writer) == 0);
  INFO(readyby_test::read_text(dir.file("w.err")));
  CHECK(during_recording > 0);
  CHECK(readyby_test::read_text(dir.file("w.out")).find("part3.csv: 60 rows, 60 new") != std::string::npos);
  CHECK(query(dir.file("h.db"), "SELECT count(*) FROM landing") == "245");
}

TEST_CASE("a recording killed mid-transaction leaves the database consistent, and a re-run completes it") {
  TempDir dir;
  readyby_test::write_text(dir.file("plan.yaml"), kPlan);
  readyby_test::write_text(dir.file("first.csv"), daily_log(5));
  readyby_test::write_text(dir.file("big.csv"), daily_log(3000, 5));
  const std::vector<std::string> args = {"record", dir.file("first.csv"), dir.file("big.csv"), "--plan",
                                         dir.file("plan.yaml"), "--db", dir.file("h.db")};
  // Test hook: 1 ms after each insert, so big.csv's transaction lasts > 3 s.
  pid_t child = readyby_test::spawn_readyby(args, dir.file("c.out"), dir.file("c.err"),
                                            {"READYBY_TEST_SLOW_RECORD=1"});
  // Wait until first.csv is committed (its line is printed), then a little more.
  for (int i = 0; i < 500 && readyby_test::read_text(dir.file("c.out")).find("first.csv") == std::string::npos; ++i) {
    std::this_thread::sleep_for(std::chrono::milliseconds(10));
  }
  std::this_thread::sleep_for(std::chrono::milliseconds(300));
  kill(child, SIGKILL);
  CHECK(readyby_test::wait_for(child) == 128 + SIGKILL);
  CHECK(query(dir.file("h.db"), "PRAGMA integrity_check") == "ok");
  CHECK(query(dir.file("h.db"), "SELECT count(*) FROM landing") == "5");  // first.csv only; nothing of big.csv

  auto rerun = readyby_test::run_readyby(dir, args);
  INFO(rerun.err);
  CHECK(rerun.status == 0);
  CHECK(rerun.out.find("first.csv: 5 rows, 0 new") != std::string::npos);
  CHECK(rerun.out.find("big.csv: 3000 rows, 3000 new") != std::string::npos);
  CHECK(query(dir.file("h.db"), "PRAGMA integrity_check") == "ok");
  CHECK(query(dir.file("h.db"), "SELECT count(*) FROM landing") == "3005");
}

TEST_CASE("store: a migration another process applied while this one waited is not applied again") {
  // Two processes opening a fresh file at once: both find no schema, one
  // takes the write lock and migrates, the other must re-read the version
  // once it has the lock (store.h). Here the "other process" is a second
  // connection that holds the write lock while the store opens, then copies
  // a fully migrated schema in and commits.
  TempDir dir;
  const std::string reference = dir.file("reference.db"), db = dir.file("h.db");
  std::string error;
  REQUIRE(HistoryStore::open(reference, HistoryStore::Mode::create, &error));

  sqlite3* other = nullptr;
  REQUIRE(sqlite3_open(db.c_str(), &other) == SQLITE_OK);
  auto exec = [&](const std::string& sql) {
    char* message = nullptr;
    int rc = sqlite3_exec(other, sql.c_str(), nullptr, nullptr, &message);
    INFO(sql << ": " << (message ? message : ""));
    sqlite3_free(message);
    REQUIRE(rc == SQLITE_OK);
  };
  exec("PRAGMA journal_mode=WAL");
  exec("ATTACH DATABASE '" + reference + "' AS ref");
  exec("BEGIN IMMEDIATE");

  std::atomic<bool> opened{false};
  std::unique_ptr<HistoryStore> store;
  std::string open_error;
  std::thread opener([&] {
    store = HistoryStore::open(db, HistoryStore::Mode::create, &open_error);
    opened = true;
  });
  std::this_thread::sleep_for(std::chrono::milliseconds(500));
  CHECK_FALSE(opened);  // it waits for the write lock

  std::vector<std::string> schema;
  sqlite3_stmt* st = nullptr;
  REQUIRE(sqlite3_prepare_v2(other, "SELECT sql FROM ref.sqlite_master WHERE sql IS NOT NULL ORDER BY rowid", -1, &st,
                             nullptr) == SQLITE_OK);
  while (sqlite3_step(st) == SQLITE_ROW) schema.emplace_back(reinterpret_cast<const char*>(sqlite3_column_text(st, 0)));
  sqlite3_finalize(st);
  REQUIRE(!schema.empty());
  for (const std::string& sql : schema) exec(sql);
  exec("INSERT INTO schema_migrations SELECT * FROM ref.schema_migrations");
  exec("PRAGMA main.application_id=" + query(reference, "PRAGMA application_id"));
  exec("COMMIT");
  opener.join();
  sqlite3_close(other);

  INFO(open_error);
  REQUIRE(store);
  CHECK(store->schema_version(&error) == current_schema_version());
  CHECK(query(db, "SELECT count(*) FROM schema_migrations") == std::to_string(current_schema_version()));
  CHECK(query(db, "PRAGMA integrity_check") == "ok");
}

// Regression: 3-6 of 100 races of `record` on a new database failed at once
// while switching it to WAL ("database is locked"). Several processes now
// create and record into one new file at the same time, in every round.
TEST_CASE("concurrent record on a new database: every process succeeds") {
  TempDir dir;
  readyby_test::write_text(dir.file("plan.yaml"), kPlan);
  const int kProcesses = 6, kRounds = 8;
  for (int k = 0; k < kProcesses; ++k) {
    readyby_test::write_text(dir.file("part" + std::to_string(k) + ".csv"), daily_log(20, 20 * k));
  }
  for (int round = 0; round < kRounds; ++round) {
    const std::string db = dir.file("new" + std::to_string(round) + ".db");
    std::vector<pid_t> pids;
    for (int k = 0; k < kProcesses; ++k) {
      std::string tag = std::to_string(round) + "-" + std::to_string(k);
      pids.push_back(readyby_test::spawn_readyby(
          {"record", dir.file("part" + std::to_string(k) + ".csv"), "--plan", dir.file("plan.yaml"), "--db", db},
          dir.file("o" + tag), dir.file("e" + tag)));
    }
    for (int k = 0; k < kProcesses; ++k) {
      std::string tag = std::to_string(round) + "-" + std::to_string(k);
      int status = readyby_test::wait_for(pids[static_cast<size_t>(k)]);
      INFO("round " << round << ", process " << k << ": " << readyby_test::read_text(dir.file("e" + tag)));
      CHECK(status == 0);
    }
    CHECK(query(db, "PRAGMA integrity_check") == "ok");
    CHECK(query(db, "SELECT count(*) FROM landing") == std::to_string(20 * kProcesses));
    CHECK(query(db, "SELECT count(*) FROM schema_migrations") == std::to_string(current_schema_version()));
  }
}

// Regression: `nightly` opened the history for writing, so it failed on a
// file it may only read ("not an SQLite database (... readonly)"), and
// `--db /dev/null` was refused. Reading commands open read-only; an empty
// file is a history with nothing recorded.
TEST_CASE("nightly reads a history it may not write, and /dev/null as an empty history") {
  TempDir dir;
  readyby_test::write_text(dir.file("plan.yaml"), kPlan);
  readyby_test::write_text(dir.file("log.csv"), daily_log(10));
  REQUIRE(readyby_test::run_readyby(dir, {"record", dir.file("log.csv"), "--plan", dir.file("plan.yaml"), "--db",
                                          dir.file("h.db")})
              .status == 0);
  const std::vector<std::string> nightly = {"nightly", dir.file("plan.yaml"), "--db", dir.file("h.db"),
                                            "--date", "2026-01-05", "--format", "json"};
  auto as_owner = readyby_test::run_readyby(dir, nightly);
  INFO(as_owner.err);
  REQUIRE((as_owner.status == 0 || as_owner.status == 1));

  // The same as an unprivileged user who can read but not write the file or
  // its folder (only root can switch users here; others skip this part).
  if (::geteuid() == 0 && std::system("command -v setpriv >/dev/null 2>&1") == 0) {
    std::string cmd = "cd / && setpriv --reuid=65534 --regid=65534 --clear-groups " + std::string(READYBY_BINARY) +
                      " nightly " + dir.file("plan.yaml") + " --db " + dir.file("h.db") +
                      " --date 2026-01-05 --format json > " + dir.file("ro.out") + " 2> " + dir.file("ro.err");
    ::chmod(dir.path().c_str(), 0755);
    int raw = std::system(cmd.c_str());
    INFO(readyby_test::read_text(dir.file("ro.err")));
    CHECK(WIFEXITED(raw));
    CHECK((WEXITSTATUS(raw) == 0 || WEXITSTATUS(raw) == 1));
    CHECK(readyby_test::read_text(dir.file("ro.out")) == as_owner.out);
  }

  auto empty = readyby_test::run_readyby(
      dir, {"nightly", dir.file("plan.yaml"), "--db", "/dev/null", "--date", "2026-01-05"});
  INFO(empty.err);
  CHECK((empty.status == 0 || empty.status == 1));
  CHECK(empty.out.find("unmonitored") != std::string::npos);
  // Recording needs a real file.
  auto record_null = readyby_test::run_readyby(
      dir, {"record", dir.file("log.csv"), "--plan", dir.file("plan.yaml"), "--db", "/dev/null"});
  CHECK(record_null.status == 2);
  CHECK(record_null.err.find("'/dev/null' is not a regular file") != std::string::npos);
}
