#pragma once
// A proposal (DESIGN.md §6): what a new model would predict, for whom, where
// and when — the question `readyby reuse` answers against the catalogue.
//
// ```yaml
// proposal: readmit-30d
// title: 30-day readmission at discharge (fictional example)
// outcome: unplanned readmission within 30 days   # free text or a concept id
// horizon: P30D                                   # ISO duration, or in-hospital
// settings: [ward]
// population: {age_min: 18, condition: heart failure}
// time_point: discharge
// plan: demo.plan.yaml                            # optional, relative to this file
// model: readmit_risk                             # optional
// ```
//
// Required: proposal, outcome. Everything else is optional. Unknown keys,
// wrong types, unknown setting and time-point ids (with a did-you-mean), bad
// horizons and inverted age ranges are errors. `plan` and `model` are only
// stored here.

#include <optional>
#include <string>
#include <vector>

#include "catalog/catalog.h"
#include "catalog/vocabulary.h"
#include "util/diagnostics.h"

namespace readyby {

struct Proposal {
  std::string id;
  std::string title;
  std::string outcome;                 // as written
  std::optional<Horizon> horizon;      // nullopt: not stated
  std::vector<std::string> settings;   // setting ids
  std::optional<long> age_min, age_max;
  std::string condition;
  std::string time_point;              // empty: not stated
  std::string plan;                    // resolved against the proposal's folder; empty: none
  std::string model;
  std::string path;
};

/// Loads the proposal in `text` (named `path` in diagnostics), checking ids
/// against `vocabulary`. Returns nullopt when `diags` received errors.
std::optional<Proposal> load_proposal_text(const std::string& text, const std::string& path,
                                           const Vocabulary& vocabulary, Diagnostics* diags);
/// Reads and loads the proposal file at `path` (an unreadable file is one error).
std::optional<Proposal> load_proposal_file(const std::string& path, const Vocabulary& vocabulary, Diagnostics* diags);

}  // namespace readyby
