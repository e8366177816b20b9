#pragma once
// The landing history store: an SQLite file of recorded deliveries.
//
// Guarantees, and how they are kept:
// - Versioned schema. A table `schema_migrations(version, description,
//   applied_at)` lists the migrations applied; opening a database applies the
//   missing ones in order, each in its own IMMEDIATE transaction that first
//   re-reads the version (so two processes opening a fresh file at once apply
//   each migration once). A database whose version is newer than this build
//   knows is refused, as is an SQLite file that belongs to something else
//   (its `application_id` differs, or it has tables but no migrations table).
// - WAL journal, synchronous=FULL, a 30 s busy timeout: readers (nightly)
//   never block a writer (record) and vice versa; two writers queue.
// - One transaction per recorded file (BEGIN IMMEDIATE ... COMMIT): a file's
//   rows all land or none do. A crash or kill -9 mid-file leaves the
//   database as it was before the file (SQLite's atomic commit; the WAL is
//   rolled back on the next open), and recording the file again completes it.
// - Idempotence: the natural key is (node, landed_at, data_through); rows
//   whose key is present are skipped (INSERT OR IGNORE), so recording a file
//   twice adds nothing. The first recorded status of a key wins.
// - Reads for a nightly check happen in one read transaction: a snapshot
//   that a concurrent record never half-changes.
//
// Instants are stored as unix seconds. Errors are returned as text (SQLite's
// message with what was being done); no exception leaves this module.
//
// Test hook: when the environment variable READYBY_TEST_SLOW_RECORD is a
// positive number of milliseconds, `record` sleeps that long after each row
// insert, so that tests can kill a recording process mid-transaction.

#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "history/history.h"
#include "history/landing_log.h"
#include "plan/plan.h"
#include "time/instant.h"

struct sqlite3;

namespace readyby {

/// The schema version this build writes (the number of migrations it knows).
int current_schema_version();

class HistoryStore {
 public:
  /// create: open or create for writing (record). existing: open an
  /// existing file for writing. read_only: for reading commands (nightly,
  /// forecast, report): never writes, migrates or changes the journal mode,
  /// so it works on a read-only file or folder; an empty file (or /dev/null)
  /// is a history with nothing recorded.
  enum class Mode { create, existing, read_only };

  /// Opens the database at `path` (creating the file when `mode` is create);
  /// for writing modes it configures WAL (waiting out another process's lock
  /// for up to the busy timeout) and applies pending migrations. nullptr with
  /// *error when the file cannot be opened or created, is not a regular file
  /// (writing modes), is not a readyby history database, or has a newer
  /// schema. A lock held by another process for longer than the busy timeout
  /// is reported as such ("stayed locked by another process ..."), never as
  /// bad input.
  static std::unique_ptr<HistoryStore> open(const std::string& path, Mode mode, std::string* error);
  ~HistoryStore();
  HistoryStore(const HistoryStore&) = delete;
  HistoryStore& operator=(const HistoryStore&) = delete;

  /// Records `rows` (validated against `plan`, whose node ids they name) in
  /// one transaction. Returns the number of rows added (rows already present
  /// are skipped); nullopt with *error when anything fails, in which case
  /// nothing of this call was written.
  std::optional<int64_t> record(const Plan& plan, const std::vector<LandingRow>& rows, std::string* error);

  /// The recorded deliveries of every node of `plan` whose data_through is at
  /// or after `since`, each list ordered by landed_at; nodes never recorded are
  /// nullopt. Read in one snapshot. nullopt with *error on failure.
  /// `first_data_through`, when given, receives per node the earliest
  /// data_through ever recorded (nullopt for unmonitored nodes).
  std::optional<History> read(const Plan& plan, Instant since, std::string* error,
                              std::vector<std::optional<Instant>>* first_data_through = nullptr);

  /// Number of recorded rows; -1 with *error on failure.
  int64_t row_count(std::string* error);
  /// The schema version of the open database.
  int schema_version(std::string* error);

 private:
  explicit HistoryStore(sqlite3* db) : db_(db) {}
  static std::unique_ptr<HistoryStore> open_read_only(const std::string& path, std::string* error);
  bool migrate(std::string* error);
  sqlite3* db_;
  bool empty_ = false;  // read-only open of a file with nothing recorded (no tables)
};

}  // namespace readyby
