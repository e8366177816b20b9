// readyby catalog validate | search | show
#include <cstdio>
#include <iostream>

#include "catalog/catalog.h"
#include "catalog/index.h"
#include "catalog/outcome_resolver.h"
#include "catalog/reuse.h"
#include "cli/catalog_session.h"
#include "cli/commands.h"
#include "cli/options.h"
#include "util/text.h"

namespace readyby {

namespace {

const Command& self() { return command_named("catalog"); }

// An entry is a close match for a search when its text holds at least this
// share of the query (IDF-weighted coverage, catalog/fts_coverage.h). Below
// it, search says that no entry is a close match (README, "catalog search").
constexpr double kCloseMatch = 0.5;

void print_cautions(const char* indent) {
  std::printf("\ncautions:\n");
  for (const std::string& c : catalogue_cautions()) std::printf("%s- %s\n", indent, c.c_str());
}

int catalog_validate(std::vector<std::string> args) {
  std::vector<std::string> registries;
  ArgTable table{{registry_rule(&registries)},
                 [](const std::string&) { return std::string("catalog validate takes only --registry DIR options"); }};
  if (std::string problem = parse_args(args, table); !problem.empty()) return usage_error(problem, self().usage);
  std::string not_found;
  registries = registry_layers(registries, &not_found);
  if (registries.empty()) {
    std::cerr << "readyby: " << not_found << "\n";
    return kExitBadInput;
  }
  Diagnostics diags;
  RegistryFiles files;
  Catalog catalog;
  bool ok = read_registries(registries, &files, &diags);
  ok = load_catalog(files, &catalog, &diags) && ok;
  if (!ok) {
    std::cerr << diags.render();
    std::cerr << diags.sorted().size() << (diags.sorted().size() == 1 ? " error" : " errors") << " in the catalogue\n";
    return kExitBadInput;
  }
  size_t local = 0;
  for (const Entry& e : catalog.entries) local += e.local() ? 1 : 0;
  const Vocabulary& v = catalog.vocabulary;
  std::printf("catalogue is valid: %zu entries (%zu published scores, %zu local models) in %zu registr%s; "
              "vocabulary of %zu outcomes, %zu settings, %zu time points, %zu data elements in %zu files\n",
              catalog.entries.size(), catalog.entries.size() - local, local, registries.size(),
              registries.size() == 1 ? "y" : "ies", v.outcomes.size(), v.settings.size(), v.time_points.size(),
              v.elements.size(), files.vocabulary.size());
  return kExitOk;
}

struct SearchOptions {
  std::string text, setting, outcome, format = "text";
  size_t limit = 20;
};

std::string parse_search_args(const std::vector<std::string>& args, SearchOptions* o,
                              std::vector<std::string>* registries) {
  ArgTable table{{format_rule({"text", "json"}, &o->format), registry_rule(registries)},
                 [o](const std::string& word) {
                   o->text += (o->text.empty() ? "" : " ") + word;
                   return std::string();
                 }};
  table.options.push_back({"--setting", true, [o](const std::optional<std::string>& v) {
                             if (!v) return std::string("--setting needs a setting id");
                             o->setting = *v;
                             return std::string();
                           }});
  table.options.push_back({"--outcome", true, [o](const std::optional<std::string>& v) {
                             if (!v) return std::string("--outcome needs a concept id or text");
                             o->outcome = *v;
                             return std::string();
                           }});
  table.options.push_back(number_rule("--limit", 1, 10000, "--limit needs a whole number from 1 to 10000",
                                      [o](long n) { o->limit = static_cast<size_t>(n); }));
  if (std::string error = parse_args(args, table); !error.empty()) return error;
  if (o->text.empty()) return "catalog search needs TEXT";
  return "";
}

int catalog_search(std::vector<std::string> args) {
  std::vector<std::string> registries;
  SearchOptions o;
  std::string problem = parse_search_args(args, &o, &registries);
  if (!problem.empty()) return usage_error(problem, self().usage);
  CatalogSession session;
  if (int rc = open_catalog(registries, true, &session); rc != kExitOk) return rc;
  const Vocabulary& v = session.vocabulary;
  SearchQuery q;
  q.text = o.text;
  q.setting = o.setting;
  q.limit = o.limit;
  if (!o.setting.empty() && !v.setting(o.setting)) {
    return usage_error("unknown setting '" + o.setting + "'" + did_you_mean(o.setting, Vocabulary::ids(v.settings)),
                       self().usage);
  }
  if (!o.outcome.empty()) {
    std::vector<std::string> concepts;
    if (v.outcome(o.outcome)) {
      concepts = {o.outcome};
    } else {
      concepts = OutcomeResolver(v).resolve(o.outcome).concepts;
    }
    if (concepts.empty()) {
      return usage_error("--outcome '" + o.outcome + "' names no outcome concept" +
                             did_you_mean(o.outcome, Vocabulary::ids(v.outcomes)),
                         self().usage);
    }
    for (const std::string& c : concepts) {
      q.outcomes.push_back(c);
      for (const std::string& d : v.descendants(c)) q.outcomes.push_back(d);
    }
  }
  std::string error;
  std::vector<SearchHit> hits = session.index->search(q, &error);
  if (!error.empty()) {
    std::cerr << "readyby: catalogue search failed: " << error << "\n";
    return kExitBadInput;
  }
  bool close = !hits.empty() && hits.front().coverage >= kCloseMatch;
  if (o.format == "json") {
    std::string out = "{\"query\": " + json_quote(o.text) + ", \"setting\": " + json_quote(o.setting) +
                      ", \"outcomes\": " + json_list(q.outcomes) + ", \"searched\": " +
                      std::to_string(session.index->size()) + ", \"close_match\": " + (close ? "true" : "false") +
                      ", \"results\": [";
    for (size_t i = 0; i < hits.size(); ++i) {
      const SearchHit& h = hits[i];
      char score[32], relevance[32];
      std::snprintf(score, sizeof score, "%.4f", h.score);
      std::snprintf(relevance, sizeof relevance, "%.2f", h.coverage);
      out += std::string(i ? ",\n  " : "\n  ") + "{\"rank\": " + std::to_string(i + 1) + ", \"id\": " + json_quote(h.id) +
             ", \"name\": " + json_quote(h.name) + ", \"kind\": " + json_quote(h.kind) +
             ", \"outcome\": " + json_quote(h.outcome) + ", \"settings\": " + json_list(h.settings) +
             ", \"relevance\": " + relevance + ", \"score\": " + score + "}";
    }
    out += "],\n \"cautions\": " + json_list(catalogue_cautions()) + "}\n";
    std::fputs(out.c_str(), stdout);
    return kExitOk;
  }
  std::printf("%zu match%s for \"%s\" among %zu entries\n", hits.size(), hits.size() == 1 ? "" : "es", o.text.c_str(),
              session.index->size());
  if (hits.empty()) {
    std::printf("no entry is a close match: no entry contains these words\n");
  } else if (!close) {
    std::printf("no entry is a close match: the best holds %.0f%% of the query (a close match holds %.0f%%); the "
                "nearest are listed\n",
                100 * hits.front().coverage, 100 * kCloseMatch);
  }
  for (size_t i = 0; i < hits.size(); ++i) {
    const SearchHit& h = hits[i];
    const Term* t = v.outcome(h.outcome);
    std::printf("%3zu. %-32s %4.2f  %s [%s] -> %s\n", i + 1, h.id.c_str(), h.coverage, h.name.c_str(), h.kind.c_str(),
                t ? t->label.c_str() : h.outcome.c_str());
  }
  print_cautions("  ");
  return kExitOk;
}

void print_entry(const Entry& e, const Vocabulary& v) {
  auto label = [](const auto* term, const std::string& id) { return term ? term->label + " (" + id + ")" : id; };
  std::printf("%s — %s [%s]\n", e.id.c_str(), e.name.c_str(), e.kind.c_str());
  std::printf("  %s\n", e.summary.c_str());
  std::printf("  outcome:     %s%s\n", label(v.outcome(e.outcome), e.outcome).c_str(),
              e.outcome_detail.empty() ? "" : (": " + e.outcome_detail).c_str());
  std::printf("  horizon:     %s\n", e.horizon ? e.horizon->str().c_str() : "not stated");
  std::string ages = e.age_min || e.age_max ? (e.age_min ? std::to_string(*e.age_min) : "0") + "-" +
                                                  (e.age_max ? std::to_string(*e.age_max) : "") + " years"
                                            : "ages not stated";
  std::printf("  population:  %s%s\n", ages.c_str(), e.condition.empty() ? "" : ("; " + e.condition).c_str());
  std::string settings;
  for (const std::string& s : e.settings) settings += (settings.empty() ? "" : ", ") + label(v.setting(s), s);
  std::printf("  settings:    %s\n", settings.c_str());
  std::printf("  time point:  %s\n", label(v.time_point(e.time_point), e.time_point).c_str());
  std::printf("  inputs:\n");
  for (const EntryInput& in : e.inputs) {
    const Element* el = v.element(in.element);
    std::string points = in.points ? (*in.points >= 0 ? "+" : "") + std::to_string(*in.points) : "";
    if (in.per) points += " " + in.per->str();
    std::printf("    %-4s %-40s %s%s%s\n", points.c_str(), in.element.c_str(), in.label.c_str(),
                in.recency ? (" (within " + format_duration(*in.recency) + ")").c_str() : "",
                el && !el->structured ? " [usually not a structured field]" : "");
  }
  if (e.score_range) std::printf("  score range: %s\n", e.score_range->str().c_str());
  for (const Performance& p : e.performance) {
    std::printf("  performance: %s %.3g (%s)\n", p.metric.c_str(), p.value, p.cohort.c_str());
  }
  std::printf("  reference:   %s\n", e.reference().c_str());
  std::printf("  provenance:  %s%s\n", e.provenance.c_str(),
              e.provenance == "from-memory" ? " (not checked against the primary publication)" : "");
  std::printf("  file:        %s\n", e.path.c_str());
}

int catalog_show(std::vector<std::string> args) {
  std::vector<std::string> registries;
  std::vector<std::string> ids_given;
  ArgTable table{{registry_rule(&registries)}, [&ids_given](const std::string& id) {
                   ids_given.push_back(id);
                   return std::string();
                 }};
  std::string problem = parse_args(args, table);
  if (problem.empty() && ids_given.size() != 1) problem = "catalog show needs one entry ID";
  if (!problem.empty()) return usage_error(problem, self().usage);
  args = ids_given;
  CatalogSession session;
  if (int rc = open_catalog(registries, true, &session); rc != kExitOk) return rc;
  std::string error;
  std::optional<Entry> entry = session.index->entry(args[0], &error);
  if (!entry) {
    if (!error.empty()) {
      std::cerr << "readyby: " << error << "\n";
      return kExitBadInput;
    }
    std::vector<std::string> ids;
    for (const Entry& e : session.index->entries(&error)) ids.push_back(e.id);
    std::cerr << "readyby: no catalogue entry '" << args[0] << "'" << did_you_mean(args[0], ids) << "\n";
    return kExitBadInput;
  }
  print_entry(*entry, session.vocabulary);
  print_cautions("  ");
  return kExitOk;
}

}  // namespace

int cmd_catalog(const std::vector<std::string>& args) {
  const std::vector<std::string> subcommands = {"validate", "search", "show"};
  if (args.empty() || args[0] == "-h" || args[0] == "--help") {
    if (args.empty()) return usage_error("catalog needs a subcommand: validate, search or show", self().usage);
    std::fputs(self().usage, stdout);
    return kExitOk;
  }
  std::vector<std::string> rest(args.begin() + 1, args.end());
  if (wants_help(rest, self().usage)) return kExitOk;
  if (args[0] == "validate") return catalog_validate(rest);
  if (args[0] == "search") return catalog_search(rest);
  if (args[0] == "show") return catalog_show(rest);
  return usage_error("unknown catalog subcommand '" + args[0] + "'" + did_you_mean(args[0], subcommands), self().usage);
}

}  // namespace readyby
