#pragma once
// The catalogue's SQLite index, with FTS5 full-text search.
//
// The YAML is the source of truth; the index is a cache built from it. It
// lives in the cache folder (index_dir()), one file per set of registry
// folders, and records the content hash (catalog.h content_hash) of the YAML
// it was built from. open_index() rebuilds it whenever that hash changes. A
// rebuild writes a temporary file beside the index, fsyncs it, renames it over
// the old one and fsyncs the folder, so a reader sees either the old index or
// the new one, never a half-built file. A published index is never written
// again (the size-and-time key that spares re-reading unchanged YAML lives in
// a file beside it), so readers never wait on a writer; they still have a
// busy timeout. Every SQLite return code is checked: a failure (a lock held
// too long included) is an error with a message, never an empty result.

#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "catalog/catalog.h"
#include "util/diagnostics.h"

struct sqlite3;

namespace readyby {

/// The cache folder: $READYBY_CACHE_DIR (used as given), else
/// $XDG_CACHE_HOME/readyby, else $HOME/.cache/readyby; when that cannot be
/// created or written, a `readyby-<uid>` folder in the system temp folder,
/// created with mode 0700 and refused (never used) when it is a symbolic
/// link, belongs to another user or is writable by group or others — a
/// predictable shared path must not let another account plant an index.
/// Empty when no folder is usable, with the reason in `why` (if given).
std::string index_dir(std::string* why = nullptr);

struct SearchQuery {
  std::string text;                   // words; an entry matches if it has any of them (BM25 ranks)
  std::string setting;                // a setting id; empty: any
  std::vector<std::string> outcomes;  // concept ids; empty: any
  size_t limit = 20;
};

struct SearchHit {
  std::string id;
  std::string name;
  std::string kind;
  std::string outcome;
  std::vector<std::string> settings;
  double score = 0;                   // BM25 relevance, higher is better
};

class CatalogIndex;

struct IndexOpen {
  std::unique_ptr<CatalogIndex> index;   // null on failure
  std::string error;                     // a storage problem (catalogue errors go to the diagnostics)
};

class CatalogIndex {
 public:
  /// Opens the index of `files` in folder `dir`, rebuilding it when missing,
  /// unreadable or built from other content. A rebuild loads and validates
  /// the whole catalogue; catalogue errors go to `diags` and no index is written.
  static IndexOpen open(const RegistryFiles& files, const std::string& dir, Diagnostics* diags);

  ~CatalogIndex();
  CatalogIndex(const CatalogIndex&) = delete;
  CatalogIndex& operator=(const CatalogIndex&) = delete;

  const std::string& file() const { return file_; }
  const std::string& hash() const { return hash_; }
  /// True when this open rebuilt the index from the YAML.
  bool rebuilt() const { return rebuilt_; }
  size_t size() const { return size_; }

  /// Entries matching `q`, best first (BM25; ties by id). Empty when the
  /// query has no words. On an SQLite error, `error` is set and the result is empty.
  std::vector<SearchHit> search(const SearchQuery& q, std::string* error) const;
  /// The vocabulary the index was built with (the YAML's, without re-parsing
  /// it). False, with `error` set, on an SQLite error.
  bool vocabulary(Vocabulary* out, std::string* error) const;
  /// Every entry, sorted by id, with inputs, performance and publication.
  std::vector<Entry> entries(std::string* error) const;
  /// The entries whose outcome concept is one of `outcomes`, sorted by id
  /// (how `reuse` avoids loading the whole catalogue).
  std::vector<Entry> entries_with_outcomes(const std::vector<std::string>& outcomes, std::string* error) const;
  /// One entry; nullopt when no entry has this id.
  std::optional<Entry> entry(const std::string& id, std::string* error) const;

 private:
  CatalogIndex() = default;
  std::vector<Entry> query_entries(const std::string& where, const std::vector<std::string>& binds,
                                   std::string* error) const;
  sqlite3* db_ = nullptr;
  std::string file_, hash_;
  bool rebuilt_ = false;
  size_t size_ = 0;
};

/// Writes the index of `catalog` to `path` (via a temporary file and an
/// atomic rename), recording `hash`. Returns "" or an error message.
std::string build_index(const Catalog& catalog, const std::string& hash, const std::string& path);

}  // namespace readyby
