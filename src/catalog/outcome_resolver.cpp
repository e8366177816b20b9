#include "catalog/outcome_resolver.h"

#include <re2/re2.h>
#include <re2/set.h>

#include <algorithm>
#include <cctype>
#include <set>

namespace readyby {

namespace {

// Words that link or quantify rather than name an outcome; never reported as
// unresolved. Time units belong to the horizon, which a proposal states apart.
const std::set<std::string> kLinkingWords = {
    "a",     "an",   "the",  "of",    "in",     "on",    "at",     "to",    "for",   "from",  "with",  "within",
    "after", "by",   "or",   "and",   "any",    "during", "over",  "per",   "into",  "its",   "their", "than",
    "risk",  "hour", "hours", "day",  "days",   "week",  "weeks",  "month", "months", "year", "years", "minute",
    "minutes", "h",  "d"};

bool is_vowel(char c) { return c == 'a' || c == 'e' || c == 'i' || c == 'o' || c == 'u'; }

// One word of a phrase with its plural forms.
std::string word_pattern(const std::string& word) {
  bool letters = std::all_of(word.begin(), word.end(), [](unsigned char c) { return std::isalpha(c); });
  if (!letters || word.size() < 3) return RE2::QuoteMeta(word);
  char last = word.back();
  if (last == 'y' && !is_vowel(word[word.size() - 2])) {
    return RE2::QuoteMeta(word.substr(0, word.size() - 1)) + "(?:y|ies)";
  }
  if (last == 's' || last == 'x' || last == 'z' || word.ends_with("ch") || word.ends_with("sh")) {
    return RE2::QuoteMeta(word) + "(?:es)?";
  }
  return RE2::QuoteMeta(word) + "(?:s|es)?";
}

char lower_char(char c) { return static_cast<char>(std::tolower(static_cast<unsigned char>(c))); }

std::string lower(std::string s) {
  for (char& c : s) c = lower_char(c);
  return s;
}

bool word_char(char c) { return std::isalnum(static_cast<unsigned char>(c)) || static_cast<unsigned char>(c) >= 0x80; }

// Text as the matcher sees it: lower case, every byte that is not part of a
// word (letters, digits, '&', '\'', non-ASCII) replaced by a space, and one
// space on each side. Byte i of the text is byte i + 1 here, so offsets carry over.
std::string normalise(const std::string& text) {
  std::string out = " ";
  for (char c : text) out += word_char(c) || c == '&' || c == '\'' ? lower_char(c) : ' ';
  return out + " ";
}

}  // namespace

bool is_linking_word(const std::string& word) { return kLinkingWords.count(word) > 0; }

std::vector<std::string> meaningful_words(const std::string& text) {
  std::vector<std::string> out;
  std::string word;
  for (char c : text + " ") {
    if (word_char(c)) {
      word += lower_char(c);
      continue;
    }
    bool number = std::all_of(word.begin(), word.end(), [](unsigned char d) { return std::isdigit(d); });
    if (!word.empty() && !number && !is_linking_word(word)) out.push_back(word);
    word.clear();
  }
  return out;
}

std::string phrase_pattern(const std::string& phrase) {
  std::string out;
  size_t i = 0;
  std::string padded = normalise(phrase);
  while (i < padded.size()) {
    if (padded[i] == ' ') {
      ++i;
      continue;
    }
    size_t start = i;
    while (i < padded.size() && padded[i] != ' ') ++i;
    out += (out.empty() ? "" : " +") + word_pattern(padded.substr(start, i - start));
  }
  // Spaces on both sides: the phrase starts and ends on word boundaries.
  return " (" + out + ") ";
}

struct OutcomeResolver::Matcher {
  struct Phrase {
    std::string concept_id;
    std::string text;
    std::unique_ptr<RE2> re;   // compiled on first use
  };
  std::vector<Phrase> phrases;
  RE2::Options options;
  std::unique_ptr<RE2::Set> set;
};

OutcomeResolver::OutcomeResolver(const Vocabulary& vocabulary) : vocabulary_(vocabulary), matcher_(new Matcher) {
  matcher_->options.set_log_errors(false);
  matcher_->set = std::make_unique<RE2::Set>(matcher_->options, RE2::UNANCHORED);
  for (const Term& t : vocabulary.outcomes) {
    std::vector<std::string> texts = {t.label};
    texts.insert(texts.end(), t.synonyms.begin(), t.synonyms.end());
    for (const std::string& text : texts) {
      if (matcher_->set->Add(phrase_pattern(text), nullptr) < 0) continue;
      matcher_->phrases.push_back({t.id, text, nullptr});
    }
  }
  if (!matcher_->set->Compile()) matcher_->set.reset();  // out of memory: nothing resolves
}

OutcomeResolver::~OutcomeResolver() = default;

OutcomeResolution OutcomeResolver::resolve(const std::string& text) const {
  OutcomeResolution out;
  std::string trimmed = text;
  trimmed.erase(0, trimmed.find_first_not_of(" \t\n"));
  trimmed.erase(trimmed.find_last_not_of(" \t\n") + 1);
  if (vocabulary_.outcome(trimmed)) {
    out.concepts.push_back(trimmed);
    out.matches.push_back({trimmed, trimmed, text.find(trimmed), trimmed.size()});
    return out;
  }
  std::vector<int> hits;
  std::string normal = normalise(text);
  if (matcher_->set) matcher_->set->Match(normal, &hits);
  std::vector<PhraseMatch> all;
  for (int h : hits) {
    Matcher::Phrase& p = matcher_->phrases[static_cast<size_t>(h)];
    if (!p.re) p.re = std::make_unique<RE2>(phrase_pattern(p.text), matcher_->options);
    re2::StringPiece group[2];
    size_t pos = 0;
    while (pos < normal.size() && p.re->Match(normal, pos, normal.size(), RE2::UNANCHORED, group, 2)) {
      size_t start = static_cast<size_t>(group[1].data() - normal.data());
      all.push_back({p.concept_id, p.text, start - 1, group[1].size()});
      pos = start + group[1].size();  // the space after the phrase may start the next one
    }
  }
  // Longest first, then earliest, then vocabulary order; keep those that do not overlap a kept one.
  std::stable_sort(all.begin(), all.end(), [](const PhraseMatch& a, const PhraseMatch& b) {
    return a.length != b.length ? a.length > b.length : a.offset < b.offset;
  });
  for (const PhraseMatch& m : all) {
    bool overlaps = std::any_of(out.matches.begin(), out.matches.end(), [&](const PhraseMatch& k) {
      return m.offset < k.offset + k.length && k.offset < m.offset + m.length;
    });
    if (!overlaps) out.matches.push_back(m);
  }
  std::sort(out.matches.begin(), out.matches.end(),
            [](const PhraseMatch& a, const PhraseMatch& b) { return a.offset < b.offset; });
  for (const PhraseMatch& m : out.matches) {
    if (std::find(out.concepts.begin(), out.concepts.end(), m.concept_id) == out.concepts.end()) {
      out.concepts.push_back(m.concept_id);
    }
  }
  // Words outside every kept match; hyphenated words stay whole ("day-case"),
  // and one made only of numbers and linking words ("30-day") is not reported.
  for (size_t i = 0; i < text.size();) {
    if (!word_char(text[i])) {
      ++i;
      continue;
    }
    size_t start = i;
    bool meaningful = false;
    while (i < text.size() && word_char(text[i])) {
      size_t part = i;
      while (i < text.size() && word_char(text[i])) ++i;
      bool covered = std::any_of(out.matches.begin(), out.matches.end(),
                                 [&](const PhraseMatch& k) { return part >= k.offset && part < k.offset + k.length; });
      std::string word = lower(text.substr(part, i - part));
      bool number = std::all_of(word.begin(), word.end(), [](unsigned char c) { return std::isdigit(c); });
      meaningful = meaningful || (!covered && !number && !kLinkingWords.count(word));
      if (i + 1 < text.size() && text[i] == '-' && word_char(text[i + 1])) ++i;
    }
    if (meaningful) out.unresolved.push_back(text.substr(start, i - start));
  }
  return out;
}

}  // namespace readyby
