#include "catalog/index.h"

#include <fcntl.h>
#include <sqlite3.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cerrno>
#include <cstring>

#include <algorithm>
#include <cctype>
#include <cstdlib>
#include <filesystem>
#include <map>
#include <sstream>

namespace readyby {

namespace fs = std::filesystem;

namespace {

// Bumped whenever the schema below changes, so old index files are rebuilt.
const char kSchemaVersion[] = "2";

const char kSchema[] = R"(
CREATE TABLE meta(key TEXT PRIMARY KEY, value TEXT NOT NULL);
CREATE TABLE entries(
  rowid INTEGER PRIMARY KEY, id TEXT NOT NULL UNIQUE, layer INTEGER NOT NULL, path TEXT NOT NULL,
  name TEXT, kind TEXT, summary TEXT, outcome TEXT, outcome_detail TEXT, horizon TEXT,
  age_min INTEGER, age_max INTEGER, condition TEXT, time_point TEXT, settings TEXT,
  score_min INTEGER, score_max INTEGER, provenance TEXT, owner TEXT, go_live TEXT, status TEXT,
  pub_authors TEXT, pub_year INTEGER, pub_title TEXT, pub_journal TEXT, pub_doi TEXT);
CREATE TABLE inputs(entry INTEGER NOT NULL, seq INTEGER NOT NULL, element TEXT, label TEXT,
  points INTEGER, when_text TEXT, recency TEXT, PRIMARY KEY(entry, seq));
CREATE TABLE performance(entry INTEGER NOT NULL, seq INTEGER NOT NULL, metric TEXT, value REAL,
  cohort TEXT, PRIMARY KEY(entry, seq));
CREATE TABLE entry_settings(setting TEXT NOT NULL, entry INTEGER NOT NULL, PRIMARY KEY(setting, entry));
CREATE TABLE vocabulary(section TEXT NOT NULL, seq INTEGER NOT NULL, id TEXT NOT NULL, label TEXT,
  synonyms TEXT, broader TEXT, kind TEXT, structured INTEGER, loinc TEXT, path TEXT, line INTEGER, col INTEGER,
  PRIMARY KEY(section, seq));
CREATE VIRTUAL TABLE entry_text USING fts5(name, outcome, population, summary, inputs,
  tokenize = 'porter unicode61');
)";

// BM25 column weights: name, outcome, population, summary, inputs.
const char kRank[] = "bm25(entry_text, 10.0, 6.0, 3.0, 2.0, 1.0)";

// How long a reader or writer waits for another process's lock before giving
// up with an error (never with an empty answer).
constexpr int kBusyTimeoutMs = 10000;

// A prepared statement that finalizes itself. Every SQLite return code is
// checked: a failed prepare, bind or step leaves an error message in
// `error()`, and step() distinguishes "a row" from "no more rows" from
// "failed" (SQLITE_BUSY included), so a lock is never mistaken for an empty
// result.
class Statement {
 public:
  Statement(sqlite3* db, const std::string& sql) : db_(db) {
    if (sqlite3_prepare_v2(db, sql.c_str(), -1, &stmt_, nullptr) != SQLITE_OK) fail();
  }
  ~Statement() { sqlite3_finalize(stmt_); }
  Statement(const Statement&) = delete;
  Statement& operator=(const Statement&) = delete;
  bool ok() const { return stmt_ != nullptr && error_.empty(); }
  const std::string& error() const { return error_; }
  sqlite3_stmt* get() const { return stmt_; }

