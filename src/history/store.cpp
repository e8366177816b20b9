#include "history/store.h"

#include <sqlite3.h>
#include <sys/stat.h>

#include <cctype>
#include <chrono>
#include <cstdlib>
#include <thread>

namespace readyby {

namespace {

// 'RYBY': marks the file as a readyby history database.
constexpr int kApplicationId = 0x52594259;
constexpr int kBusyTimeoutMs = 30000;

struct Migration {
  int version;
  const char* description;
  const char* sql;
};

// Append only: a released migration is never edited.
const Migration kMigrations[] = {
    {1, "landing deliveries, keyed by node, landed_at and data_through",
     "CREATE TABLE landing ("
     "  node TEXT NOT NULL,"
     "  landed_at INTEGER NOT NULL,"
     "  data_through INTEGER NOT NULL,"
     "  scheduled_at INTEGER,"
     "  rows INTEGER CHECK (rows IS NULL OR rows >= 0),"
     "  status TEXT NOT NULL CHECK (status IN ('ok', 'failed')),"
     "  recorded_at INTEGER NOT NULL,"
     "  CHECK (data_through <= landed_at),"
     "  PRIMARY KEY (node, landed_at, data_through)"
     ") WITHOUT ROWID;"},
    {2, "index for nightly reads by node and data_through",
     "CREATE INDEX landing_by_node_through ON landing (node, data_through);"},
};

// A prepared statement, finalized on scope exit.
class Statement {
 public:
  Statement(sqlite3* db, const char* sql) { sqlite3_prepare_v2(db, sql, -1, &stmt_, nullptr); }
  ~Statement() { sqlite3_finalize(stmt_); }
  Statement(const Statement&) = delete;
  Statement& operator=(const Statement&) = delete;
  sqlite3_stmt* get() const { return stmt_; }
  explicit operator bool() const { return stmt_ != nullptr; }

 private:
  sqlite3_stmt* stmt_ = nullptr;
};

std::string db_error(sqlite3* db, const std::string& doing) {
  int code = sqlite3_errcode(db) & 0xff;
  if (code == SQLITE_BUSY || code == SQLITE_LOCKED) {
    return doing + ": the database stayed locked by another process for more than " +
           std::to_string(kBusyTimeoutMs / 1000) + " s; nothing was changed, try again";
  }
  return doing + ": " + sqlite3_errmsg(db);
}

bool exec(sqlite3* db, const char* sql, std::string* error, const char* doing) {
  char* message = nullptr;
  if (sqlite3_exec(db, sql, nullptr, nullptr, &message) == SQLITE_OK) return true;
  int code = sqlite3_errcode(db) & 0xff;
  *error = (code == SQLITE_BUSY || code == SQLITE_LOCKED) ? db_error(db, doing)
                                                           : std::string(doing) + ": " + (message ? message : sqlite3_errmsg(db));
  sqlite3_free(message);
  return false;
}

// Runs a statement that returns one row, retrying while the database is busy
// for up to the busy timeout. Some lock upgrades (switching a new file to
// WAL while another process opens it) report SQLITE_BUSY at once instead of
// calling the busy handler, so the wait is done here.
int step_waiting(sqlite3* db, const char* sql) {
  auto deadline = std::chrono::steady_clock::now() + std::chrono::milliseconds(kBusyTimeoutMs);
  while (true) {
    sqlite3_stmt* st = nullptr;
    int rc = sqlite3_prepare_v2(db, sql, -1, &st, nullptr);
    if (rc == SQLITE_OK) rc = sqlite3_step(st);
    sqlite3_finalize(st);
    if ((rc & 0xff) != SQLITE_BUSY && (rc & 0xff) != SQLITE_LOCKED) return rc;
    if (std::chrono::steady_clock::now() > deadline) return rc;
    std::this_thread::sleep_for(std::chrono::milliseconds(5));
  }
}

// "file:" URI of `path` for sqlite3_open_v2 with SQLITE_OPEN_URI.
std::string file_uri(const std::string& path, const char* query) {
  static const char kHex[] = "0123456789ABCDEF";
  std::string uri = "file:";
  for (unsigned char c : path) {
    if (std::isalnum(c) || c == '/' || c == '.' || c == '-' || c == '_' || c == '~') {
      uri += static_cast<char>(c);
    } else {
      uri += '%';
      uri += kHex[c >> 4];
      uri += kHex[c & 15];
    }
  }
  return uri + "?" + query;
}

// The single integer of `sql`; nullopt on error.
std::optional<int64_t> query_int(sqlite3* db, const char* sql, std::string* error) {
  Statement st(db, sql);
  if (!st) {
    *error = db_error(db, "reading the database");
    return std::nullopt;
  }
  int rc = sqlite3_step(st.get());
  if (rc == SQLITE_ROW) return sqlite3_column_int64(st.get(), 0);
  if (rc == SQLITE_DONE) return 0;
  *error = db_error(db, "reading the database");
  return std::nullopt;
}

// Rolls back an open transaction unless committed.
class Transaction {
 public:
  Transaction(sqlite3* db, const char* begin, std::string* error) : db_(db) {
    open_ = exec(db, begin, error, "starting a transaction");
  }
  ~Transaction() {
    if (open_) sqlite3_exec(db_, "ROLLBACK", nullptr, nullptr, nullptr);
  }
  Transaction(const Transaction&) = delete;
  Transaction& operator=(const Transaction&) = delete;
  bool ok() const { return open_; }
  bool commit(std::string* error) {
    if (!exec(db_, "COMMIT", error, "committing")) return false;
    open_ = false;
    return true;
  }

