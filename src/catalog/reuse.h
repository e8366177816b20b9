#pragma once
// Matching a proposal against the catalogue: has an established score (or an
// in-house model) already covered it? Pure computation: no I/O. docs/reuse.md
// explains the semantics for users; this header is the contract.
//
// Candidates. An entry is judged when its outcome concept relates to one of
// the proposal's outcome concepts (same, narrower, broader, overlapping or
// sharing a broader concept), when retrieval found the proposal's condition
// in its population (RetrievalSignals::condition_hits), or when its text
// covers at least kTextCandidate of the proposal's words
// (RetrievalSignals::text).
//
// Criteria, each with a level — 2 met, 1 partly met, 0 not met. A criterion
// the proposal leaves unstated is "not stated" and met (2): it never
// downgrades. A score narrower than the proposal on a stated criterion is
// partly met (1).
//
//   outcome     same (2) | narrower (1: the score predicts only a kind or
//               a component of the proposed outcome) | broader (1: the
//               score's outcome also counts other events) | overlapping (1:
//               both include a narrower concept) | differs (0: they only
//               share a broader concept, or are unrelated)
//   setting     all | not-stated (2) | some (1: the score is used in only
//               some of the proposal's settings) | none (0)
//   population  the lower of age and condition:
//               age: within | not-stated (2) | partly (1: the score covers
//               only part of the proposal's ages) | excludes (0); ages come
//               from age_min/age_max, else from the condition ("adults" 18+,
//               "children" under 18); a score that states no ages is met
//               condition: matches | general | not-stated (2) | narrower (1:
//               the score was developed for a narrower population, by
//               concept — "community-acquired pneumonia" within "pneumonia"
//               — or because the proposal names a general population) |
//               differs (0). Conditions are compared by the outcome
//               vocabulary's concepts when both name one (concepts that
//               share only a broader concept, or none, differ), else by
//               their specific words (not care contexts such as "adult
//               medical inpatients"), at least two thirds of the smaller
//               side's words shared; exclusions ("without ...") are ignored
//   time point  same | not-stated (2) | differs (1)
//   horizon     same | close (2: durations within a factor 1.5) |
//               not-stated (2) | unknown (2: the catalogue states none for
//               the score) | differs (1: within a factor 4, or in-hospital
//               against a duration) | far (0)
//
// Coverage: `covers` when every criterion is met; `partly` when every
// criterion is at least partly met; `related` when some criterion is not met.
//
// Relevance (0-1), one number from the retrieval signals and the fit:
//   0.35 × outcome relation (same 1, narrower 0.8, broader 0.6, overlapping
//          0.5, shared broader concept 0.2, unrelated 0)
// + 0.30 × condition (matches 1, general 0.6, narrower 0.5, differs 0;
//          0.5 when the proposal states none)
// + 0.15 × text coverage (RetrievalSignals::text, 0 when absent)
// + 0.20 × fit (the criteria's levels summed, divided by 10)
//
// Evidence: provenance checked, a performance figure from a validation
// cohort, and the best c-statistic the catalogue records (validation, else
// derivation).
//
// Ranking, a total order: coverage (covers, partly, related); in-house
// models first within a coverage level (the organisation already runs them);
// then, for entries that cover or partly cover, evidence (checked before
// from-memory, validated before not, higher c-statistic before lower or
// none); then relevance; then the more recent publication (a newer version
// usually supersedes an older one); then id. Entries that only relate cannot be reused,
// so evidence does not order them: how specifically their population is the
// proposal's does (same condition, narrower, general or not stated, differs
// or ages excluded), then relevance, then id.
// The number of inputs plays no part.
//
// Recommendation: `reuse` when some candidate covers, `adapt` when some
// partly covers, else `build` — whose summary says what was searched and
// whether the vocabulary recognised the outcome, and that the literature
// comes before building.

#include <map>
#include <optional>
#include <set>
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

/// An entry whose text covers at least this share of the proposal's words is
/// a candidate even when its outcome concept does not relate.
constexpr double kTextCandidate = 0.5;
/// An entry whose population text covers at least this share of the
/// proposal's condition (its specific words and concept phrases) is a condition hit.
constexpr double kConditionHit = 0.5;

struct Criterion {
  std::string name;     // outcome | setting | population | time_point | horizon
  std::string result;   // see the table above
  std::string detail;   // a sentence for people
  int level = 0;        // 2 met, 1 partly, 0 not met
};

/// What the catalogue records about how well an entry is established.
struct Evidence {
  bool checked = false;                 // provenance: checked against the primary publication
  bool validated = false;               // some performance figure comes from a validation cohort
  std::optional<double> c_statistic;    // the best validation c-statistic, else the best derivation one
  std::string c_cohort;                 // derivation | validation; empty without a c-statistic
  /// "checked against its publication; validated; c-statistic 0.82 (validation)".
  std::string str() const;
  /// For tables: "checked, validated, c 0.82" or "from memory".
  std::string brief() const;
};

/// Evidence of an entry, as defined above.
Evidence evidence_of(const Entry& e);

struct Candidate {
  const Entry* entry = nullptr;   // points into the entries given to match_proposal
  Coverage coverage = Coverage::related;
  int rank = 0;                   // 1-based
  bool in_house = false;          // a local model (kind: local)
  std::vector<Criterion> criteria;
  ConceptRelation relation = ConceptRelation::unrelated;   // of the entry's outcome to the proposal's
  double relevance = 0;           // 0-1, see above
  Evidence evidence;
  int condition_rank = 0;         // how specifically the population is the proposal's: 3 same condition,
                                  // 2 narrower, 1 general or not stated, 0 differs or ages excluded
};

/// What retrieval (catalog/retrieval.h) found besides the outcome concepts.
struct RetrievalSignals {
  std::map<std::string, double> text;       // entry id -> full-text coverage of the proposal's words (0-1)
  std::set<std::string> condition_hits;     // entry ids whose population names the proposal's condition
};

struct ReuseReport {
  std::string outcome;                  // the proposal's outcome, as written
  OutcomeResolution resolution;         // the proposal's outcome text, resolved
  OutcomeResolution condition;          // the proposal's condition; empty when none is stated
  size_t searched = 0;                  // entries in the catalogue
  Recommendation recommendation = Recommendation::build;
  std::vector<Candidate> candidates;    // ranked
  std::vector<std::string> in_house;    // ids of in-house models that cover, ranked
  std::string summary;                  // one sentence stating the recommendation and why
};

/// Judges the entries of `entries` that are candidates (see above) against
/// `proposal`, resolving its outcome and condition with `resolver` (built on
/// `vocabulary`). `searched`: how many entries the catalogue holds, when
/// `entries` is only the part retrieval returned (default: entries.size()).
ReuseReport match_proposal(const Proposal& proposal, const OutcomeResolver& resolver, const Vocabulary& vocabulary,
                           const std::vector<Entry>& entries, const RetrievalSignals& signals = {},
                           std::optional<size_t> searched = std::nullopt);

/// A condition up to its first exclusion word ("excluding", "except",
/// "without", "no", "not"): "adults without cardiovascular disease" -> "adults ".
std::string condition_before_exclusion(const std::string& condition);

/// The words of a condition that name something clinical: lower case,
/// plurals reduced, care contexts and age groups ("adult medical inpatients")
/// left out, and nothing from its first exclusion word on.
std::set<std::string> specific_condition_words(const std::string& condition);

/// The cautions every catalogue report carries (DESIGN.md §8).
const std::vector<std::string>& catalogue_cautions();

}  // namespace readyby
