#include "report/intake_report.h"

namespace readyby {

namespace {

// A table cell: pipes escaped, line breaks flattened.
std::string cell(const std::string& s) {
  std::string out;
  for (char c : s) {
    if (c == '|') out += "\\|";
    else if (c == '\n') out += ' ';
    else out += c;
  }
  return out.empty() ? "—" : out;
}

std::string code_list(const std::vector<std::string>& items) {
  std::string out;
  for (const std::string& s : items) out += (out.empty() ? "`" : ", `") + s + "`";
  return out;
}

void timing_section(const IntakeReport& r, std::string* out) {
  const TimingSummary& t = r.timing;
  const Zone* zone = r.plan->models[static_cast<size_t>(r.model)].zone;
  *out += "\n#### Timing: " + std::string(to_string(t.verdict)) + "\n\n";
  *out += "| runs | ok | degraded | failed | tightest slack |\n|---:|---:|---:|---:|---|\n";
  *out += "| " + std::to_string(t.runs) + " | " + std::to_string(t.ok) + " | " + std::to_string(t.degraded) + " | " +
          std::to_string(t.failed) + " | " +
          (t.tightest_slack_seconds ? human_duration(*t.tightest_slack_seconds) + " (" +
                                          format_local(zone->to_local(*t.tightest_at)) + ")"
                                    : std::string("—")) +
          " |\n";
  if (t.patterns.empty()) return;
  *out += "\n| failure | runs | late chain | cheapest fix |\n|---|---:|---|---|\n";
  for (const TimingPattern& p : t.patterns) {
    std::string chain;
    for (const std::string& n : p.chain) chain += (chain.empty() ? "`" : " → `") + n + "`";
    *out += "| " + cell(p.description) + " | " + std::to_string(p.runs) + " | " + chain + " | " +
            cell(p.cheapest ? p.cheapest->text : "") + " |\n";
  }
}

void reuse_section(const IntakeReport& r, std::string* out) {
  *out += "\n#### Established scores\n\n" + cell(r.reuse.summary) + "\n";
  size_t related = 0;
  bool header = false;
  for (const Candidate& c : r.reuse.candidates) {
    if (c.coverage == Coverage::related) {
      ++related;
      continue;
    }
    if (!header) *out += "\n| # | entry | kind | coverage | reference |\n|---:|---|---|---|---|\n";
    header = true;
    *out += "| " + std::to_string(c.rank) + " | " + cell(c.entry->name) + " (`" + c.entry->id + "`) | " +
            (c.in_house ? "in-house" : c.entry->kind) + " | " + to_string(c.coverage) + " | " +
            cell(c.entry->reference()) + " |\n";
  }
  if (related) *out += "\n" + std::to_string(related) + " more entries are only related (`readyby reuse` lists them).\n";
}

void feasibility_section(const IntakeReport& r, std::string* out) {
  const Feasibility& f = r.feasibility;
  if (f.candidates.empty()) return;
  *out += "\n#### Can they run on this plan? (" + std::to_string(f.runs.size()) + " runs of `" + r.timing.model +
          "`)\n\n| entry | computable | on time | late | missing | rarely structured |\n|---|---|---|---|---|---|\n";
  for (const CandidateCheck& c : f.candidates) {
    std::string late;
    for (const InputCheck& in : c.inputs) {
      if (in.status == InputStatus::late) late += (late.empty() ? "" : "; ") + ("`" + in.element + "` " + in.late_when);
    }
    *out += "| " + cell(c.entry->name) + " | **" + to_string(c.computable) + "** | " +
            cell(code_list(c.elements_with(InputStatus::on_time))) + " | " + cell(late) + " | " +
            cell(code_list(c.elements_with(InputStatus::missing))) + " | " +
            cell(code_list(c.elements_with(InputStatus::unstructured))) + " |\n";
  }
}

}  // namespace

std::string intake_markdown(const IntakeReport& r) {
  const Model& model = r.plan->models[static_cast<size_t>(r.model)];
  const IntakeRecommendation& rec = r.recommendation;
  std::string out = "### Intake screening: `" + r.proposal->id + "`\n\n";
  if (!r.proposal->title.empty()) out += cell(r.proposal->title) + "  \n";
  out += "Plan `" + r.plan->id + "`, model `" + model.id + "` (" + model.zone->name() + "), runs " +
         format_date(r.from) + " to " + format_date(r.from + date::days(r.days - 1)) + ".\n";
  out += "\n**Recommendation: " + std::string(to_string(rec.decision)) + ".** " + rec.summary + ".\n\n";
  for (const std::string& reason : rec.reasons) out += "- " + reason + "\n";
  timing_section(r, &out);
  reuse_section(r, &out);
  feasibility_section(r, &out);
  out += intake_forecast_markdown(r);
  out += "\n#### Cautions\n\n";
  for (const std::string& c : catalogue_cautions()) out += "- " + c + "\n";
  out += "\n<sub>Screened by readyby from schedules and catalogue metadata only; no patient data.</sub>\n";
  return out;
}

}  // namespace readyby
