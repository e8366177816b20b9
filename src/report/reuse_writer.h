#pragma once
// Writers for `readyby reuse`: the text report for people and the JSON object
// for tools. They format a ReuseReport; they decide nothing.
//
// JSON keys (stable; more may be added): proposal, title, outcome, concepts,
// unresolved, condition, condition_concepts, searched, recommendation (reuse
// | adapt | build), summary, in_house, candidates[] {id, name, kind, coverage
// (covers | partly | related), rank, in_house, relation (same | narrower |
// broader | overlapping | sibling | unrelated), relevance (0-1), provenance
// (checked | from-memory), evidence {checked, validated, c_statistic (null
// when none), c_cohort}, criteria[] {name, result, detail}, reference},
// cautions[].

#include <string>

#include "catalog/proposal.h"
#include "catalog/reuse.h"

namespace readyby {

std::string reuse_json(const Proposal& proposal, const ReuseReport& report);

/// At most `related_shown` related candidates are listed (the rest counted).
std::string reuse_text(const Proposal& proposal, const ReuseReport& report, const Vocabulary& vocabulary,
                       size_t related_shown = 5);

}  // namespace readyby
