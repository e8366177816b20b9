#pragma once
// Candidate retrieval for `reuse` and `intake`: which catalogue entries may
// answer a proposal, read from the index without loading the whole catalogue.
// Three sources, their union is returned (match_proposal in reuse.h decides
// which are candidates and how relevant each is):
//
//   outcome    every entry whose outcome concept relates to one of the
//              proposal's (same, narrower, broader, overlapping or sharing a
//              broader concept);
//   condition  entries whose population text names the proposal's condition
//              (FTS5 on the population column, which also holds the concepts
//              an entry's condition names): any label or synonym of a concept
//              the condition resolves to, or of a narrower one; or at least
//              kConditionHit of the condition's specific words;
//   text       the best kTextHits entries by full-text relevance (FTS5, BM25
//              and coverage; catalog/index.h) of the outcome and condition
//              words over every text column.

#include <string>
#include <vector>

#include "catalog/index.h"
#include "catalog/outcome_resolver.h"
#include "catalog/proposal.h"
#include "catalog/reuse.h"

namespace readyby {

/// How many full-text hits retrieval keeps.
constexpr size_t kTextHits = 50;
/// How many hits each condition query keeps.
constexpr size_t kConditionHits = 200;

struct Retrieved {
  std::vector<Entry> entries;     // sorted by id, each once
  RetrievalSignals signals;
};

/// Retrieves the entries that may answer `proposal`. On an index error,
/// `error` is set and the result is empty.
Retrieved retrieve_candidates(const CatalogIndex& index, const Proposal& proposal, const OutcomeResolver& resolver,
                              const Vocabulary& vocabulary, std::string* error);

}  // namespace readyby