  void bind(int i, const std::string& s) {
    check(stmt_ ? sqlite3_bind_text(stmt_, i, s.c_str(), static_cast<int>(s.size()), SQLITE_TRANSIENT) : SQLITE_MISUSE);
  }
  void bind(int i, long long v) { check(stmt_ ? sqlite3_bind_int64(stmt_, i, v) : SQLITE_MISUSE); }
  void bind(int i, double v) { check(stmt_ ? sqlite3_bind_double(stmt_, i, v) : SQLITE_MISUSE); }
  template <class T>
  void bind(int i, const std::optional<T>& v) {
    if (v) bind(i, static_cast<long long>(*v));
    else check(stmt_ ? sqlite3_bind_null(stmt_, i) : SQLITE_MISUSE);
  }
  void bind_text_or_null(int i, const std::string& s) {
    if (s.empty()) check(stmt_ ? sqlite3_bind_null(stmt_, i) : SQLITE_MISUSE);
    else bind(i, s);
  }
  /// Runs an insert (or any statement without rows) and resets it for reuse.
  /// False, with error() set, when anything about it failed.
  bool run() {
    if (!ok()) return false;
    int rc = sqlite3_step(stmt_);
    if (rc != SQLITE_DONE) fail();
    sqlite3_reset(stmt_);
    sqlite3_clear_bindings(stmt_);
    return ok();
  }
  /// True while there is a row; false at the end *or* on failure — callers
  /// tell them apart with ok() after the loop.
  bool step() {
    if (!ok()) return false;
    int rc = sqlite3_step(stmt_);
    if (rc == SQLITE_ROW) return true;
    if (rc != SQLITE_DONE) fail();
    return false;
  }
  std::string text(int col) const {
    const unsigned char* t = sqlite3_column_text(stmt_, col);
    return t ? reinterpret_cast<const char*>(t) : "";
  }
  std::optional<long> integer(int col) const {
    if (sqlite3_column_type(stmt_, col) == SQLITE_NULL) return std::nullopt;
    return static_cast<long>(sqlite3_column_int64(stmt_, col));
  }
  double real(int col) const { return sqlite3_column_double(stmt_, col); }

 private:
  void check(int rc) {
    if (rc != SQLITE_OK && error_.empty()) fail();
  }
  void fail() {
    if (!error_.empty()) return;
    int code = sqlite3_errcode(db_);
    error_ = sqlite3_errmsg(db_);
    if (code == SQLITE_BUSY || code == SQLITE_LOCKED) {
      error_ += " (another readyby process held the catalogue index for more than " +
                std::to_string(kBusyTimeoutMs / 1000) + " s)";
    }
    if (error_.empty() || error_ == "not an error") error_ = "SQLite error";
  }
  sqlite3* db_;
  sqlite3_stmt* stmt_ = nullptr;
  std::string error_;
};

std::string join(const std::vector<std::string>& items, const char* sep) {
  std::string out;
  for (const std::string& s : items) out += (out.empty() ? "" : sep) + s;
  return out;
}

std::vector<std::string> split_words(const std::string& text) {
  std::vector<std::string> out;
  std::istringstream in(text);
  std::string w;
  while (in >> w) out.push_back(w);
  return out;
}

bool exec(sqlite3* db, const char* sql, std::string* error) {
  char* message = nullptr;
  if (sqlite3_exec(db, sql, nullptr, nullptr, &message) == SQLITE_OK) return true;
  *error = message ? message : sqlite3_errmsg(db);
  sqlite3_free(message);
  return false;
}

// The FTS5 document of an entry, column by column (see kSchema).
std::vector<std::string> document(const Entry& e, const Vocabulary& vocabulary) {
  std::string outcome = e.outcome + " " + e.outcome_detail;
  if (const Term* t = vocabulary.outcome(e.outcome)) outcome += " " + t->label + " " + join(t->synonyms, " ");
  std::string inputs;
  for (const EntryInput& in : e.inputs) inputs += in.label + " ";
  return {e.id + " " + e.name, outcome, e.condition, e.summary, inputs};
}

// The insert statements of a build, prepared once.
struct Inserter {
  explicit Inserter(sqlite3* db)
      : db(db),
        entry(db, "INSERT INTO entries VALUES(?1,?2,?3,?4,?5,?6,?7,?8,?9,?10,?11,?12,?13,?14,?15,?16,?17,?18,?19,?20,"
                  "?21,?22,?23,?24,?25,?26)"),
        input(db, "INSERT INTO inputs VALUES(?1,?2,?3,?4,?5,?6,?7)"),
        perf(db, "INSERT INTO performance VALUES(?1,?2,?3,?4,?5)"),
        setting(db, "INSERT OR IGNORE INTO entry_settings VALUES(?1,?2)"),
        text(db, "INSERT INTO entry_text(rowid, name, outcome, population, summary, inputs) VALUES(?1,?2,?3,?4,?5,?6)") {}
  bool ok() const { return entry.ok() && input.ok() && perf.ok() && setting.ok() && text.ok(); }
  bool insert(const Entry& e, long long rowid, const Vocabulary& vocabulary);

