#include "catalog/proposal_set.h"

#include <algorithm>
#include <filesystem>
#include <set>

#include "catalog/outcome_resolver.h"
#include "catalog/proposal.h"
#include "catalog/retrieval.h"
#include "catalog/reuse.h"
#include "plan/plan_loader.h"
#include "util/yaml_fields.h"
#include "util/yaml_tree.h"

namespace readyby {

namespace fs = std::filesystem;

namespace {

const std::vector<std::string> kKeys = {"proposal", "expect", "recommendation", "source"};

}  // namespace

double ProposalSetFigures::recall() const {
  return wanted == 0 ? 1.0 : static_cast<double>(found) / static_cast<double>(wanted);
}

double ProposalSetFigures::recommendation_accuracy() const {
  return recommendations_scored == 0 ? 1.0
                                     : static_cast<double>(recommendations_ok) / static_cast<double>(recommendations_scored);
}

bool load_proposal_set(const std::string& folder, std::vector<LabelledProposal>* out, Diagnostics* diags) {
  size_t before = diags->size();
  std::string path = (fs::path(folder) / "expected.yaml").string();
  std::string text;
  if (!read_file(path, &text)) {
    diags->error(path, {}, "cannot read the file");
    return false;
  }
  diags->add_source(path, text);
  YamlNode root;
  if (!parse_yaml(path, text, &root, diags)) return false;
  FieldReader r(path, diags);
  const YamlNode* list = root.is_map() ? root.find("proposals") : nullptr;
  if (!list || !list->is_sequence()) {
    r.error(root.pos, "expected a map with 'proposals', a list of {proposal, expect, recommendation, source}");
    return false;
  }
  r.check_keys(root, {"proposals"}, "the proposal set");
  std::set<std::string> seen;
  for (const YamlNode& item : list->items) {
    if (!item.is_map()) {
      r.error(item.pos, "each proposal of the set must be a map with proposal, expect, recommendation and source");
      continue;
    }
    r.check_keys(item, kKeys, "a labelled proposal");
    LabelledProposal p;
    for (const char* key : {"proposal", "expect", "recommendation", "source"}) {
      r.require(item, key, "a labelled proposal", item.pos);
    }
    p.id = r.text(item, "proposal", "a labelled proposal").value_or("");
    p.recommendation = r.choice(item, "recommendation", "a labelled proposal", {"reuse", "adapt", "build"}).value_or("");
    p.source = r.text(item, "source", "a labelled proposal").value_or("");
    if (auto expected = r.text_list(item, "expect", "a labelled proposal")) {
      for (const YamlNode* e : *expected) p.expected.push_back(e->value);
    }
    if (p.id.empty()) continue;
    if (!seen.insert(p.id).second) {
      r.error(item.find("proposal")->pos, "proposal '" + p.id + "' is listed twice");
      continue;
    }
    std::error_code ec;
    if (!fs::is_regular_file(fs::path(folder) / (p.id + ".proposal.yaml"), ec)) {
      r.error(item.find("proposal")->pos, "no file " + p.id + ".proposal.yaml in " + folder);
      continue;
    }
    out->push_back(std::move(p));
  }
  return diags->size() == before;
}

bool evaluate_proposal_set(const std::string& folder, const std::vector<LabelledProposal>& set,
                           const CatalogIndex& index, const Vocabulary& vocabulary, ProposalSetFigures* out,
                           Diagnostics* diags, std::string* error) {
  OutcomeResolver resolver(vocabulary);
  for (const LabelledProposal& labelled : set) {
    std::string file = (fs::path(folder) / (labelled.id + ".proposal.yaml")).string();
    std::optional<Proposal> proposal = load_proposal_file(file, vocabulary, diags);
    if (!proposal) return false;
    Retrieved retrieved = retrieve_candidates(index, *proposal, resolver, vocabulary, error);
    if (!error->empty()) return false;
    std::vector<std::string> held;
    for (const std::string& id : labelled.expected) {
      if (index.entry(id, error)) held.push_back(id);
      if (!error->empty()) return false;
    }
    ReuseReport report = match_proposal(*proposal, resolver, vocabulary, retrieved.entries, retrieved.signals, index.size());
    ProposalScore score;
    score.id = labelled.id;
    score.expected_held = held;
    for (size_t i = 0; i < report.candidates.size() && i < 3; ++i) score.top3.push_back(report.candidates[i].entry->id);
    for (const std::string& id : held) {
      score.found += std::find(score.top3.begin(), score.top3.end(), id) != score.top3.end() ? 1 : 0;
    }
    score.wanted = std::min<size_t>(3, held.size());
    score.found = std::min(score.found, score.wanted);
    score.expected_recommendation = labelled.recommendation;
    score.recommendation = to_string(report.recommendation);
    score.recommendation_scored = labelled.recommendation == "build" || !held.empty();
    score.recommendation_ok = score.recommendation == score.expected_recommendation;
    out->found += score.found;
    out->wanted += score.wanted;
    if (score.recommendation_scored) {
      ++out->recommendations_scored;
      out->recommendations_ok += score.recommendation_ok ? 1 : 0;
    }
    out->proposals.push_back(std::move(score));
  }
  return true;
}

}  // namespace readyby
