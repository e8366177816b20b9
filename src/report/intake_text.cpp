#include "report/intake_report.h"

namespace readyby {

namespace {

// Pads to `width` characters (UTF-8 aware), always leaving one space after.
std::string pad(const std::string& s, size_t width) {
  size_t chars = 0;
  for (unsigned char c : s) chars += (c & 0xC0) != 0x80;
  return chars >= width ? s + " " : s + std::string(width - chars, ' ');
}

std::string join(const std::vector<std::string>& items, const char* sep) {
  std::string out;
  for (const std::string& s : items) out += (out.empty() ? "" : sep) + s;
  return out;
}

void timing_section(const IntakeReport& r, std::string* out) {
  const TimingSummary& t = r.timing;
  const Zone* zone = r.plan->models[static_cast<size_t>(r.model)].zone;
  *out += "\ntiming: " + std::string(to_string(t.verdict)) + " — " + std::to_string(t.runs) + " runs: " +
          std::to_string(t.ok) + " ok, " + std::to_string(t.degraded) + " degraded, " + std::to_string(t.failed) +
          " failed";
  if (t.tightest_slack_seconds) {
    *out += "; tightest slack " + human_duration(*t.tightest_slack_seconds) + " (" +
            format_local(zone->to_local(*t.tightest_at)) + ")";
  }
  *out += "\n";
  if (!t.degraded_features.empty()) {
    *out += "  degraded: optional " + join(t.degraded_features, ", ") + " not always fresh\n";
  }
  for (const TimingPattern& p : t.patterns) {
    *out += "  ✗ " + p.description + "\n";
    *out += "      not fresh: " + join(p.failing_features, ", ") + "; chain: " + join(p.chain, " → ") + "\n";
    if (p.data_fix) *out += "      fix: " + p.data_fix->text + "\n";
    if (p.later_start) *out += "      or: " + p.later_start->text + "\n";
  }
}

void reuse_section(const IntakeReport& r, std::string* out) {
  const ReuseReport& reuse = r.reuse;
  *out += "\nestablished scores: " + reuse.summary + "\n";
  size_t related = 0;
  for (const Candidate& c : reuse.candidates) {
    if (c.coverage == Coverage::related) {
      ++related;
      continue;
    }
    *out += "  #" + std::to_string(c.rank) + " " + pad(c.entry->name, 34) + pad("[" + c.entry->id + "]", 26) +
            pad(to_string(c.coverage), 8) + pad(c.in_house ? "in-house" : c.entry->kind, 9) +
            (c.in_house ? "not published" : c.evidence.brief()) + "\n";
  }
  if (related) *out += "  (" + std::to_string(related) + " related entries only; see 'readyby reuse')\n";
}

void feasibility_section(const IntakeReport& r, std::string* out) {
  const Feasibility& f = r.feasibility;
  if (f.candidates.empty()) return;
  *out += "\ncan they run on this plan? (inputs checked at the " + std::to_string(f.runs.size()) + " runs of " +
          r.timing.model + ")\n";
  for (const CandidateCheck& c : f.candidates) {
    *out += "  " + c.entry->name + " [" + c.entry->id + "] " + to_string(c.coverage) +
            " — computable: " + to_string(c.computable) + "\n";
    *out += "    " + pad("element", 32) + pad("feature", 22) + pad("age", 7) + "status\n";
    for (const InputCheck& in : c.inputs) {
      std::string status = to_string(in.status);
      if (in.status == InputStatus::late || (in.status == InputStatus::unstructured && !in.late_runs.empty())) {
        status += " " + in.late_when;
      }
      *out += "    " + pad(in.element, 32) + pad(in.available() ? in.feature_id : "—", 22) +
              pad(in.available() ? human_duration(in.allowed_age.seconds) : "—", 7) + status + "\n";
    }
  }
}

}  // namespace

std::string intake_text(const IntakeReport& r) {
  const Model& model = r.plan->models[static_cast<size_t>(r.model)];
  const IntakeRecommendation& rec = r.recommendation;
  std::string out = "readyby intake: proposal " + r.proposal->id +
                    (r.proposal->title.empty() ? "" : " — " + r.proposal->title) + "\n";
  out += "plan " + r.plan->id + ", model " + model.id + " (" + model.zone->name() + "); runs with local dates " +
         format_date(r.from) + " to " + format_date(r.from + date::days(r.days - 1)) + " (" +
         std::to_string(r.days) + " days)\n";
  out += "\nrecommendation: " + std::string(to_string(rec.decision)) + "\n  " + rec.summary + "\n";
  for (const std::string& reason : rec.reasons) out += "  - " + reason + "\n";
  timing_section(r, &out);
  reuse_section(r, &out);
  feasibility_section(r, &out);
  out += "\ncautions:\n";
  for (const std::string& c : catalogue_cautions()) out += "  - " + c + "\n";
  return out;
}

}  // namespace readyby