  sqlite3* db;
  Statement entry, input, perf, setting, text;
};

bool Inserter::insert(const Entry& e, long long rowid, const Vocabulary& vocabulary) {
  Statement& st = entry;
  st.bind(1, rowid);
  st.bind(2, e.id);
  st.bind(3, static_cast<long long>(e.layer));
  st.bind(4, e.path);
  st.bind(5, e.name);
  st.bind(6, e.kind);
  st.bind(7, e.summary);
  st.bind(8, e.outcome);
  st.bind(9, e.outcome_detail);
  st.bind_text_or_null(10, e.horizon ? e.horizon->str() : "");
  st.bind(11, e.age_min);
  st.bind(12, e.age_max);
  st.bind(13, e.condition);
  st.bind(14, e.time_point);
  st.bind(15, join(e.settings, " "));
  st.bind(16, e.score_range ? std::optional<long>(e.score_range->first) : std::nullopt);
  st.bind(17, e.score_range ? std::optional<long>(e.score_range->second) : std::nullopt);
  st.bind(18, e.provenance);
  st.bind(19, e.owner);
  st.bind(20, e.go_live);
  st.bind(21, e.status);
  if (e.publication) {
    st.bind(22, e.publication->authors);
    st.bind(23, static_cast<long long>(e.publication->year));
    st.bind(24, e.publication->title);
    st.bind(25, e.publication->journal);
    st.bind(26, e.publication->doi);
  }
  if (!st.run()) return false;

  Statement& in = input;
  for (size_t i = 0; i < e.inputs.size(); ++i) {
    const EntryInput& x = e.inputs[i];
    in.bind(1, rowid);
    in.bind(2, static_cast<long long>(i));
    in.bind(3, x.element);
    in.bind(4, x.label);
    in.bind(5, x.points);
    in.bind(6, x.when);
    in.bind_text_or_null(7, x.recency ? format_duration(*x.recency) : "");
    if (!in.run()) return false;
  }
  for (size_t i = 0; i < e.performance.size(); ++i) {
    perf.bind(1, rowid);
    perf.bind(2, static_cast<long long>(i));
    perf.bind(3, e.performance[i].metric);
    perf.bind(4, e.performance[i].value);
    perf.bind(5, e.performance[i].cohort);
    if (!perf.run()) return false;
  }
  for (const std::string& s : e.settings) {
    setting.bind(1, s);
    setting.bind(2, rowid);
    if (!setting.run()) return false;
  }
  std::vector<std::string> doc = document(e, vocabulary);
  text.bind(1, rowid);
  for (size_t i = 0; i < doc.size(); ++i) text.bind(static_cast<int>(i) + 2, doc[i]);
  if (!text.run()) return false;
  return true;
}

std::string join_lines(const std::vector<std::string>& items) { return join(items, "\n"); }

std::vector<std::string> split_lines(const std::string& text) {
  std::vector<std::string> out;
  size_t start = 0;
  while (start < text.size()) {
    size_t nl = text.find('\n', start);
    if (nl == std::string::npos) nl = text.size();
    out.push_back(text.substr(start, nl - start));
    start = nl + 1;
  }
  return out;
}

bool insert_vocabulary(sqlite3* db, const Vocabulary& v) {
  Statement st(db, "INSERT INTO vocabulary VALUES(?1,?2,?3,?4,?5,?6,?7,?8,?9,?10,?11,?12)");
  if (!st.ok()) return false;
  auto terms = [&](const char* section, const std::vector<Term>& list) {
    for (size_t i = 0; i < list.size(); ++i) {
      const Term& t = list[i];
      st.bind(1, std::string(section));
      st.bind(2, static_cast<long long>(i));
      st.bind(3, t.id);
      st.bind(4, t.label);
      st.bind(5, join_lines(t.synonyms));
      st.bind(6, join_lines(t.broader));
      st.bind(10, t.path);
      st.bind(11, static_cast<long long>(t.pos.line));
      st.bind(12, static_cast<long long>(t.pos.column));
      if (!st.run()) return false;
    }
    return true;
  };
  if (!terms("outcomes", v.outcomes) || !terms("settings", v.settings) || !terms("time_points", v.time_points)) {
    return false;
  }
  for (size_t i = 0; i < v.elements.size(); ++i) {
    const Element& e = v.elements[i];
    st.bind(1, std::string("elements"));
    st.bind(2, static_cast<long long>(i));
    st.bind(3, e.id);
    st.bind(4, e.label);
    st.bind(7, e.kind);
    st.bind(8, static_cast<long long>(e.structured));
    st.bind(9, e.loinc);
    st.bind(10, e.path);
    st.bind(11, static_cast<long long>(e.pos.line));
    st.bind(12, static_cast<long long>(e.pos.column));
    if (!st.run()) return false;
  }
  return true;
}

std::optional<Duration> duration_or_null(const std::string& text) {
  if (text.empty()) return std::nullopt;
  return parse_duration(text).value;
}

// An FTS5 query matching any word of `text`: each word quoted, joined by OR.
// At most kMaxQueryWords distinct words of at most kMaxWordBytes bytes are
// used: a pasted page of text must not make a query whose cost grows with
// its square (a 100 KB query once took a minute).
constexpr size_t kMaxQueryWords = 32;
constexpr size_t kMaxWordBytes = 64;
std::string fts_query(const std::string& text) {
  std::vector<std::string> words;
  std::string word;
  auto flush = [&] {
    if (word.size() > kMaxWordBytes) word.resize(kMaxWordBytes);
    while (!word.empty() && (static_cast<unsigned char>(word.back()) & 0xC0) == 0x80) word.pop_back();  // whole characters
    if (!word.empty() && (static_cast<unsigned char>(word.back()) & 0xC0) == 0xC0) word.pop_back();
    std::string quoted = "\"" + word + "\"";
    if (!word.empty() && words.size() < kMaxQueryWords && std::find(words.begin(), words.end(), quoted) == words.end()) {
      words.push_back(quoted);
    }
    word.clear();
  };
  for (char c : text) {
    if (std::isalnum(static_cast<unsigned char>(c)) || static_cast<unsigned char>(c) >= 0x80) word += c;
    else flush();
  }
  flush();
  return join(words, " OR ");
}

}  // namespace

