#pragma once
// Matching a proposal against the catalogue: has an established score (or an
// in-house model) already covered it? Pure computation: no I/O.
//
// Every entry whose outcome concept relates to one of the proposal's concepts
// (same, narrower, broader, or sharing a broader concept) is a candidate,
// judged criterion by criterion. Each criterion has a level — 2 met, 1 partly
// met, 0 not met:
//
//   outcome     same (2) | narrower (2: the score predicts a kind of the
//               proposed outcome) | broader (1) | differs (0: they only share
//               a broader concept)
//   setting     all | any (2: the proposal names none) | some (1) | none (0)
//   population  matches (2) | partly (1) | excludes (0) — age ranges (an
//               entry's condition saying "adults" implies 18+, "children" and
//               the like imply under 18) and condition (shared specific words;
//               a condition naming only a care context such as "adult medical
//               and surgical patients" is general and covers any condition)
//   time point  same | any (2) | differs (1)
//   horizon     same | close (2: durations within a factor 1.5) | differs
//               (1: within a factor 4, or in-hospital against a duration, or
//               not stated by the entry) | far (0) | any (2: the proposal
//               states none)
//
// Coverage: `covers` when every criterion is met; `partly` when outcome and
// population are at least partly met; `related` otherwise. Candidates are
// ranked by coverage, in-house models first within a coverage level, then
// outcome relation, total level, horizon closeness, and id — a total order,
// so the ranking is deterministic. The recommendation is `reuse` when some
// candidate covers, `adapt` when some partly covers, else `build`.

#include <optional>
#include <string>
#include <vector>

#include "catalog/catalog.h"
#include "catalog/outcome_resolver.h"
#include "catalog/proposal.h"
#include "catalog/vocabulary.h"

namespace readyby {

enum class Coverage { covers, partly, related };
enum class Recommendation { reuse, adapt, build };

const char* to_string(Coverage c);
const char* to_string(Recommendation r);

struct Criterion {
  std::string name;     // outcome | setting | population | time_point | horizon
  std::string result;   // see the table above
  std::string detail;   // a sentence for people
  int level = 0;        // 2 met, 1 partly, 0 not met
};

struct Candidate {
  const Entry* entry = nullptr;   // points into the entries given to match_proposal
  Coverage coverage = Coverage::related;
  int rank = 0;                   // 1-based
  bool in_house = false;          // a local model (kind: local)
  std::vector<Criterion> criteria;
};

struct ReuseReport {
  OutcomeResolution resolution;
  size_t searched = 0;                  // entries considered
  Recommendation recommendation = Recommendation::build;
  std::vector<Candidate> candidates;    // ranked
  std::vector<std::string> in_house;    // ids of in-house models that cover, ranked
  std::string summary;                  // one sentence stating the recommendation and why
};

/// Judges every entry of `entries` against `proposal`, whose outcome text
/// resolved to `resolution`.
/// `searched`: how many entries the catalogue holds, when `entries` is only
/// the part of it that can relate to the proposal (default: entries.size()).
ReuseReport match_proposal(const Proposal& proposal, const OutcomeResolution& resolution,
                           const Vocabulary& vocabulary, const std::vector<Entry>& entries,
                           std::optional<size_t> searched = std::nullopt);

/// The cautions every catalogue report carries (DESIGN.md §8).
const std::vector<std::string>& catalogue_cautions();

}  // namespace readyby
