#include "report/reuse_writer.h"

#include <cstdio>

#include "util/text.h"

namespace readyby {

namespace {

std::string concept_list(const std::vector<std::string>& ids, const Vocabulary& v) {
  std::string out;
  for (const std::string& id : ids) {
    const Term* t = v.outcome(id);
    out += (out.empty() ? "" : ", ") + id + (t ? " (" + t->label + ")" : "");
  }
  return out;
}

std::string evidence_json(const Evidence& e) {
  char c[32] = "null";
  if (e.c_statistic) std::snprintf(c, sizeof c, "%.3g", *e.c_statistic);
  return std::string("{\"checked\": ") + (e.checked ? "true" : "false") + ", \"validated\": " +
         (e.validated ? "true" : "false") + ", \"c_statistic\": " + c +
         ", \"c_cohort\": " + (e.c_cohort.empty() ? "null" : json_quote(e.c_cohort)) + "}";
}

std::string relevance_text(double r) {
  char out[16];
  std::snprintf(out, sizeof out, "%.2f", r);
  return out;
}

}  // namespace

std::string reuse_json(const Proposal& proposal, const ReuseReport& report) {
  std::string out = "{\"proposal\": " + json_quote(proposal.id) + ", \"title\": " + json_quote(proposal.title) +
                    ", \"outcome\": " + json_quote(proposal.outcome) +
                    ", \"concepts\": " + json_list(report.resolution.concepts) +
                    ", \"unresolved\": " + json_list(report.resolution.unresolved) +
                    ", \"condition\": " + json_quote(proposal.condition) +
                    ", \"condition_concepts\": " + json_list(report.condition.concepts) +
                    ", \"searched\": " + std::to_string(report.searched) +
                    ", \"recommendation\": " + json_quote(to_string(report.recommendation)) +
                    ", \"summary\": " + json_quote(report.summary) + ", \"in_house\": " + json_list(report.in_house) +
                    ",\n \"candidates\": [";
  for (size_t i = 0; i < report.candidates.size(); ++i) {
    const Candidate& c = report.candidates[i];
    out += std::string(i ? ",\n  " : "\n  ") + "{\"id\": " + json_quote(c.entry->id) +
           ", \"name\": " + json_quote(c.entry->name) + ", \"kind\": " + json_quote(c.entry->kind) +
           ", \"coverage\": " + json_quote(to_string(c.coverage)) + ", \"rank\": " + std::to_string(c.rank) +
           ", \"in_house\": " + (c.in_house ? "true" : "false") + ", \"relation\": " + json_quote(to_string(c.relation)) +
           ", \"relevance\": " + relevance_text(c.relevance) + ", \"provenance\": " + json_quote(c.entry->provenance) +
           ", \"evidence\": " + evidence_json(c.evidence) + ", \"criteria\": [";
    for (size_t k = 0; k < c.criteria.size(); ++k) {
      const Criterion& cr = c.criteria[k];
      out += std::string(k ? ", " : "") + "{\"name\": " + json_quote(cr.name) + ", \"result\": " + json_quote(cr.result) +
             ", \"detail\": " + json_quote(cr.detail) + "}";
    }
    out += "], \"reference\": " + json_quote(c.entry->reference()) + "}";
  }
  out += report.candidates.empty() ? "],\n" : "],\n";
  out += " \"cautions\": " + json_list(catalogue_cautions()) + "}\n";
  return out;
}

std::string reuse_text(const Proposal& proposal, const ReuseReport& report, const Vocabulary& vocabulary,
                       size_t related_shown) {
  std::string out = "proposal " + proposal.id + (proposal.title.empty() ? "" : ": " + proposal.title) + "\n";
  out += "  outcome: \"" + proposal.outcome + "\" -> " +
         (report.resolution.concepts.empty() ? std::string("no concept") : concept_list(report.resolution.concepts, vocabulary)) + "\n";
  if (!report.resolution.unresolved.empty()) {
    std::string words;
    for (const std::string& w : report.resolution.unresolved) words += (words.empty() ? "'" : ", '") + w + "'";
    out += "  unresolved words: " + words + " (not in any outcome label or synonym)\n";
  }
  if (!proposal.condition.empty()) {
    out += "  condition: \"" + proposal.condition + "\" -> " +
           (report.condition.concepts.empty() ? std::string("no concept (compared by its words)")
                                              : concept_list(report.condition.concepts, vocabulary)) +
           "\n";
  }
  out += "  searched " + std::to_string(report.searched) + " catalogue entries\n\n";
  out += "recommendation: " + report.summary + "\n";
  for (const std::string& id : report.in_house) {
    for (const Candidate& c : report.candidates) {
      if (c.entry->id == id) out += "  already built in-house: " + c.entry->name + " (" + c.entry->reference() + ")\n";
    }
  }
  size_t related = 0;
  for (const Candidate& c : report.candidates) {
    if (c.coverage == Coverage::related && ++related > related_shown) continue;
    out += "\n#" + std::to_string(c.rank) + " " + c.entry->name + " [" + c.entry->id + ", " + c.entry->kind + "]: " +
           to_string(c.coverage) + (c.in_house ? " (in-house)" : "") + "\n";
    for (const Criterion& cr : c.criteria) {
      char head[48];
      std::snprintf(head, sizeof head, "  %-11s %-9s ", cr.name.c_str(), cr.result.c_str());
      out += head + cr.detail + "\n";
    }
    out += "  evidence    " + c.evidence.str() + "\n";
    out += "  relevance   " + relevance_text(c.relevance) + "\n";
    out += "  reference   " + c.entry->reference() + "\n";
  }
  if (related > related_shown) {
    out += "\n(" + std::to_string(related - related_shown) + " more related entries; --format json lists all)\n";
  }
  out += "\ncautions:\n";
  for (const std::string& c : catalogue_cautions()) out += "  - " + c + "\n";
  return out;
}

}  // namespace readyby
