#include "catalog/fts_coverage.h"

#include <sqlite3.h>

#include <cmath>
#include <vector>

namespace readyby {

namespace {

// The fts5_api of `db` (SQLite documentation, "Extending FTS5": SELECT fts5(?1)
// with a pointer binding); nullptr without FTS5.
fts5_api* fts5_api_of(sqlite3* db) {
  fts5_api* api = nullptr;
  sqlite3_stmt* stmt = nullptr;
  if (sqlite3_prepare_v2(db, "SELECT fts5(?1)", -1, &stmt, nullptr) == SQLITE_OK) {
    sqlite3_bind_pointer(stmt, 1, static_cast<void*>(&api), "fts5_api_ptr", nullptr);
    sqlite3_step(stmt);
  }
  sqlite3_finalize(stmt);
  return api;
}

int count_row(const Fts5ExtensionApi*, Fts5Context*, void* count) {
  ++*static_cast<sqlite3_int64*>(count);
  return SQLITE_OK;
}

void delete_weights(void* p) { delete static_cast<std::vector<double>*>(p); }

// The phrases' IDF weights, computed once per query and kept as auxiliary data.
const std::vector<double>* weights(const Fts5ExtensionApi* api, Fts5Context* fts, int* rc) {
  if (auto* cached = static_cast<std::vector<double>*>(api->xGetAuxdata(fts, 0))) return cached;
  sqlite3_int64 rows = 0;
  *rc = api->xRowCount(fts, &rows);
  auto* out = new std::vector<double>();
  for (int i = 0; *rc == SQLITE_OK && i < api->xPhraseCount(fts); ++i) {
    sqlite3_int64 containing = 0;
    *rc = api->xQueryPhrase(fts, i, &containing, count_row);
    double n = static_cast<double>(containing), total = static_cast<double>(rows);
    out->push_back(std::log(1.0 + (total - n + 0.5) / (n + 0.5)));
  }
  if (*rc != SQLITE_OK) {
    delete out;
    return nullptr;
  }
  *rc = api->xSetAuxdata(fts, out, delete_weights);   // frees `out` itself on failure
  return *rc == SQLITE_OK ? out : nullptr;
}

void coverage(const Fts5ExtensionApi* api, Fts5Context* fts, sqlite3_context* ctx, int, sqlite3_value**) {
  int rc = SQLITE_OK;
  const std::vector<double>* w = weights(api, fts, &rc);
  if (!w) {
    sqlite3_result_error_code(ctx, rc == SQLITE_OK ? SQLITE_NOMEM : rc);
    return;
  }
  double all = 0, found = 0;
  for (int i = 0; i < static_cast<int>(w->size()); ++i) {
    Fts5PhraseIter iter;
    int column = -1, offset = -1;
    rc = api->xPhraseFirst(fts, i, &iter, &column, &offset);
    if (rc != SQLITE_OK) {
      sqlite3_result_error_code(ctx, rc);
      return;
    }
    all += (*w)[static_cast<size_t>(i)];
    if (column >= 0) found += (*w)[static_cast<size_t>(i)];
  }
  sqlite3_result_double(ctx, all > 0 ? found / all : 0.0);
}

}  // namespace

bool register_fts_coverage(sqlite3* db, std::string* error) {
  fts5_api* api = fts5_api_of(db);
  if (!api) {
    *error = "the SQLite library has no FTS5";
    return false;
  }
  if (api->xCreateFunction(api, "readyby_coverage", nullptr, coverage, nullptr) != SQLITE_OK) {
    *error = "cannot register readyby_coverage()";
    return false;
  }
  return true;
}

}  // namespace readyby
