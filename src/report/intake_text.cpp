#include "report/intake_report.h"

#include <algorithm>

namespace readyby {

namespace {

// Characters of `s` (UTF-8 code points).
size_t chars_of(const std::string& s) {
  size_t chars = 0;
  for (unsigned char c : s) chars += (c & 0xC0) != 0x80;
  return chars;
}

// Pads to `width` characters (UTF-8 aware), always leaving one space after.
std::string pad(const std::string& s, size_t width) {
  size_t chars = chars_of(s);
  return chars >= width ? s + " " : s + std::string(width - chars, ' ');
}

// The width of a column: at least `min`, and one more than its longest cell,
// so that long names push the columns after them instead of breaking them.
template <typename Rows, typename Cell>
size_t column_width(const Rows& rows, size_t min, Cell cell) {
  size_t width = min;
  for (const auto& row : rows) width = std::max(width, chars_of(cell(row)) + 1);
  return width;
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
  if (t.tightest_optional_seconds) {
    *out += "; optional features: tightest slack " + human_duration(*t.tightest_optional_seconds);
  }
  *out += "\n";
  if (!t.degraded_features.empty()) {
    *out += "  degraded: optional " + join(t.degraded_features, ", ") + " not always fresh\n";
  }
  for (const TimingPattern& p : t.patterns) {
    *out += std::string(p.degraded ? "  ~ " : "  ✗ ") + p.description + "\n";
    *out += std::string(p.degraded ? "      optional, not fresh: " : "      not fresh: ") + join(p.failing_features, ", ") +
            "; chain: " + join(p.chain, " → ") + "\n";
    if (!p.cause.empty()) *out += "      cause: " + p.cause + "\n";
    const char* label = "fix: ";
    for (const std::optional<TimingFix>* fix : {&p.data_fix, &p.later_start}) {
      if (!*fix) continue;
      *out += std::string("      ") + label + (*fix)->text + "\n           " + (*fix)->effect + "\n";
      label = "or: ";
    }
    if (!p.no_fix.empty()) *out += "      fix: " + p.no_fix + "\n";
  }
}

void reuse_section(const IntakeReport& r, std::string* out) {
  const ReuseReport& reuse = r.reuse;
  *out += "\nestablished scores: " + reuse.summary + "\n";
  size_t related = 0;
  std::vector<const Candidate*> listed;
  for (const Candidate& c : reuse.candidates) {
    if (c.coverage == Coverage::related) ++related;
    else listed.push_back(&c);
  }
  const size_t rank_w = column_width(listed, 3, [](const Candidate* c) { return "#" + std::to_string(c->rank); });
  const size_t name_w = column_width(listed, 34, [](const Candidate* c) { return c->entry->name; });
  const size_t id_w = column_width(listed, 26, [](const Candidate* c) { return "[" + c->entry->id + "]"; });
  const size_t coverage_w = column_width(listed, 7, [](const Candidate* c) { return std::string(to_string(c->coverage)); });
  for (const Candidate* c : listed) {
    *out += "  " + pad("#" + std::to_string(c->rank), rank_w) + pad(c->entry->name, name_w) +
            pad("[" + c->entry->id + "]", id_w) + pad(to_string(c->coverage), coverage_w) +
            (c->in_house ? "in-house" : c->entry->kind) + "\n";
  }
  if (related) *out += "  (" + std::to_string(related) + " related entries only; see 'readyby reuse')\n";
}

void feasibility_section(const IntakeReport& r, std::string* out) {
  const Feasibility& f = r.feasibility;
  if (f.candidates.empty()) return;
  *out += "\ncan they run on this plan? (inputs checked at the " + std::to_string(f.runs.size()) + " runs of " +
          r.timing.model + ")\n";
  std::vector<const InputCheck*> all;
  for (const CandidateCheck& c : f.candidates) {
    for (const InputCheck& in : c.inputs) all.push_back(&in);
  }
  auto age = [](const InputCheck* in) { return in->available() ? human_duration(in->allowed_age.seconds) : "—"; };
  const size_t element_w = column_width(all, 32, [](const InputCheck* in) { return in->element; });
  const size_t feature_w =
      column_width(all, 22, [](const InputCheck* in) { return in->available() ? in->feature_id : "—"; });
  const size_t age_w = column_width(all, 7, age);
  for (const CandidateCheck& c : f.candidates) {
    *out += "  " + c.entry->name + " [" + c.entry->id + "] " + to_string(c.coverage) +
            " — computable: " + to_string(c.computable) + "\n";
    *out += "    " + pad("element", element_w) + pad("feature", feature_w) + pad("age", age_w) + "status\n";
    for (const InputCheck& in : c.inputs) {
      std::string status = to_string(in.status);
      if (in.status == InputStatus::late || (in.status == InputStatus::unstructured && !in.late_runs.empty())) {
        status += " " + in.late_when;
      }
      *out += "    " + pad(in.element, element_w) + pad(in.available() ? in.feature_id : "—", feature_w) +
              pad(age(&in), age_w) + status + "\n";
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
  out += intake_forecast_text(r);
  out += "\ncautions:\n";
  for (const std::string& c : catalogue_cautions()) out += "  - " + c + "\n";
  return out;
}

}  // namespace readyby
