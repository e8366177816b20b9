#include "catalog/vocabulary.h"

#include <algorithm>
#include <functional>
#include <set>

#include "util/yaml_fields.h"
#include "util/text.h"
#include "util/yaml_tree.h"

namespace readyby {

namespace {

const std::vector<std::string> kSections = {"outcomes", "settings", "time_points", "elements"};
const std::vector<std::string> kOutcomeKeys = {"id", "label", "synonyms", "broader"};
const std::vector<std::string> kTermKeys = {"id", "label", "synonyms"};
const std::vector<std::string> kElementKeys = {"id", "label", "kind", "structured", "loinc"};
// Element kinds and the id prefix each one uses (SCHEMA.md).
const std::vector<std::pair<std::string, std::string>> kElementKinds = {
    {"lab", "lab"},         {"vital", "vital"},       {"diagnosis", "dx"},    {"history", "history"},
    {"demographic", "demo"}, {"assessment", "assessment"}, {"medication", "med"}, {"procedure", "proc"},
    {"imaging", "imaging"}, {"utilisation", "util"},  {"physiology", "phys"}, {"device", "device"},
    {"social", "social"},   {"order", "order"}};

bool valid_element_id(std::string_view id) {
  if (id.empty() || id.find('.') == std::string_view::npos) return false;
  return std::all_of(id.begin(), id.end(), [](char c) {
    return (c >= 'a' && c <= 'z') || (c >= '0' && c <= '9') || c == '_' || c == '.';
  });
}

// What one vocabulary section is called in messages.
const char* singular(const std::string& section) {
  if (section == "outcomes") return "outcome";
  if (section == "settings") return "setting";
  if (section == "time_points") return "time point";
  return "element";
}

class VocabularyLoader {
 public:
  VocabularyLoader(Vocabulary* out, Diagnostics* diags) : out_(out), diags_(diags) {}

  void load_file(const SourceFile& file) {
    diags_->add_source(file.path, file.text);
    FieldReader r(file.path, diags_);
    YamlNode root;
    if (!parse_yaml(file.path, file.text, &root, diags_)) return;
    if (root.is_null()) return;  // an empty file adds nothing
    if (!root.is_map()) {
      r.error(root.pos, "a vocabulary file must be a map with outcomes, settings, time_points and/or elements, found " +
                            root.describe());
      return;
    }
    r.check_keys(root, kSections, "a vocabulary file");
    for (const auto& [key, body] : root.entries) {
      if (!key.is_scalar() || std::find(kSections.begin(), kSections.end(), key.value) == kSections.end()) continue;
      if (body.is_null()) continue;
      if (!body.is_sequence()) {
        r.error(body.pos, "'" + key.value + "' must be a list of entries such as '- id: ...', found " + body.describe());
        continue;
      }
      for (const YamlNode& item : body.items) load_item(r, key.value, item);
    }
  }

  void check_broader() {
    std::vector<std::string> ids = Vocabulary::ids(out_->outcomes);
    for (const auto& [concept_index, refs] : broader_refs_) {
      for (const auto& [id, node] : refs) {
        if (!out_->outcome(id)) {
          diags_->error(out_->outcomes[concept_index].path, node.pos,
                        "unknown broader outcome '" + id + "'" + did_you_mean(id, ids));
        }
      }
    }
    check_cycles();
  }

 private:
  void load_item(FieldReader& r, const std::string& section, const YamlNode& item) {
    std::string what = std::string("an entry of '") + section + "'";
    if (!item.is_map()) {
      r.error(item.pos, what + " must be a map with at least id and label, found " + item.describe());
      return;
    }
    const YamlNode* id_node = item.find("id");
    std::optional<std::string> id = r.text(item, "id", what);
    if (!id_node) {
      r.error(item.pos, "missing required key 'id' in " + what);
      return;
    }
    if (!id) return;
    what = std::string(singular(section)) + " '" + *id + "'";
    bool is_element = section == "elements";
    if (!is_element && !valid_term_id(*id)) {
      r.error(id_node->pos, "invalid " + std::string(singular(section)) + " id '" + *id +
                                "' (use lower-case letters, digits and '-')");
    }
    if (is_element && !valid_element_id(*id)) {
      r.error(id_node->pos, "invalid element id '" + *id +
                                "' (use <kind-prefix>.<name> with lower-case letters, digits, '_' and '.')");
    }
    std::string first = first_definition(section, *id);
    if (!first.empty()) {
      r.error(id_node->pos, what + " is already defined at " + first);
      return;
    }
    definitions_[section + "\n" + *id] = r.path() + ":" + std::to_string(id_node->pos.line);
    if (is_element) {
      load_element(r, item, *id, what);
    } else {
      load_term(r, section, item, *id, what);
    }
  }