namespace {

// A folder is safe for the index when it is a real folder (not a symbolic
// link), owned by this user, and writable by nobody else: otherwise another
// account could plant an index with forged entries in it.
std::string unsafe_reason(const fs::path& dir) {
  struct stat st {};
  if (lstat(dir.c_str(), &st) != 0) return "cannot be read";
  if (S_ISLNK(st.st_mode)) return "is a symbolic link";
  if (!S_ISDIR(st.st_mode)) return "is not a folder";
  if (st.st_uid != geteuid()) return "belongs to another user";
  if (st.st_mode & (S_IWGRP | S_IWOTH)) return "is writable by other users";
  return "";
}

// Creates `dir` (mode 0700 for the last component) when missing; true when it
// then exists, is safe (see unsafe_reason) and writable.
bool usable_dir(const fs::path& dir, bool private_folder, std::string* why) {
  std::error_code ec;
  if (!fs::exists(fs::symlink_status(dir, ec))) {
    fs::create_directories(dir.parent_path(), ec);
    if (mkdir(dir.c_str(), 0700) != 0 && errno != EEXIST) {
      *why = dir.string() + " cannot be created: " + std::strerror(errno);
      return false;
    }
  }
  if (private_folder) {
    if (std::string reason = unsafe_reason(dir); !reason.empty()) {
      *why = dir.string() + " " + reason;
      return false;
    }
  } else if (!fs::is_directory(dir, ec)) {
    *why = dir.string() + " is not a folder";
    return false;
  }
  if (access(dir.c_str(), W_OK | X_OK) != 0) {
    *why = dir.string() + " is not writable";
    return false;
  }
  return true;
}

// Makes a rename in `dir` durable.
void sync_dir(const fs::path& dir) {
  int fd = ::open(dir.c_str(), O_RDONLY | O_DIRECTORY);
  if (fd >= 0) {
    (void)fsync(fd);
    ::close(fd);
  }
}

// Writes `text` to `path` through a temporary file, fsync and rename.
bool write_atomically(const std::string& path, const std::string& text) {
  std::string tmp = path + ".tmp-" + std::to_string(getpid());
  int fd = ::open(tmp.c_str(), O_WRONLY | O_CREAT | O_TRUNC, 0600);
  if (fd < 0) return false;
  bool ok = ::write(fd, text.data(), text.size()) == static_cast<ssize_t>(text.size()) && fsync(fd) == 0;
  ok = (::close(fd) == 0) && ok;
  std::error_code ec;
  if (ok) fs::rename(tmp, path, ec);
  if (!ok || ec) {
    fs::remove(tmp, ec);
    return false;
  }
  sync_dir(fs::path(path).parent_path());
  return true;
}

std::string read_small_file(const std::string& path) {
  std::string text;
  if (FILE* f = std::fopen(path.c_str(), "rb")) {
    char buf[4096];
    size_t n;
    while ((n = std::fread(buf, 1, sizeof buf, f)) > 0 && text.size() < (1u << 20)) text.append(buf, n);
    std::fclose(f);
  }
  return text;
}

}  // namespace