 private:
  sqlite3* db_;
  bool open_ = false;
};

int slow_record_ms() {
  const char* v = std::getenv("READYBY_TEST_SLOW_RECORD");
  return v ? std::atoi(v) : 0;
}

}  // namespace

int current_schema_version() { return static_cast<int>(std::size(kMigrations)); }

namespace {

// Why sqlite3_open_v2 failed: a missing file is named as such when the
// database must already exist (every mode but create).
std::string open_failure(const std::string& path, int rc, sqlite3* db, bool must_exist) {
  if (must_exist && rc == SQLITE_CANTOPEN) return "no history database at '" + path + "' (record landing logs into it first)";
  return "cannot open '" + path + "': " + (db ? sqlite3_errmsg(db) : sqlite3_errstr(rc));
}

}  // namespace

std::unique_ptr<HistoryStore> HistoryStore::open_read_only(const std::string& path, std::string* error) {
  // A plain read-only open reads a WAL database when its -shm file can be
  // used; in a folder this user cannot write (a read-only copy, a backup), it
  // cannot, and the file is then opened as immutable: nobody can be writing it.
  for (const char* query : {"mode=ro", "immutable=1"}) {
    sqlite3* db = nullptr;
    int rc = sqlite3_open_v2(file_uri(path, query).c_str(), &db, SQLITE_OPEN_READONLY | SQLITE_OPEN_URI, nullptr);
    if (rc != SQLITE_OK) {
      *error = open_failure(path, rc, db, true);
      sqlite3_close(db);
      return nullptr;
    }
    std::unique_ptr<HistoryStore> store(new HistoryStore(db));
    sqlite3_busy_timeout(db, kBusyTimeoutMs);
    sqlite3_extended_result_codes(db, 1);
    std::optional<int64_t> app = query_int(db, "PRAGMA application_id", error);
    if (!app) {
      int code = sqlite3_errcode(db) & 0xff;
      if (code == SQLITE_CANTOPEN || code == SQLITE_READONLY) continue;  // try immutable
      *error = "'" + path + "' is not an SQLite database (" + *error + ")";
      return nullptr;
    }
    if (*app != 0 && *app != kApplicationId) {
      *error = "'" + path + "' is an SQLite database of another application, not a readyby history";
      return nullptr;
    }
    std::optional<int64_t> tables = query_int(db, "SELECT count(*) FROM sqlite_master", error);
    std::optional<int64_t> migrations =
        query_int(db, "SELECT count(*) FROM sqlite_master WHERE name = 'schema_migrations'", error);
    if (!tables || !migrations) {
      *error = "'" + path + "': " + *error;
      return nullptr;
    }
    if (*tables == 0) {
      // An empty file (or /dev/null): a history with nothing recorded.
      store->empty_ = true;
      return store;
    }
    if (!*migrations) {
      *error = "'" + path + "' is an SQLite database with other tables, not a readyby history";
      return nullptr;
    }
    int version = store->schema_version(error);
    if (version < 0) return nullptr;
    if (version > current_schema_version()) {
      *error = "'" + path + "': the history database has schema version " + std::to_string(version) +
               ", newer than this readyby knows (" + std::to_string(current_schema_version()) + ")";
      return nullptr;
    }
    // Every released schema has the landing table that reads need.
    store->empty_ = version == 0;
    return store;
  }
  *error = "cannot read '" + path + "'";
  return nullptr;
}

std::unique_ptr<HistoryStore> HistoryStore::open(const std::string& path, Mode mode, std::string* error) {
  if (mode == Mode::read_only) return open_read_only(path, error);
  sqlite3* db = nullptr;
  int flags = SQLITE_OPEN_READWRITE | (mode == Mode::create ? SQLITE_OPEN_CREATE : 0);
  int rc = sqlite3_open_v2(path.c_str(), &db, flags, nullptr);
  if (rc != SQLITE_OK) {
    *error = open_failure(path, rc, db, mode == Mode::existing);
    sqlite3_close(db);
    return nullptr;
  }
  std::unique_ptr<HistoryStore> store(new HistoryStore(db));
  sqlite3_busy_timeout(db, kBusyTimeoutMs);
  sqlite3_extended_result_codes(db, 1);
  struct stat st {};
  if (::stat(path.c_str(), &st) == 0 && !S_ISREG(st.st_mode)) {
    *error = "'" + path + "' is not a regular file; record needs a database file it can write";
    return nullptr;
  }
  std::optional<int64_t> app = query_int(db, "PRAGMA application_id", error);
  if (!app) {
    *error = "'" + path + "' is not an SQLite database (" + *error + ")";
    return nullptr;
  }
  if (*app != 0 && *app != kApplicationId) {
    *error = "'" + path + "' is an SQLite database of another application, not a readyby history";
    return nullptr;
  }
  {
    // Switching to WAL needs a moment's exclusive access: wait for it.
    if (step_waiting(db, "PRAGMA journal_mode=WAL") != SQLITE_ROW) {
      *error = db_error(db, "setting the WAL journal on '" + path + "'");
      return nullptr;
    }
  }
  if (!exec(db, "PRAGMA synchronous=FULL; PRAGMA cache_size=-65536;", error, "configuring the database")) {
    return nullptr;
  }
  if (!store->migrate(error)) {
    *error = "'" + path + "': " + *error;
    return nullptr;
  }
  return store;
}

HistoryStore::~HistoryStore() { sqlite3_close(db_); }

bool HistoryStore::migrate(std::string* error) {
  for (const Migration& m : kMigrations) {
    // Cheap check outside a write transaction first: most opens have nothing to do.
    std::optional<int64_t> has_table =
        query_int(db_, "SELECT count(*) FROM sqlite_master WHERE name = 'schema_migrations'", error);
    if (!has_table) return false;
    if (*has_table) {
      std::optional<int64_t> version = query_int(db_, "SELECT max(version) FROM schema_migrations", error);
      if (!version) return false;
      if (*version > current_schema_version()) {
        *error = "the history database has schema version " + std::to_string(*version) +
                 ", newer than this readyby knows (" + std::to_string(current_schema_version()) + ")";
        return false;
      }
      if (*version >= m.version) continue;
    }
    Transaction tx(db_, "BEGIN IMMEDIATE", error);
    if (!tx.ok()) return false;
    if (!*has_table) {
      std::optional<int64_t> tables = query_int(db_, "SELECT count(*) FROM sqlite_master", error);
      if (!tables) return false;
      std::optional<int64_t> again =
          query_int(db_, "SELECT count(*) FROM sqlite_master WHERE name = 'schema_migrations'", error);
      if (!again) return false;
      if (!*again && *tables > 0) {
        *error = "an SQLite database with other tables, not a readyby history";
        return false;
      }
      if (!exec(db_,
                "CREATE TABLE IF NOT EXISTS schema_migrations (version INTEGER PRIMARY KEY,"
                " description TEXT NOT NULL, applied_at TEXT NOT NULL);",
                error, "creating the migrations table")) {
        return false;
      }
      std::string set_id = "PRAGMA application_id=" + std::to_string(kApplicationId);
      if (!exec(db_, set_id.c_str(), error, "marking the database")) return false;
    }
    // Another process may have applied it while we waited for the lock.
    std::optional<int64_t> version = query_int(db_, "SELECT coalesce(max(version), 0) FROM schema_migrations", error);
    if (!version) return false;
    if (*version >= m.version) continue;
    if (!exec(db_, m.sql, error, "applying migration")) return false;
    Statement note(db_,
                   "INSERT INTO schema_migrations (version, description, applied_at)"
                   " VALUES (?, ?, strftime('%Y-%m-%dT%H:%M:%SZ', 'now'))");
    if (!note) return false;
    sqlite3_bind_int(note.get(), 1, m.version);
    sqlite3_bind_text(note.get(), 2, m.description, -1, SQLITE_STATIC);
    if (sqlite3_step(note.get()) != SQLITE_DONE) {
      *error = db_error(db_, "noting migration " + std::to_string(m.version));
      return false;
    }
    if (!tx.commit(error)) return false;
  }
  return true;
}

std::optional<int64_t> HistoryStore::record(const Plan& plan, const std::vector<LandingRow>& rows,
                                            std::string* error) {
  const int slow_ms = slow_record_ms();
  Transaction tx(db_, "BEGIN IMMEDIATE", error);
  if (!tx.ok()) return std::nullopt;
  Statement insert(db_,
                   "INSERT OR IGNORE INTO landing (node, landed_at, data_through, scheduled_at, rows, status,"
                   " recorded_at) VALUES (?, ?, ?, ?, ?, ?, ?)");
  if (!insert) {
    *error = db_error(db_, "preparing the insert");
    return std::nullopt;
  }
  const int64_t now = std::chrono::duration_cast<Seconds>(std::chrono::system_clock::now().time_since_epoch()).count();
  sqlite3_stmt* st = insert.get();
  int64_t added = 0;
  for (const LandingRow& r : rows) {
    const std::string& id = plan.nodes[static_cast<size_t>(r.node)].id;
    sqlite3_bind_text(st, 1, id.data(), static_cast<int>(id.size()), SQLITE_STATIC);
    sqlite3_bind_int64(st, 2, to_unix(r.landed_at));
    sqlite3_bind_int64(st, 3, to_unix(r.data_through));
    if (r.scheduled_at) sqlite3_bind_int64(st, 4, to_unix(*r.scheduled_at));
    else sqlite3_bind_null(st, 4);
    if (r.rows) sqlite3_bind_int64(st, 5, *r.rows);
    else sqlite3_bind_null(st, 5);
    sqlite3_bind_text(st, 6, to_string(r.status), -1, SQLITE_STATIC);
    sqlite3_bind_int64(st, 7, now);
    if (sqlite3_step(st) != SQLITE_DONE) {
      *error = db_error(db_, "inserting the row of line " + std::to_string(r.line));
      return std::nullopt;
    }
    added += sqlite3_changes(db_);
    sqlite3_reset(st);
    if (slow_ms > 0) std::this_thread::sleep_for(std::chrono::milliseconds(slow_ms));
  }
  if (!tx.commit(error)) return std::nullopt;
  return added;
}

std::optional<History> HistoryStore::read(const Plan& plan, Instant since, std::string* error,
                                          std::vector<std::optional<Instant>>* first_data_through) {
  if (empty_) {
    if (first_data_through) first_data_through->assign(plan.nodes.size(), std::nullopt);
    return History(plan.nodes.size());
  }
  Transaction tx(db_, "BEGIN", error);
  if (!tx.ok()) return std::nullopt;
  Statement first(db_, "SELECT min(data_through) FROM landing WHERE node = ?");
  Statement rows(db_,
                 "SELECT landed_at, data_through, scheduled_at, status FROM landing"
                 " WHERE node = ? AND data_through >= ? ORDER BY landed_at, data_through");
  if (!first || !rows) {
    *error = db_error(db_, "preparing the history query");
    return std::nullopt;
  }
  History history(plan.nodes.size());
  if (first_data_through) first_data_through->assign(plan.nodes.size(), std::nullopt);
  for (size_t n = 0; n < plan.nodes.size(); ++n) {
    const std::string& id = plan.nodes[n].id;
    sqlite3_bind_text(first.get(), 1, id.data(), static_cast<int>(id.size()), SQLITE_STATIC);
    int rc = sqlite3_step(first.get());
    if (rc != SQLITE_ROW) {
      *error = db_error(db_, "reading the history of '" + id + "'");
      return std::nullopt;
    }
    const bool monitored = sqlite3_column_type(first.get(), 0) != SQLITE_NULL;
    if (monitored && first_data_through) (*first_data_through)[n] = from_unix(sqlite3_column_int64(first.get(), 0));
    sqlite3_reset(first.get());
    if (!monitored) continue;
    std::vector<StoredLanding>& list = history[n].emplace();
    sqlite3_bind_text(rows.get(), 1, id.data(), static_cast<int>(id.size()), SQLITE_STATIC);
    sqlite3_bind_int64(rows.get(), 2, to_unix(since));
    while ((rc = sqlite3_step(rows.get())) == SQLITE_ROW) {
      StoredLanding s;
      s.landed_at = from_unix(sqlite3_column_int64(rows.get(), 0));
      s.data_through = from_unix(sqlite3_column_int64(rows.get(), 1));
      if (sqlite3_column_type(rows.get(), 2) != SQLITE_NULL) {
        s.scheduled_at = from_unix(sqlite3_column_int64(rows.get(), 2));
      }
      const unsigned char* status = sqlite3_column_text(rows.get(), 3);
      s.status = status && std::string_view(reinterpret_cast<const char*>(status)) == "failed" ? LandingStatus::failed
                                                                                               : LandingStatus::ok;
      list.push_back(s);
    }
    if (rc != SQLITE_DONE) {
      *error = db_error(db_, "reading the history of '" + id + "'");
      return std::nullopt;
    }
    sqlite3_reset(rows.get());
  }
  if (!tx.commit(error)) return std::nullopt;
  return history;
}

int64_t HistoryStore::row_count(std::string* error) {
  if (empty_) return 0;
  std::optional<int64_t> n = query_int(db_, "SELECT count(*) FROM landing", error);
  return n ? *n : -1;
}

int HistoryStore::schema_version(std::string* error) {
  std::optional<int64_t> v = query_int(db_, "SELECT coalesce(max(version), 0) FROM schema_migrations", error);
  return v ? static_cast<int>(*v) : -1;
}

}  // namespace readyby
