#include "catalog/proposal.h"

#include <filesystem>

#include "util/yaml_fields.h"
#include "plan/plan_loader.h"
#include "util/text.h"
#include "util/yaml_tree.h"

namespace readyby {

namespace {

const std::vector<std::string> kProposalKeys = {"proposal", "title",      "outcome", "horizon", "settings",
                                                "population", "time_point", "plan",    "model"};
const std::vector<std::string> kPopulationKeys = {"age_min", "age_max", "condition"};

void load_horizon(FieldReader& r, const YamlNode& root, Proposal* p) {
  const YamlNode* h = root.find("horizon");
  if (!h) return;
  if (h->is_scalar() && h->value == "in-hospital") {
    p->horizon = Horizon{true, {}};
    return;
  }
  if (!h->is_scalar() || looks_numeric(*h)) {
    r.error(FieldReader::where(root, h),
            "'horizon' of the proposal must be an ISO 8601 duration such as P30D, or in-hospital, found " + h->describe());
    return;
  }
  DurationParse d = parse_duration(h->value);
  if (!d.value) {
    r.error(FieldReader::inside(*h, d.offset), "bad horizon '" + h->value + "' of the proposal: " + d.error +
                                                   " (use an ISO 8601 duration such as P30D, or in-hospital)");
    return;
  }
  p->horizon = Horizon{false, *d.value};
}

void load_population(FieldReader& r, const YamlNode& root, Proposal* p) {
  const YamlNode* pop = root.find("population");
  if (!pop || pop->is_null()) return;
  if (!pop->is_map()) {
    r.error(pop->pos, "'population' of the proposal must be a map (age_min, age_max, condition), found " + pop->describe());
    return;
  }
  r.check_keys(*pop, kPopulationKeys, "the population");
  p->age_min = r.integer(*pop, "age_min", "the population", 0, 130);
  p->age_max = r.integer(*pop, "age_max", "the population", 0, 130);
  p->condition = r.text(*pop, "condition", "the population").value_or("");
  if (p->age_min && p->age_max && *p->age_min > *p->age_max) {
    r.error(pop->find("age_min")->pos, "age_min " + std::to_string(*p->age_min) + " of the proposal is greater than age_max " +
                                           std::to_string(*p->age_max));
  }
}

}  // namespace

std::optional<Proposal> load_proposal_text(const std::string& text, const std::string& path,
                                           const Vocabulary& vocabulary, Diagnostics* diags) {
  diags->add_source(path, text);
  size_t before = diags->size();
  FieldReader r(path, diags);
  Proposal p;
  p.path = path;
  YamlNode root;
  if (!parse_yaml(path, text, &root, diags)) return std::nullopt;
  if (root.is_null() || !root.is_map()) {
    r.error(root.is_null() ? SourcePos{} : root.pos,
            "a proposal must be a map with at least 'proposal' and 'outcome', found " + root.describe());
    return std::nullopt;
  }
  r.check_keys(root, kProposalKeys, "the proposal");
  if (r.require(root, "proposal", "the proposal", {1, 1})) {
    if (auto id = r.text(root, "proposal", "the proposal")) {
      if (!valid_id(*id)) r.error(root.find("proposal")->pos, "invalid proposal id '" + *id + "' (use letters, digits, '_', '.' and '-')");
      p.id = *id;
    }
  }
  p.title = r.text(root, "title", "the proposal").value_or("");
  if (r.require(root, "outcome", "the proposal (free text or an outcome concept id)", {1, 1})) {
    p.outcome = r.text(root, "outcome", "the proposal").value_or("");
  }
  load_horizon(r, root, &p);
  if (auto settings = r.text_list(root, "settings", "the proposal")) {
    std::vector<std::string> ids = Vocabulary::ids(vocabulary.settings);
    for (const YamlNode* s : *settings) {
      if (!vocabulary.setting(s->value)) {
        r.error(s->pos, "unknown setting '" + s->value + "'" + did_you_mean(s->value, ids));
      } else if (std::find(p.settings.begin(), p.settings.end(), s->value) == p.settings.end()) {
        p.settings.push_back(s->value);
      }
    }
  }
  load_population(r, root, &p);
  if (auto tp = r.text(root, "time_point", "the proposal")) {
    if (!vocabulary.time_point(*tp)) {
      r.error(root.find("time_point")->pos,
              "unknown time point '" + *tp + "'" + did_you_mean(*tp, Vocabulary::ids(vocabulary.time_points)));
    }
    p.time_point = *tp;
  }
  if (auto plan = r.text(root, "plan", "the proposal")) {
    std::filesystem::path plan_path(*plan);
    p.plan = plan_path.is_absolute() ? *plan : (std::filesystem::path(path).parent_path() / plan_path).string();
  }
  p.model = r.text(root, "model", "the proposal").value_or("");
  if (diags->size() != before) return std::nullopt;
  return p;
}

std::optional<Proposal> load_proposal_file(const std::string& path, const Vocabulary& vocabulary, Diagnostics* diags) {
  std::string text;
  if (!read_file(path, &text)) {
    diags->error(path, {}, "cannot read the proposal file");
    return std::nullopt;
  }
  return load_proposal_text(text, path, vocabulary, diags);
}

}  // namespace readyby
