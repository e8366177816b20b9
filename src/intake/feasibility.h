#pragma once
// Can an established score run on this data plan? For each catalogue entry
// that covers or partly covers a proposal, every input (a data element, with
// the recency the entry asks of it) is mapped to a plan feature that lists
// the element in its `elements`, and checked at each run of the proposal's
// model: is the data fresh enough by the run? Pure computation: no I/O.
//
// Per input, for a run r:
//   allowed age         = the entry's `recency` for the element, else the
//                         feature's `max_age` (the plan's own freshness rule)
//   needs_data_through  = r - allowed age
//   ready               = E_feature(needs_data_through) (DESIGN §4)
//   fresh               = ready <= r (never-ready counts as not fresh)
//
// An entry lists an element once per scored band (LACE scores length of stay
// in six bands); such inputs are one element here, with the strictest
// recency stated for any of its bands.
//
// Which feature: every feature of the plan whose `elements` list the element
// is tried; the one fresh at the most runs wins, then one of the model's own
// features, then plan order.
//
// Input status, first that applies:
//   unstructured  the vocabulary says the element is usually not a structured
//                 field in an electronic record (flagged even when a feature
//                 provides it: the feature's quality needs a look)
//   missing       no feature of the plan provides the element
//   late          some run finds the feature's data not fresh enough
//   on-time       fresh at every run
// Candidate: `on-time` when every input is on-time, `no` when no input has a
// feature, `gaps` otherwise.

#include <optional>
#include <string>
#include <vector>

#include "catalog/catalog.h"
#include "catalog/reuse.h"
#include "catalog/vocabulary.h"
#include "plan/plan.h"
#include "time/instant.h"

namespace readyby {

enum class InputStatus { on_time, late, missing, unstructured };
enum class Computable { on_time, gaps, no };
/// "on-time" | "late" | "missing" | "unstructured".
const char* to_string(InputStatus s);
/// "on-time" | "gaps" | "no".
const char* to_string(Computable c);

/// One input of an entry, checked against the plan.
struct InputCheck {
  std::string element;               // element id
  std::string label;                 // the vocabulary's label (the id when the vocabulary lacks it)
  std::optional<Duration> recency;   // strictest recency the entry states; nullopt: none stated
  bool structured = true;            // the vocabulary's `structured` (true when it lacks the element)
  int feature = -1;                  // providing feature (node index); -1: none in the plan
  std::string feature_id;            // that feature's id; empty when none
  bool model_feature = false;        // that feature is one of the model's own
  Duration allowed_age;              // recency, else the feature's max_age; zero when no feature
  size_t runs = 0;                   // runs checked; 0 when no feature
  std::vector<size_t> late_runs;     // indices into Feasibility::runs where the data was not fresh
  bool never = false;                // some late run was never fresh (no delivery reaches the data)
  int64_t worst_late_seconds = 0;    // largest ready - run over the late runs that were ready at all
  std::string late_when;             // "every Monday (4 of 4 Monday runs)", "every run", "on 2026-03-08"; "" when on time
  InputStatus status = InputStatus::missing;

  /// Whether a feature provides the element.
  bool available() const { return feature >= 0; }
};

/// One candidate entry, checked input by input.
struct CandidateCheck {
  const Entry* entry = nullptr;      // points into the entries the ReuseReport was made from
  Coverage coverage = Coverage::partly;
  bool in_house = false;
  int rank = 0;                      // the reuse rank
  Computable computable = Computable::no;
  std::vector<InputCheck> inputs;    // one per distinct element, in the entry's order

  /// Element ids with the given status, in input order.
  std::vector<std::string> elements_with(InputStatus status) const;
};

struct Feasibility {
  int model = -1;                        // plan model index
  std::vector<Instant> runs;             // the run instants checked, sorted
  std::vector<CandidateCheck> candidates;  // covering and partly covering candidates, reuse rank order
};

/// Checks every candidate of `reuse` that covers or partly covers, at `runs`
/// (instants of model `model` of `plan`; see run_instants in engine/check.h).
/// `plan` must be a loaded (valid) plan.
Feasibility assess_feasibility(const Plan& plan, int model, const std::vector<Instant>& runs,
                               const ReuseReport& reuse, const Vocabulary& vocabulary);

/// Checks one entry at `runs` as assess_feasibility does (coverage `partly`, rank 0).
CandidateCheck assess_entry(const Plan& plan, int model, const std::vector<Instant>& runs, const Entry& entry,
                            const Vocabulary& vocabulary);

}  // namespace readyby
