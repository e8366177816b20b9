// readyby reuse PROPOSAL
#include <cstdio>
#include <iostream>

#include "catalog/outcome_resolver.h"
#include "catalog/proposal.h"
#include "catalog/retrieval.h"
#include "catalog/reuse.h"
#include "report/reuse_writer.h"
#include "cli/catalog_session.h"
#include "cli/commands.h"
#include "cli/options.h"

namespace readyby {

namespace {

const Command& self() { return command_named("reuse"); }

}  // namespace

int cmd_reuse(const std::vector<std::string>& raw) {
  if (wants_help(raw, self().usage)) return kExitOk;
  std::vector<std::string> registries;
  std::string format = "text", proposal_path;
  ArgTable table{{format_rule({"text", "json"}, &format), registry_rule(&registries)},
                 one_file("reuse", "PROPOSAL", &proposal_path)};
  std::string problem = parse_args(raw, table);
  if (problem.empty() && proposal_path.empty()) problem = "reuse needs a PROPOSAL file";
  if (!problem.empty()) return usage_error(problem, self().usage);

  CatalogSession session;
  if (int rc = open_catalog(registries, true, &session); rc != kExitOk) return rc;
  Diagnostics diags;
  std::optional<Proposal> proposal = load_proposal_file(proposal_path, session.vocabulary, &diags);
  if (!proposal) {
    std::cerr << diags.render();
    std::cerr << diags.sorted().size() << (diags.sorted().size() == 1 ? " error" : " errors") << " in "
              << proposal_path << "\n";
    return kExitBadInput;
  }
  std::string error;
  OutcomeResolver resolver(session.vocabulary);
  Retrieved retrieved = retrieve_candidates(*session.index, *proposal, resolver, session.vocabulary, &error);
  if (!error.empty()) {
    std::cerr << "readyby: cannot read the catalogue index: " << error << "\n";
    return kExitBadInput;
  }
  ReuseReport report = match_proposal(*proposal, resolver, session.vocabulary, retrieved.entries, retrieved.signals,
                                      session.index->size());
  std::string out = format == "json" ? reuse_json(*proposal, report) : reuse_text(*proposal, report, session.vocabulary);
  std::fputs(out.c_str(), stdout);
  return kExitOk;
}

}  // namespace readyby