std::string index_dir(std::string* why) {
  std::string reason;
  auto fail = [&](std::string r) {
    if (why) *why = std::move(r);
    return std::string();
  };
  // A folder the user names is used as given (but must be a writable folder).
  if (const char* d = std::getenv("READYBY_CACHE_DIR"); d && *d) {
    return usable_dir(d, false, &reason) ? std::string(d) : fail(reason);
  }
  std::vector<fs::path> candidates;
  if (const char* x = std::getenv("XDG_CACHE_HOME"); x && *x) {
    candidates.push_back(fs::path(x) / "readyby");
  } else if (const char* h = std::getenv("HOME"); h && *h) {
    candidates.push_back(fs::path(h) / ".cache" / "readyby");
  }
  for (const fs::path& dir : candidates) {
    if (usable_dir(dir, false, &reason)) return dir.string();
  }
  // Last resort, a folder in the shared temporary folder: predictable, so it
  // must be private to this user (0700, owned by us) or it is refused.
  std::error_code ec;
  fs::path tmp = fs::temp_directory_path(ec);
  if (ec) return fail("no cache folder: set READYBY_CACHE_DIR or XDG_CACHE_HOME");
  fs::path dir = tmp / ("readyby-" + std::to_string(geteuid()));
  if (usable_dir(dir, true, &reason)) return dir.string();
  return fail("refusing the cache folder " + reason + "; set READYBY_CACHE_DIR or XDG_CACHE_HOME");
}

std::string build_index(const Catalog& catalog, const std::string& hash, const std::string& path) {
  std::string tmp = path + ".tmp-" + std::to_string(getpid());
  std::error_code ec;
  fs::remove(tmp, ec);
  sqlite3* db = nullptr;
  std::string error;
  if (sqlite3_open_v2(tmp.c_str(), &db, SQLITE_OPEN_READWRITE | SQLITE_OPEN_CREATE, nullptr) != SQLITE_OK) {
    error = "cannot create " + tmp + ": " + (db ? sqlite3_errmsg(db) : "out of memory");
    sqlite3_close(db);
    return error;
  }
  bool ok = exec(db, "PRAGMA journal_mode=OFF; PRAGMA synchronous=OFF; BEGIN;", &error) && exec(db, kSchema, &error);
  if (ok) {
    Inserter inserter(db);
    ok = inserter.ok();
    for (size_t i = 0; ok && i < catalog.entries.size(); ++i) {
      ok = inserter.insert(catalog.entries[i], static_cast<long long>(i) + 1, catalog.vocabulary);
    }
    if (!ok) error = sqlite3_errmsg(db);
  }
  if (ok && !insert_vocabulary(db, catalog.vocabulary)) error = sqlite3_errmsg(db), ok = false;
  if (ok) {
    Statement meta(db, "INSERT INTO meta VALUES(?1, ?2)");
    meta.bind(1, std::string("hash"));
    meta.bind(2, hash);
    ok = meta.run();
    meta.bind(1, std::string("schema"));
    meta.bind(2, std::string(kSchemaVersion));
    ok = ok && meta.run();
    if (!ok) error = meta.error();
  }
  ok = ok && exec(db, "COMMIT;", &error);
  if (sqlite3_close(db) != SQLITE_OK && ok) {
    ok = false;
    error = "cannot close " + tmp;
  }
  if (ok) {
    // Make the data durable before the rename publishes it, and the rename
    // durable before anyone relies on it.
    int fd = ::open(tmp.c_str(), O_RDONLY);
    if (fd >= 0) {
      (void)fsync(fd);
      ::close(fd);
    }
    fs::rename(tmp, path, ec);
    if (ec) {
      ok = false;
      error = "cannot rename " + tmp + " to " + path + ": " + ec.message();
    } else {
      sync_dir(fs::path(path).parent_path());
    }
  } else {
    error = "cannot build the catalogue index " + path + ": " + error;
  }
  if (!ok) fs::remove(tmp, ec);
  return ok ? "" : error;
}