  std::string first_definition(const std::string& section, const std::string& id) const {
    auto it = definitions_.find(section + "\n" + id);
    return it == definitions_.end() ? std::string() : it->second;
  }

  void load_term(FieldReader& r, const std::string& section, const YamlNode& item, const std::string& id,
                 const std::string& what) {
    bool outcome = section == "outcomes";
    r.check_keys(item, outcome ? kOutcomeKeys : kTermKeys, what);
    Term term;
    term.id = id;
    term.path = r.path();
    term.pos = item.find("id")->pos;
    if (r.require(item, "label", what, term.pos)) term.label = r.text(item, "label", what).value_or("");
    if (auto synonyms = r.text_list(item, "synonyms", what)) {
      for (const YamlNode* s : *synonyms) term.synonyms.push_back(s->value);
    }
    if (outcome) {
      if (auto broader = r.text_list(item, "broader", what)) {
        auto& refs = broader_refs_[out_->outcomes.size()];
        for (const YamlNode* b : *broader) {
          if (b->value == id) {
            r.error(b->pos, what + " cannot be broader than itself");
            continue;
          }
          term.broader.push_back(b->value);
          refs.emplace_back(b->value, *b);
        }
      }
      out_->outcomes.push_back(std::move(term));
    } else if (section == "settings") {
      out_->settings.push_back(std::move(term));
    } else {
      out_->time_points.push_back(std::move(term));
    }
  }

  void load_element(FieldReader& r, const YamlNode& item, const std::string& id, const std::string& what) {
    r.check_keys(item, kElementKeys, what);
    Element e;
    e.id = id;
    e.path = r.path();
    e.pos = item.find("id")->pos;
    if (r.require(item, "label", what, e.pos)) e.label = r.text(item, "label", what).value_or("");
    std::vector<std::string> kinds;
    for (const auto& [kind, prefix] : kElementKinds) kinds.push_back(kind);
    if (r.require(item, "kind", what, e.pos)) {
      if (auto kind = r.choice(item, "kind", what, kinds)) {
        e.kind = *kind;
        for (const auto& [k, prefix] : kElementKinds) {
          if (k == *kind && !id.starts_with(prefix + ".")) {
            r.error(e.pos, "element id '" + id + "' of kind " + k + " must start with '" + prefix + ".'");
          }
        }
      }
    }
    if (r.require(item, "structured", what, e.pos)) e.structured = r.boolean(item, "structured", what).value_or(false);
    if (const YamlNode* loinc = item.find("loinc")) {
      std::optional<std::string> code = r.text(item, "loinc", what);
      size_t dash = code ? code->find('-') : std::string::npos;
      bool ok = dash != std::string::npos && dash > 0 && dash + 2 == code->size() &&
                std::all_of(code->begin(), code->end(), [](char c) { return (c >= '0' && c <= '9') || c == '-'; });
      if (code && !ok) r.error(loinc->pos, "LOINC code '" + *code + "' of " + what + " must look like 2160-0");
      if (ok) e.loinc = *code;
    }
    out_->elements.push_back(std::move(e));
  }

  // Depth-first search over `broader` links; each cycle reported once, at the
  // first concept (in file order) that lies on it.
  void check_cycles() {
    enum class Mark { none, active, done };
    std::map<std::string, Mark> mark;
    std::vector<std::string> stack;
    std::function<void(const Term&)> visit = [&](const Term& t) {
      mark[t.id] = Mark::active;
      stack.push_back(t.id);
      for (const std::string& b : t.broader) {
        const Term* next = out_->outcome(b);
        if (!next) continue;
        if (mark[b] == Mark::active) {
          auto start = std::find(stack.begin(), stack.end(), b);
          std::string cycle;
          for (auto it = start; it != stack.end(); ++it) cycle += *it + " -> ";
          const Term& head = *out_->outcome(*start);
          diags_->error(head.path, head.pos, "broader links form a cycle: " + cycle + b);
        } else if (mark[b] == Mark::none) {
          visit(*next);
        }
      }
      stack.pop_back();
      mark[t.id] = Mark::done;
    };
    for (const Term& t : out_->outcomes) {
      if (mark[t.id] == Mark::none) visit(t);
    }
  }

