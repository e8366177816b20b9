#pragma once
// The catalogue's shared terms: outcome concepts, care settings, prediction
// time points and data elements (registries/SCHEMA.md, `vocabulary/`).
//
// Every vocabulary file is a map with one or more of the sections
// `outcomes`, `settings`, `time_points`, `elements`; the files are merged and
// an id defined twice — in one file or across files — is an error. Outcome
// concepts form a DAG through `broader` (a narrower concept is a kind or a
// component of each broader one); a `broader` id that does not exist, or a
// cycle, is an error.

#include <map>
#include <optional>
#include <cstdint>
#include <string>
#include <vector>

#include "util/diagnostics.h"
#include "util/files.h"

namespace readyby {

/// An outcome concept, care setting or time point.
struct Term {
  std::string id;
  std::string label;
  std::vector<std::string> synonyms;   // lower-case phrases
  std::vector<std::string> broader;    // outcomes only: ids of broader concepts
  std::string path;                    // where it is defined
  SourcePos pos;
};

struct Element {
  std::string id;       // <prefix>.<name>, e.g. lab.creatinine
  std::string label;
  std::string kind;     // lab | vital | diagnosis | ...
  bool structured = false;
  std::string loinc;    // empty: none given
  std::string path;
  SourcePos pos;
};

/// How two outcome concepts relate through the `broader` DAG, closest first.
enum class ConceptRelation {
  same,         // one concept
  narrower,     // the second is narrower (a kind or a component of the first)
  broader,      // the second is broader
  overlapping,  // neither, but some concept is narrower than both (stroke and
                // thromboembolism: both include ischaemic stroke)
  sibling,      // none of the above, but they share a broader concept
  unrelated,
};
/// "same" | "narrower" | "broader" | "overlapping" | "sibling" | "unrelated".
const char* to_string(ConceptRelation r);

class Vocabulary {
 public:
  std::vector<Term> outcomes;
  std::vector<Term> settings;
  std::vector<Term> time_points;
  std::vector<Element> elements;

  /// Rebuilds the id lookups and the broader closure; call after changing the lists.
  void reindex();

  /// nullptr when the id is not defined.
  const Term* outcome(const std::string& id) const { return find(outcome_index_, outcomes, id); }
  const Term* setting(const std::string& id) const { return find(setting_index_, settings, id); }
  const Term* time_point(const std::string& id) const { return find(time_point_index_, time_points, id); }
  const Element* element(const std::string& id) const { return find(element_index_, elements, id); }

  /// Ids of a section, in file order (for did-you-mean).
  static std::vector<std::string> ids(const std::vector<Term>& terms);
  std::vector<std::string> element_ids() const;

  /// Every concept strictly broader than `id` (transitively), sorted; empty for unknown ids.
  const std::vector<std::string>& ancestors(const std::string& id) const;
  /// Every concept strictly narrower than `id` (transitively), sorted; empty for unknown ids.
  const std::vector<std::string>& descendants(const std::string& id) const;
  /// A concept narrower than both `a` and `b` (the first in id order), or ""
  /// when there is none.
  std::string shared_narrower(const std::string& a, const std::string& b) const;
  /// How concept `b` relates to concept `a` (`narrower`: b is a kind of a).
  ConceptRelation relate(const std::string& a, const std::string& b) const;

 private:
  template <class T>
  static const T* find(const std::map<std::string, size_t>& index, const std::vector<T>& list, const std::string& id) {
    auto it = index.find(id);
    return it == index.end() ? nullptr : &list[it->second];
  }
  std::map<std::string, size_t> outcome_index_, setting_index_, time_point_index_, element_index_;
  std::map<std::string, std::vector<std::string>> ancestors_, descendants_;
};

/// Loads and validates the vocabulary `files` into `out`, reporting every
/// problem to `diags` (unknown sections and keys, missing id or label, bad id
/// syntax, element prefix not matching its kind, duplicate ids, unknown
/// `broader` ids, cycles). Returns true when no error was found.
bool load_vocabulary(const std::vector<SourceFile>& files, Vocabulary* out, Diagnostics* diags);

}  // namespace readyby