IndexOpen CatalogIndex::open(const RegistryFiles& listed, const std::string& dir, Diagnostics* diags) {
  IndexOpen out;
  // One index file per set of registry folders; the content hash inside says what it was built from.
  RegistryFiles key;
  for (const std::string& r : listed.registries) {
    std::error_code ec;
    fs::path abs = fs::weakly_canonical(fs::absolute(r), ec);
    key.registries.push_back(ec ? r : abs.string());
  }
  std::string path = (fs::path(dir) / ("catalog-" + content_hash(key) + ".sqlite")).string();
  // The stat key (sizes and times of the YAML files, with the content hash
  // they were verified to have) lives beside the index, never inside it: a
  // published index is never written to again, so readers never meet a lock
  // held by a writer.
  const std::string stat_path = path + ".stat";
  std::unique_ptr<CatalogIndex> index(new CatalogIndex());
  index->file_ = path;
  const std::string stat_key = stat_signature(listed);
  // Opens the published index read-only and accepts it when it holds
  // `expected` (a content hash). Sets `failure` on an SQLite error other
  // than "missing or not an index", which must not be mistaken for "stale".
  std::string failure;
  auto open_existing = [&](const std::string& expected) {
    if (index->db_) sqlite3_close(index->db_);
    index->db_ = nullptr;
    std::error_code ec;
    if (!fs::exists(path, ec)) return false;
    if (sqlite3_open_v2(path.c_str(), &index->db_, SQLITE_OPEN_READONLY, nullptr) != SQLITE_OK) return false;
    sqlite3_busy_timeout(index->db_, kBusyTimeoutMs);
    Statement st(index->db_, "SELECT (SELECT value FROM meta WHERE key='hash'), (SELECT value FROM meta WHERE key='schema'),"
                             " (SELECT count(*) FROM entries)");
    if (!st.step()) {
      int code = sqlite3_errcode(index->db_);
      if (code == SQLITE_BUSY || code == SQLITE_LOCKED || code == SQLITE_IOERR || code == SQLITE_NOMEM) {
        failure = "cannot read the catalogue index " + path + ": " + st.error();
      }
      return false;
    }
    if (st.text(1) != kSchemaVersion || st.text(0) != expected) return false;
    index->hash_ = st.text(0);
    index->size_ = static_cast<size_t>(st.integer(2).value_or(0));
    return true;
  };
  auto remember_stat_key = [&](const std::string& hash) {
    // Best effort: without it the next open reads the YAML again.
    (void)write_atomically(stat_path, std::string(kSchemaVersion) + "\n" + hash + "\n" + stat_key + "\n");
  };
  {
    std::string remembered = read_small_file(stat_path);
    std::string prefix = std::string(kSchemaVersion) + "\n";
    size_t nl = remembered.find('\n', prefix.size());
    if (remembered.rfind(prefix, 0) == 0 && nl != std::string::npos &&
        remembered.compare(nl + 1, std::string::npos, stat_key + "\n") == 0 &&
        open_existing(remembered.substr(prefix.size(), nl - prefix.size()))) {
      out.index = std::move(index);
      return out;
    }
  }
  if (!failure.empty()) {
    out.error = failure;
    return out;
  }
  RegistryFiles files = listed;
  if (!read_texts(&files, diags)) return out;
  const std::string hash = content_hash(files);
  if (open_existing(hash)) {
    remember_stat_key(hash);
    out.index = std::move(index);
    return out;
  }
  if (!failure.empty()) {
    out.error = failure;
    return out;
  }
  Catalog catalog;
  if (!load_catalog(files, &catalog, diags)) return out;
  out.error = build_index(catalog, hash, path);
  if (!out.error.empty()) return out;
  remember_stat_key(hash);
  if (!open_existing(hash)) {
    // Another process may have published an index of newer YAML in between:
    // a different hash is not ours to accept, so say so rather than guess.
    out.error = failure.empty() ? "cannot open the catalogue index " + path +
                                      (index->db_ ? std::string(": ") + sqlite3_errmsg(index->db_) : std::string())
                                : failure;
    return out;
  }
  index->rebuilt_ = true;
  out.index = std::move(index);
  return out;
}

