#include "report/html/intake_section.h"

#include "report/html/markup.h"
#include "report/html/palette.h"

namespace readyby::html {

namespace {

std::string join(const std::vector<std::string>& items) {
  std::string out;
  for (const std::string& s : items) out += (out.empty() ? "" : ", ") + s;
  return out;
}

const char* input_class(InputStatus s) {
  switch (s) {
    case InputStatus::on_time: return "c-ok";
    case InputStatus::late: return "c-fail";
    case InputStatus::missing: return "c-fail";
    case InputStatus::unstructured: return "c-degraded";
  }
  return "";
}

void recommendation(std::string& out, const IntakeReport& r) {
  const IntakeRecommendation& rec = r.recommendation;
  out += "<div class=\"decision\" data-decision=\"" + std::string(to_string(rec.decision)) +
         "\"><p class=\"decision-word\">" + esc(to_string(rec.decision)) + "</p><p>" + esc(rec.summary) + "</p>";
  if (!rec.reasons.empty()) {
    out += "<ul>";
    for (const std::string& reason : rec.reasons) out += "<li>" + esc(reason) + "</li>";
    out += "</ul>";
  }
  out += "</div>";
}

void timing(std::string& out, const IntakeReport& r) {
  const TimingSummary& t = r.timing;
  const Zone* zone = r.plan->models[static_cast<size_t>(r.model)].zone;
  out += "<h3>Timing of " + esc(t.model) + ": " + esc(to_string(t.verdict)) + "</h3>";
  out += "<table class=\"grid\"><thead><tr><th scope=\"col\">runs</th><th scope=\"col\">ok</th>"
         "<th scope=\"col\">degraded</th><th scope=\"col\">failed</th><th scope=\"col\">tightest slack</th></tr></thead>"
         "<tbody><tr><td class=\"n\">" + std::to_string(t.runs) + "</td><td class=\"n\">" + std::to_string(t.ok) +
         "</td><td class=\"n\">" + std::to_string(t.degraded) + "</td><td class=\"n" +
         (t.failed ? " c-fail" : "") + "\">" + std::to_string(t.failed) + "</td><td>" +
         (t.tightest_slack_seconds ? esc((*t.tightest_slack_seconds >= 0 ? human_duration(*t.tightest_slack_seconds)
                                                                          : "late by " + human_duration(-*t.tightest_slack_seconds)) +
                                         " (" +
                                         format_local(zone->to_local(*t.tightest_at)) + ")")
                                   : std::string("—")) +
         "</td></tr></tbody></table>";
  if (!t.degraded_features.empty()) {
    out += "<p>Degraded: optional " + esc(join(t.degraded_features)) + " not always fresh.</p>";
  }
  if (t.patterns.empty()) return;
  out += "<table class=\"grid\"><thead><tr><th scope=\"col\">pattern</th><th scope=\"col\">runs</th>"
         "<th scope=\"col\">late chain</th><th scope=\"col\">cheapest fix</th></tr></thead><tbody>";
  for (const TimingPattern& p : t.patterns) {
    std::string chain;
    for (const std::string& n : p.chain) chain += (chain.empty() ? "" : " → ") + n;
    out += "<tr><td>" + esc(p.description) + "</td><td class=\"n\">" + std::to_string(p.runs) + "</td><td>" +
           esc(chain) + "</td><td>" + esc(p.cheapest ? p.cheapest->text + " (" + p.cheapest->effect + ")" : p.no_fix) +
           "</td></tr>";
  }
  out += "</tbody></table>";
}

void candidates(std::string& out, const IntakeReport& r) {
  const ReuseReport& reuse = r.reuse;
  out += "<h3>Established scores and in-house models</h3><p>" + esc(reuse.summary) + "</p>";
  size_t related = 0;
  bool any = false;
  for (const Candidate& c : reuse.candidates) {
    if (c.coverage == Coverage::related) {
      ++related;
      continue;
    }
    if (!any) {
      out += "<table class=\"grid\"><thead><tr><th scope=\"col\">rank</th><th scope=\"col\">candidate</th>"
             "<th scope=\"col\">coverage</th><th scope=\"col\">criteria</th><th scope=\"col\">source</th></tr></thead><tbody>";
      any = true;
    }
    std::string criteria;
    for (const Criterion& k : c.criteria) {
      const char* cls = k.level == 2 ? "c-ok" : k.level == 1 ? "c-degraded" : "c-fail";
      criteria += "<li class=\"" + std::string(cls) + "\"><strong>" + esc(k.name) + "</strong> " + esc(k.result) +
                  ": " + esc(k.detail) + "</li>";
    }
    std::string source = c.in_house ? "in-house model" : c.entry->kind;
    if (!c.entry->provenance.empty()) source += "; provenance " + c.entry->provenance;
    out += "<tr><td class=\"n\">" + std::to_string(c.rank) + "</td><td><strong>" + esc(c.entry->name) + "</strong><br>" +
           esc(c.entry->id) + "</td><td>" + esc(to_string(c.coverage)) + "</td><td><ul class=\"criteria\">" + criteria +
           "</ul></td><td>" + esc(source) + "<br><span class=\"soft\">" + esc(c.entry->reference()) +
           "</span></td></tr>";
  }
  if (any) out += "</tbody></table>";
  if (related) {
    out += "<p class=\"note\">" + std::to_string(related) + " further entries only relate to the outcome (see "
           "<code>readyby reuse</code>).</p>";
  }
}

void feasibility(std::string& out, const IntakeReport& r) {
  const Feasibility& f = r.feasibility;
  if (f.candidates.empty()) return;
  out += "<h3>Can they run on this plan?</h3><p>Inputs checked at the " + std::to_string(f.runs.size()) + " runs of " +
         esc(r.timing.model) + ".</p>";
  for (const CandidateCheck& c : f.candidates) {
    out += "<table class=\"grid\"><caption>" + esc(c.entry->name) + " (" + esc(to_string(c.coverage)) +
           "): computable " + esc(to_string(c.computable)) +
           "</caption><thead><tr><th scope=\"col\">element</th><th scope=\"col\">feature</th>"
           "<th scope=\"col\">allowed age</th><th scope=\"col\">status</th></tr></thead><tbody>";
    for (const InputCheck& in : c.inputs) {
      std::string status = to_string(in.status);
      if (!in.late_when.empty()) status += " " + in.late_when;
      out += "<tr><td>" + esc(in.label.empty() ? in.element : in.label + " (" + in.element + ")") + "</td><td>" +
             (in.available() ? esc(in.feature_id) : "—") + "</td><td>" +
             (in.available() ? esc(human_duration(in.allowed_age.seconds)) : "—") + "</td><td class=\"" +
             input_class(in.status) + "\">" + esc(status) + "</td></tr>";
    }
    out += "</tbody></table>";
  }
}

}  // namespace

void write_intake_section(std::string& out, const IntakeReport& r) {
  const Proposal& p = *r.proposal;
  out += "<p>Proposal <strong>" + esc(p.id) + "</strong>" + (p.title.empty() ? "" : ": " + esc(p.title)) +
         ". Outcome " + esc(p.outcome) + "; model " + esc(r.timing.model) + " of plan " + esc(r.plan->id) +
         ", checked over " + std::to_string(r.days) + " days from " + format_date(r.from) + ".</p>";
  recommendation(out, r);
  timing(out, r);
  candidates(out, r);
  feasibility(out, r);
  out += "<div class=\"cautions\" role=\"note\"><h3>Cautions</h3><ul>";
  for (const std::string& c : catalogue_cautions()) out += "<li>" + esc(c) + "</li>";
  out += "</ul></div>";
}

}  // namespace readyby::html
