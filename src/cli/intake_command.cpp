// readyby intake PROPOSAL
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <iostream>

#include "catalog/outcome_resolver.h"
#include "catalog/proposal.h"
#include "catalog/retrieval.h"
#include "catalog/reuse.h"
#include "cli/catalog_session.h"
#include "cli/commands.h"
#include "cli/options.h"
#include "engine/check.h"
#include "history/store.h"
#include "intake/intake.h"
#include "plan/plan_loader.h"
#include "report/intake_report.h"
#include "util/text.h"
#include "util/yaml_tree.h"

namespace readyby {

namespace {

struct IntakeOptions {
  std::string proposal_path;
  std::optional<LocalDays> from;
  int days = 28;
  std::string format = "text";
  std::vector<std::string> registries;
  std::string db_path;  // empty: no forecast
};

// Parses intake's arguments; returns an error message or "".
std::string parse_intake_args(const std::vector<std::string>& args, IntakeOptions* o) {
  ArgTable table{window_rules(&o->from, &o->days), one_file("intake", "PROPOSAL", &o->proposal_path)};
  table.options.push_back(format_rule({"text", "json", "markdown"}, &o->format));
  table.options.push_back(path_rule("--db", "a FILE", &o->db_path));
  table.options.push_back(registry_rule(&o->registries));
  if (std::string error = parse_args(args, table); !error.empty()) return error;
  if (o->proposal_path.empty()) return "intake needs a PROPOSAL file";
  return "";
}

// Where a key's value is written in the proposal, for diagnostics; the first
// key's position when the key is absent.
SourcePos value_pos(const YamlNode& root, std::string_view key) {
  if (const YamlNode* v = root.find(key)) return v->pos;
  if (root.is_map() && !root.entries.empty()) return root.entries.front().first.pos;
  return {1, 1};
}

// What intake needs beyond a valid proposal: an outcome the vocabulary knows
// (a one-word outcome must be a concept id or match a label or synonym), and
// a plan file with the named model. Reports each problem at its value.
// Returns the loaded plan and the model index, or nullopt.
std::optional<PlanLoadResult> load_intake_plan(const Proposal& p, const OutcomeResolution& resolution,
                                               const Vocabulary& vocabulary, int* model, Diagnostics* diags,
                                               std::string* plan_errors) {
  std::string text;
  read_file(p.path, &text);
  YamlNode root;
  Diagnostics scratch;
  parse_yaml(p.path, text, &root, &scratch);
  diags->add_source(p.path, text);
  std::string outcome = p.outcome;
  if (resolution.concepts.empty() && outcome.find_first_of(" \t") == std::string::npos) {
    diags->error(p.path, value_pos(root, "outcome"),
                 "unknown outcome '" + outcome +
                     "': not an outcome concept id, and no concept's label or synonym matches it" +
                     did_you_mean(outcome, Vocabulary::ids(vocabulary.outcomes)));
  }
  if (p.plan.empty()) {
    diags->error(p.path, value_pos(root, "plan"),
                 "the proposal names no 'plan': intake needs the data plan that would feed the model (plan: FILE)");
  }
  if (p.model.empty()) {
    diags->error(p.path, value_pos(root, "model"),
                 "the proposal names no 'model': intake needs the model of the plan that would make the predictions "
                 "(model: ID)");
  }
  if (p.plan.empty()) return std::nullopt;
  std::error_code ec;
  if (!std::filesystem::is_regular_file(p.plan, ec)) {
    diags->error(p.path, value_pos(root, "plan"),
                 "cannot read the plan file '" + p.plan + "' (a relative path is read from the proposal's folder)");
    return std::nullopt;
  }
  PlanLoadResult loaded = load_plan_file(p.plan);
  if (!loaded.plan) {
    diags->error(p.path, value_pos(root, "plan"), "the plan file '" + p.plan + "' has errors (below)");
    *plan_errors = loaded.rendered;
    return std::nullopt;
  }
  if (p.model.empty()) return std::nullopt;
  *model = loaded.plan->find_model(p.model);
  if (*model < 0) {
    std::vector<std::string> ids;
    for (const Model& m : loaded.plan->models) ids.push_back(m.id);
    diags->error(p.path, value_pos(root, "model"), "no model '" + p.model + "' in " + p.plan + did_you_mean(p.model, ids));
    return std::nullopt;
  }
  if (!diags->empty()) return std::nullopt;
  return loaded;
}

int report_errors(const Diagnostics& diags, const std::string& path, const std::string& more) {
  std::cerr << diags.render() << more;
  size_t n = diags.sorted().size();
  std::cerr << n << (n == 1 ? " error" : " errors") << " in " << path << "\n";
  return kExitBadInput;
}

}  // namespace

int cmd_intake(const std::vector<std::string>& args) {
  const Command& self = command_named("intake");
  if (wants_help(args, self.usage)) return kExitOk;
  IntakeOptions o;
  if (std::string problem = parse_intake_args(args, &o); !problem.empty()) return usage_error(problem, self.usage);

  CatalogSession session;
  if (int rc = open_catalog(o.registries, true, &session); rc != kExitOk) return rc;
  Diagnostics diags;
  std::optional<Proposal> proposal = load_proposal_file(o.proposal_path, session.vocabulary, &diags);
  if (!proposal) return report_errors(diags, o.proposal_path, "");
  OutcomeResolver resolver(session.vocabulary);
  OutcomeResolution resolution = resolver.resolve(proposal->outcome);
  int model = -1;
  std::string plan_errors;
  std::optional<PlanLoadResult> loaded =
      load_intake_plan(*proposal, resolution, session.vocabulary, &model, &diags, &plan_errors);
  if (!loaded) return report_errors(diags, o.proposal_path, plan_errors);
  std::cerr << loaded->rendered;  // the plan's warnings
  const Plan& plan = *loaded->plan;
  const Model& m = plan.models[static_cast<size_t>(model)];
  if (!o.from) o.from = today_in(*m.zone);
  if (run_instants(plan, m, *o.from, o.days).empty()) {
    return usage_error("model '" + m.id + "' has no runs with local dates from " + format_date(*o.from) + " over " +
                           std::to_string(o.days) + " days; widen --days",
                       self.usage);
  }

  std::string error;
  Retrieved retrieved = retrieve_candidates(*session.index, *proposal, resolver, session.vocabulary, &error);
  if (!error.empty()) {
    std::cerr << "readyby: cannot read the catalogue index: " << error << "\n";
    return kExitBadInput;
  }
  ReuseReport reuse = match_proposal(*proposal, resolver, session.vocabulary, retrieved.entries, retrieved.signals,
                                     session.index->size());
  IntakeReport report = screen_intake(*proposal, plan, model, *o.from, o.days, std::move(reuse), session.vocabulary);
  if (!o.db_path.empty()) {
    std::unique_ptr<HistoryStore> store = HistoryStore::open(o.db_path, HistoryStore::Mode::existing, &error);
    std::optional<History> history = store ? store->read(plan, from_unix(0), &error) : std::nullopt;
    if (!history) {
      std::cerr << "readyby: " << o.db_path << ": " << error << "\n";
      return kExitBadInput;
    }
    report.forecast = forecast_intake(plan, model, *o.from, o.days, report.feasibility, *history, ForecastOptions{});
  }
  std::string out = o.format == "json"       ? intake_json(report)
                    : o.format == "markdown" ? intake_markdown(report)
                                             : intake_text(report);
  std::fputs(out.c_str(), stdout);
  return report.timing_fails() ? kExitFindings : kExitOk;
}

}  // namespace readyby