CatalogIndex::~CatalogIndex() { sqlite3_close(db_); }

std::vector<SearchHit> CatalogIndex::search(const SearchQuery& q, std::string* error) const {
  std::vector<SearchHit> out;
  std::string match = fts_query(q.text);
  if (match.empty()) return out;
  std::string sql = std::string("SELECT e.id, e.name, e.kind, e.outcome, e.settings, ") + kRank +
                    " AS rank FROM entry_text JOIN entries e ON e.rowid = entry_text.rowid WHERE entry_text MATCH ?1";
  if (!q.setting.empty()) sql += " AND e.rowid IN (SELECT entry FROM entry_settings WHERE setting = ?2)";
  if (!q.outcomes.empty()) {
    sql += " AND e.outcome IN (";
    for (size_t i = 0; i < q.outcomes.size(); ++i) sql += (i ? ",?" : "?") + std::to_string(i + 3);
    sql += ")";
  }
  sql += " ORDER BY rank, e.id LIMIT " + std::to_string(q.limit);
  Statement st(db_, sql);
  if (!st.ok()) {
    *error = st.error();
    return out;
  }
  st.bind(1, match);
  if (!q.setting.empty()) st.bind(2, q.setting);
  for (size_t i = 0; i < q.outcomes.size(); ++i) st.bind(static_cast<int>(i) + 3, q.outcomes[i]);
  while (st.step()) {
    // bm25() is lower for better matches; report its negation so higher is better.
    out.push_back({st.text(0), st.text(1), st.text(2), st.text(3), split_words(st.text(4)), -st.real(5)});
  }
  if (!st.ok()) {
    *error = st.error();
    out.clear();
  }
  return out;
}

