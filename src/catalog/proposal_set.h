#pragma once
// The labelled proposal set: fictional proposals, each with the established
// scores a clinician would expect a screening to find and the recommendation
// expected of `reuse` (pipelines/proposal-set/, described in docs/reuse.md).
// Evaluating it screens every proposal exactly as `readyby reuse` does
// (retrieval, then matching) and scores the result:
//
//   top-3 recall   over all proposals, the expected scores the catalogue
//                  holds that appear among the first three candidates,
//                  divided by the sum over proposals of min(3, expected scores
//                  the catalogue holds); expected scores the catalogue does
//                  not hold are not counted, so the figure stays meaningful as
//                  the catalogue grows
//   recommendation the share of scored proposals whose recommendation is the
//                  expected one; a proposal expecting `build` is always
//                  scored, one expecting `reuse` or `adapt` only when the
//                  catalogue holds at least one of its expected scores
//
// The test suite holds the figures to recall >= 0.95 and recommendation
// >= 0.90; bench/proposal_set_bench.cpp prints them.

#include <string>
#include <vector>

#include "catalog/index.h"
#include "catalog/vocabulary.h"
#include "util/diagnostics.h"

namespace readyby {

struct LabelledProposal {
  std::string id;                      // the proposal: <folder>/<id>.proposal.yaml
  std::vector<std::string> expected;   // expected score ids, most expected first (may be empty)
  std::string recommendation;          // reuse | adapt | build
  std::string source;                  // where the expectation comes from
};

/// Loads `<folder>/expected.yaml`: a map with `proposals`, a list of
/// {proposal, expect, recommendation, source}; every key required, ids
/// unique, and each proposal's file present. Returns false with every
/// problem in `diags`.
bool load_proposal_set(const std::string& folder, std::vector<LabelledProposal>* out, Diagnostics* diags);

struct ProposalScore {
  std::string id;
  std::vector<std::string> expected_held;   // expected scores the catalogue holds, in expected order
  std::vector<std::string> top3;            // the first three candidates
  size_t found = 0;                         // expected_held among top3
  size_t wanted = 0;                        // min(3, expected_held.size())
  std::string expected_recommendation;
  std::string recommendation;
  bool recommendation_scored = false;
  bool recommendation_ok = false;
};

struct ProposalSetFigures {
  std::vector<ProposalScore> proposals;
  size_t found = 0, wanted = 0;                 // summed over proposals
  size_t recommendations_scored = 0, recommendations_ok = 0;
  /// found / wanted (1 when nothing is wanted).
  double recall() const;
  /// recommendations_ok / recommendations_scored (1 when none is scored).
  double recommendation_accuracy() const;
};

/// Screens every proposal of `set` (files in `folder`) against the catalogue
/// behind `index` and scores them. Proposal errors go to `diags`, index
/// errors to `error`; returns false on either.
bool evaluate_proposal_set(const std::string& folder, const std::vector<LabelledProposal>& set,
                           const CatalogIndex& index, const Vocabulary& vocabulary, ProposalSetFigures* out,
                           Diagnostics* diags, std::string* error);

}  // namespace readyby
