#pragma once
// Free text → outcome concepts, through the vocabulary's labels and synonyms.
//
// Each concept's label and synonyms are phrases. A phrase matches text
// case-insensitively (ASCII), on word boundaries, with each word also in its
// plural forms (s / es, and y → ies after a consonant) and with spaces,
// hyphens and other punctuation between words interchangeable ("30-day" =
// "30 day"). Matching uses RE2 (one RE2::Set over every phrase), so it stays
// linear-time on any input. Where matches overlap, the longest wins
// (then the earliest). Words left over that carry meaning (not numbers or
// small linking words) are reported as unresolved, never silently dropped.

#include <memory>
#include <string>
#include <vector>

#include "catalog/vocabulary.h"

namespace readyby {

struct PhraseMatch {
  std::string concept_id;
  std::string phrase;      // the vocabulary phrase that matched
  size_t offset = 0;       // byte range in the text
  size_t length = 0;
};

struct OutcomeResolution {
  std::vector<std::string> concepts;     // distinct, in order of first match in the text
  std::vector<PhraseMatch> matches;      // the matches kept, in text order
  std::vector<std::string> unresolved;   // meaningful words no match covered, in text order
};

class OutcomeResolver {
 public:
  explicit OutcomeResolver(const Vocabulary& vocabulary);
  ~OutcomeResolver();
  OutcomeResolver(const OutcomeResolver&) = delete;
  OutcomeResolver& operator=(const OutcomeResolver&) = delete;

  /// Resolves `text`. A text that is exactly a concept id resolves to that
  /// concept alone.
  OutcomeResolution resolve(const std::string& text) const;

 private:
  struct Matcher;   // the compiled phrases (RE2)
  const Vocabulary& vocabulary_;
  std::unique_ptr<Matcher> matcher_;
};

/// Whether `word` (lower case) links or quantifies rather than names an
/// outcome ("within", "risk", "days"): never reported as unresolved.
bool is_linking_word(const std::string& word);

/// The words of `text` that carry meaning, lower case, in order: no linking
/// words, no bare numbers.
std::vector<std::string> meaningful_words(const std::string& text);

/// The RE2 pattern for one vocabulary phrase, as described above, matched
/// against lower-cased text with punctuation turned into spaces and a space
/// added at each end; group 1 is the phrase.
std::string phrase_pattern(const std::string& phrase);

}  // namespace readyby