std::vector<Entry> CatalogIndex::query_entries(const std::string& where, const std::vector<std::string>& binds,
                                                std::string* error) const {
  std::vector<Entry> out;
  Statement st(db_, "SELECT rowid, id, layer, path, name, kind, summary, outcome, outcome_detail, horizon, age_min, "
                    "age_max, condition, time_point, settings, score_min, score_max, provenance, owner, go_live, "
                    "status, pub_authors, pub_year, pub_title, pub_journal, pub_doi FROM entries " + where +
                    " ORDER BY id");
  // Inputs and performance of the selected entries only.
  std::string selected = where.empty() ? "" : " WHERE entry IN (SELECT rowid FROM entries " + where + ")";
  Statement in(db_, "SELECT entry, element, label, points, when_text, recency FROM inputs" + selected +
                        " ORDER BY entry, seq");
  Statement perf(db_, "SELECT entry, metric, value, cohort FROM performance" + selected + " ORDER BY entry, seq");
  if (!st.ok() || !in.ok() || !perf.ok()) {
    *error = !st.ok() ? st.error() : !in.ok() ? in.error() : perf.error();
    return out;
  }
  for (size_t i = 0; i < binds.size(); ++i) {
    st.bind(static_cast<int>(i) + 1, binds[i]);
    in.bind(static_cast<int>(i) + 1, binds[i]);
    perf.bind(static_cast<int>(i) + 1, binds[i]);
  }
  std::map<long, size_t> by_rowid;
  while (st.step()) {
    Entry e;
    long rowid = st.integer(0).value_or(0);
    e.id = st.text(1);
    e.layer = static_cast<int>(st.integer(2).value_or(0));
    e.path = st.text(3);
    e.name = st.text(4);
    e.kind = st.text(5);
    e.summary = st.text(6);
    e.outcome = st.text(7);
    e.outcome_detail = st.text(8);
    std::string horizon = st.text(9);
    if (horizon == "in-hospital") e.horizon = Horizon{true, {}};
    else if (auto d = duration_or_null(horizon)) e.horizon = Horizon{false, *d};
    e.age_min = st.integer(10);
    e.age_max = st.integer(11);
    e.condition = st.text(12);
    e.time_point = st.text(13);
    e.settings = split_words(st.text(14));
    if (st.integer(15) && st.integer(16)) e.score_range = std::make_pair(*st.integer(15), *st.integer(16));
    e.provenance = st.text(17);
    e.owner = st.text(18);
    e.go_live = st.text(19);
    e.status = st.text(20);
    if (st.integer(22)) {
      e.publication = Publication{st.text(21), static_cast<int>(*st.integer(22)), st.text(23), st.text(24), st.text(25)};
    }
    by_rowid[rowid] = out.size();
    out.push_back(std::move(e));
  }
  while (in.step()) {
    auto it = by_rowid.find(in.integer(0).value_or(0));
    if (it == by_rowid.end()) continue;
    out[it->second].inputs.push_back({in.text(1), in.text(2), in.integer(3), in.text(4), duration_or_null(in.text(5))});
  }
  while (perf.step()) {
    auto it = by_rowid.find(perf.integer(0).value_or(0));
    if (it == by_rowid.end()) continue;
    out[it->second].performance.push_back({perf.text(1), perf.real(2), perf.text(3)});
  }
  if (!st.ok() || !in.ok() || !perf.ok()) {
    *error = !st.ok() ? st.error() : !in.ok() ? in.error() : perf.error();
    out.clear();
  }
  return out;
}

bool CatalogIndex::vocabulary(Vocabulary* out, std::string* error) const {
  Statement st(db_, "SELECT section, id, label, synonyms, broader, kind, structured, loinc, path, line, col "
                    "FROM vocabulary ORDER BY section, seq");
  if (!st.ok()) {
    *error = st.error();
    return false;
  }
  *out = Vocabulary();
  while (st.step()) {
    std::string section = st.text(0);
    SourcePos pos{static_cast<int>(st.integer(9).value_or(0)), static_cast<int>(st.integer(10).value_or(0))};
    if (section == "elements") {
      out->elements.push_back({st.text(1), st.text(2), st.text(5), st.integer(6).value_or(0) != 0, st.text(7), st.text(8), pos});
      continue;
    }
    Term t{st.text(1), st.text(2), split_lines(st.text(3)), split_lines(st.text(4)), st.text(8), pos};
    if (section == "outcomes") out->outcomes.push_back(std::move(t));
    else if (section == "settings") out->settings.push_back(std::move(t));
    else out->time_points.push_back(std::move(t));
  }
  if (!st.ok()) {
    *error = st.error();
    *out = Vocabulary();
    return false;
  }
  out->reindex();
  return true;
}

std::vector<Entry> CatalogIndex::entries(std::string* error) const { return query_entries("", {}, error); }

std::vector<Entry> CatalogIndex::entries_with_outcomes(const std::vector<std::string>& outcomes,
                                                       std::string* error) const {
  if (outcomes.empty()) return {};
  std::string where = "WHERE outcome IN (";
  for (size_t i = 0; i < outcomes.size(); ++i) where += (i ? ", ?" : "?") + std::to_string(i + 1);
  return query_entries(where + ")", outcomes, error);
}

std::optional<Entry> CatalogIndex::entry(const std::string& id, std::string* error) const {
  std::vector<Entry> found = query_entries("WHERE id = ?1", {id}, error);
  if (found.empty()) return std::nullopt;
  return std::move(found.front());
}

}  // namespace readyby
