#pragma once
// An FTS5 auxiliary function for the catalogue index: how much of a query an
// entry's text matches — the share of the query's phrases the entry contains,
// each phrase weighted by its inverse document frequency as BM25 weighs it,
// idf = ln(1 + (N - n + 0.5) / (n + 0.5)) for N entries of which n contain the
// phrase (Robertson and Spärck Jones; the form SQLite's own bm25() uses).
//
// 1 means every phrase of the query occurs in the entry, 0 none. A phrase
// that no entry contains weighs the most, so a query made mostly of words the
// catalogue does not know ("C. diff") scores low for every entry, whatever
// its BM25 rank. Used as `readyby_coverage(entry_text)` in a MATCH query.

#include <string>

struct sqlite3;

namespace readyby {

/// Registers readyby_coverage() on `db`. False, with `error` set, when the
/// SQLite library has no FTS5.
bool register_fts_coverage(sqlite3* db, std::string* error);

}  // namespace readyby