  Vocabulary* out_;
  Diagnostics* diags_;
  std::map<std::string, std::string> definitions_;  // section\nid -> "path:line"
  std::map<size_t, std::vector<std::pair<std::string, YamlNode>>> broader_refs_;
};

}  // namespace

std::vector<std::string> Vocabulary::ids(const std::vector<Term>& terms) {
  std::vector<std::string> out;
  out.reserve(terms.size());
  for (const Term& t : terms) out.push_back(t.id);
  return out;
}

std::vector<std::string> Vocabulary::element_ids() const {
  std::vector<std::string> out;
  out.reserve(elements.size());
  for (const Element& e : elements) out.push_back(e.id);
  return out;
}

void Vocabulary::reindex() {
  auto index = [](auto& map, const auto& list) {
    map.clear();
    for (size_t i = 0; i < list.size(); ++i) map.emplace(list[i].id, i);
  };
  index(outcome_index_, outcomes);
  index(setting_index_, settings);
  index(time_point_index_, time_points);
  index(element_index_, elements);
  ancestors_.clear();
  for (const Term& t : outcomes) {
    std::set<std::string> seen;
    std::vector<std::string> todo = t.broader;
    while (!todo.empty()) {
      std::string id = todo.back();
      todo.pop_back();
      const Term* b = outcome(id);
      if (!b || id == t.id || !seen.insert(id).second) continue;
      todo.insert(todo.end(), b->broader.begin(), b->broader.end());
    }
    ancestors_[t.id] = std::vector<std::string>(seen.begin(), seen.end());
  }
  descendants_.clear();
  for (const auto& [id, up] : ancestors_) {
    for (const std::string& a : up) descendants_[a].push_back(id);   // ancestors_ is ordered: each list stays sorted
  }
}

const std::vector<std::string>& Vocabulary::ancestors(const std::string& id) const {
  static const std::vector<std::string> kNone;
  auto it = ancestors_.find(id);
  return it == ancestors_.end() ? kNone : it->second;
}

const std::vector<std::string>& Vocabulary::descendants(const std::string& id) const {
  static const std::vector<std::string> kNone;
  auto it = descendants_.find(id);
  return it == descendants_.end() ? kNone : it->second;
}

std::string Vocabulary::shared_narrower(const std::string& a, const std::string& b) const {
  const std::vector<std::string>& down_a = descendants(a);
  const std::vector<std::string>& down_b = descendants(b);
  auto i = down_a.begin();
  auto j = down_b.begin();
  while (i != down_a.end() && j != down_b.end()) {
    if (*i == *j) return *i;
    if (*i < *j) ++i;
    else ++j;
  }
  return "";
}

const char* to_string(ConceptRelation r) {
  switch (r) {
    case ConceptRelation::same: return "same";
    case ConceptRelation::narrower: return "narrower";
    case ConceptRelation::broader: return "broader";
    case ConceptRelation::overlapping: return "overlapping";
    case ConceptRelation::sibling: return "sibling";
    case ConceptRelation::unrelated: return "unrelated";
  }
  return "?";
}

ConceptRelation Vocabulary::relate(const std::string& a, const std::string& b) const {
  if (a == b) return ConceptRelation::same;
  const std::vector<std::string>& up_a = ancestors(a);
  const std::vector<std::string>& up_b = ancestors(b);
  if (std::binary_search(up_b.begin(), up_b.end(), a)) return ConceptRelation::narrower;
  if (std::binary_search(up_a.begin(), up_a.end(), b)) return ConceptRelation::broader;
  if (!shared_narrower(a, b).empty()) return ConceptRelation::overlapping;
  for (const std::string& x : up_a) {
    if (std::binary_search(up_b.begin(), up_b.end(), x)) return ConceptRelation::sibling;
  }
  return ConceptRelation::unrelated;
}

bool load_vocabulary(const std::vector<SourceFile>& files, Vocabulary* out, Diagnostics* diags) {
  size_t before = diags->size();
  VocabularyLoader loader(out, diags);
  for (const SourceFile& f : files) loader.load_file(f);
  out->reindex();
  loader.check_broader();
  return diags->size() == before;
}

}  // namespace readyby
