#include "catalog/retrieval.h"

#include <algorithm>
#include <set>

namespace readyby {

namespace {

// The phrases that name `concepts` and their narrower concepts in the vocabulary.
std::vector<std::string> concept_phrases(const std::vector<std::string>& concepts, const Vocabulary& v) {
  std::set<std::string> ids(concepts.begin(), concepts.end());
  for (const std::string& c : concepts) {
    for (const std::string& d : v.descendants(c)) ids.insert(d);
  }
  std::vector<std::string> out;
  for (const std::string& id : ids) {
    const Term* t = v.outcome(id);
    if (!t) continue;
    out.push_back(t->label);
    out.insert(out.end(), t->synonyms.begin(), t->synonyms.end());
  }
  return out;
}

std::string join_words(const std::set<std::string>& words) {
  std::string out;
  for (const std::string& w : words) out += (out.empty() ? "" : " ") + w;
  return out;
}

}  // namespace

Retrieved retrieve_candidates(const CatalogIndex& index, const Proposal& proposal, const OutcomeResolver& resolver,
                              const Vocabulary& vocabulary, std::string* error) {
  Retrieved out;
  OutcomeResolution outcome = resolver.resolve(proposal.outcome);
  std::vector<std::string> related;
  for (const Term& term : vocabulary.outcomes) {
    for (const std::string& c : outcome.concepts) {
      if (vocabulary.relate(c, term.id) != ConceptRelation::unrelated) {
        related.push_back(term.id);
        break;
      }
    }
  }
  std::vector<Entry> by_outcome = index.entries_with_outcomes(related, error);
  if (!error->empty()) return {};

  std::set<std::string> more;
  if (!proposal.condition.empty()) {
    // Any phrase of the condition's concepts names it; its own words must be mostly there.
    SearchQuery by_concept;
    by_concept.phrases =
        concept_phrases(resolver.resolve(condition_before_exclusion(proposal.condition)).concepts, vocabulary);
    by_concept.column = "population";
    by_concept.limit = kConditionHits;
    SearchQuery by_words = by_concept;
    by_words.phrases.clear();
    by_words.text = join_words(specific_condition_words(proposal.condition));
    for (const SearchQuery* q : {&by_concept, &by_words}) {
      for (const SearchHit& h : index.search(*q, error)) {
        if (q == &by_words && h.coverage < kConditionHit) continue;
        out.signals.condition_hits.insert(h.id);
        more.insert(h.id);
      }
      if (!error->empty()) return {};
    }
  }
  SearchQuery text;
  std::vector<std::string> outcome_words = meaningful_words(proposal.outcome);
  std::set<std::string> words = specific_condition_words(proposal.condition);
  words.insert(outcome_words.begin(), outcome_words.end());
  text.text = join_words(words);
  text.limit = kTextHits;
  for (const SearchHit& h : index.search(text, error)) {
    out.signals.text[h.id] = h.coverage;
    more.insert(h.id);
  }
  if (!error->empty()) return {};

  for (const Entry& e : by_outcome) more.erase(e.id);
  std::vector<Entry> rest = index.entries_with_ids(std::vector<std::string>(more.begin(), more.end()), error);
  if (!error->empty()) return {};
  out.entries = std::move(by_outcome);
  out.entries.insert(out.entries.end(), std::make_move_iterator(rest.begin()), std::make_move_iterator(rest.end()));
  std::sort(out.entries.begin(), out.entries.end(), [](const Entry& a, const Entry& b) { return a.id < b.id; });
  return out;
}

}  // namespace readyby
