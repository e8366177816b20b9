#include "report/reuse_writer.h"
#include "report/intake_report.h"
#include "util/text.h"

namespace readyby {

namespace {

std::string json_fix(const std::optional<TimingFix>& fix) {
  if (!fix) return "null";
  return "{\"kind\": " + json_quote(to_string(fix->kind)) + ", \"node\": " + json_quote(fix->node) +
         ", \"seconds\": " + std::to_string(fix->seconds) + ", \"text\": " + json_quote(fix->text) +
         ", \"edit\": " + json_quote(fix->edit) + ", \"effect\": " + json_quote(fix->effect) +
         ", \"breaks_others\": " + (fix->breaks_others ? "true" : "false") + "}";
}

std::string json_optional(const std::optional<int64_t>& v) { return v ? std::to_string(*v) : "null"; }

std::string timing_json(const IntakeReport& r) {
  const TimingSummary& t = r.timing;
  const Zone* zone = r.plan->models[static_cast<size_t>(r.model)].zone;
  std::string out = "{\"verdict\": " + json_quote(to_string(t.verdict)) + ", \"runs\": " + std::to_string(t.runs) +
                    ", \"ok\": " + std::to_string(t.ok) + ", \"degraded\": " + std::to_string(t.degraded) +
                    ", \"failed\": " + std::to_string(t.failed) +
                    ", \"tightest_slack_seconds\": " + json_optional(t.tightest_slack_seconds) +
                    ", \"tightest_at\": " + (t.tightest_at ? json_quote(format_rfc3339(*t.tightest_at, zone)) : "null") +
                    ", \"tightest_optional_slack_seconds\": " + json_optional(t.tightest_optional_seconds) +
                    ", \"degraded_features\": " + json_list(t.degraded_features) + ",\n  \"patterns\": [";
  for (size_t i = 0; i < t.patterns.size(); ++i) {
    const TimingPattern& p = t.patterns[i];
    out += std::string(i ? ",\n   " : "\n   ") + "{\"description\": " + json_quote(p.description) +
           ", \"status\": " + (p.degraded ? "\"degraded\"" : "\"fail\"") + ", \"runs\": " + std::to_string(p.runs) + ", \"failing_features\": " + json_list(p.failing_features) +
           ", \"chain\": " + json_list(p.chain) + ",\n    \"fix\": " + json_fix(p.data_fix) +
           ",\n    \"start_later\": " + json_fix(p.later_start) + ",\n    \"cheapest\": " + json_fix(p.cheapest) +
           ", \"cause\": " + (p.cause.empty() ? "null" : json_quote(p.cause)) +
           ", \"no_fix\": " + (p.no_fix.empty() ? "null" : json_quote(p.no_fix)) + "}";
  }
  return out + "]}";
}

std::string input_json(const InputCheck& in) {
  return "{\"element\": " + json_quote(in.element) + ", \"label\": " + json_quote(in.label) +
         ", \"recency\": " + (in.recency ? json_quote(format_duration(*in.recency)) : "null") +
         ", \"structured\": " + (in.structured ? "true" : "false") +
         ", \"feature\": " + (in.available() ? json_quote(in.feature_id) : "null") +
         ", \"model_feature\": " + (in.model_feature ? "true" : "false") +
         ", \"allowed_age\": " + (in.available() ? json_quote(format_duration(in.allowed_age)) : "null") +
         ", \"status\": " + json_quote(to_string(in.status)) + ", \"runs\": " + std::to_string(in.runs) +
         ", \"late_runs\": " + std::to_string(in.late_runs.size()) +
         ", \"late_when\": " + (in.late_when.empty() ? "null" : json_quote(in.late_when)) +
         ", \"worst_late_seconds\": " +
         (in.late_runs.empty() || in.worst_late_seconds == 0 ? "null" : std::to_string(in.worst_late_seconds)) +
         ", \"never\": " + (in.never ? "true" : "false") + "}";
}

std::string feasibility_json(const Feasibility& f) {
  std::string out = "[";
  for (size_t i = 0; i < f.candidates.size(); ++i) {
    const CandidateCheck& c = f.candidates[i];
    out += std::string(i ? ",\n  " : "\n  ") + "{\"id\": " + json_quote(c.entry->id) +
           ", \"name\": " + json_quote(c.entry->name) + ", \"coverage\": " + json_quote(to_string(c.coverage)) +
           ", \"in_house\": " + (c.in_house ? "true" : "false") + ", \"rank\": " + std::to_string(c.rank) +
           ", \"computable\": " + json_quote(to_string(c.computable)) +
           ", \"missing\": " + json_list(c.elements_with(InputStatus::missing)) +
           ", \"late\": " + json_list(c.elements_with(InputStatus::late)) +
           ", \"unstructured\": " + json_list(c.elements_with(InputStatus::unstructured)) + ",\n   \"inputs\": [";
    for (size_t k = 0; k < c.inputs.size(); ++k) out += std::string(k ? ",\n    " : "\n    ") + input_json(c.inputs[k]);
    out += "]}";
  }
  return out + "]";
}

std::string recommendation_json(const IntakeRecommendation& r) {
  std::string out = "{\"decision\": " + json_quote(to_string(r.decision)) + ", \"summary\": " + json_quote(r.summary) +
                    ", \"candidate\": " + (r.candidate.empty() ? "null" : json_quote(r.candidate)) +
                    ", \"cheapest_fix\": " + json_fix(r.cheapest_fix) + ",\n  \"reasons\": [";
  for (size_t i = 0; i < r.reasons.size(); ++i) out += std::string(i ? ",\n   " : "\n   ") + json_quote(r.reasons[i]);
  return out + "]}";
}

}  // namespace

std::string intake_json(const IntakeReport& r) {
  const Model& model = r.plan->models[static_cast<size_t>(r.model)];
  std::string reuse = reuse_json(*r.proposal, r.reuse);
  while (!reuse.empty() && reuse.back() == '\n') reuse.pop_back();
  return "{\"proposal\": " + json_quote(r.proposal->id) + ", \"title\": " + json_quote(r.proposal->title) +
         ", \"plan\": " + json_quote(r.plan->id) + ", \"model\": " + json_quote(model.id) +
         ", \"timezone\": " + json_quote(model.zone->name()) + ", \"from\": " + json_quote(format_date(r.from)) +
         ", \"days\": " + std::to_string(r.days) + ",\n \"timing\": " + timing_json(r) + ",\n \"reuse\": " + reuse +
         ",\n \"feasibility\": " + feasibility_json(r.feasibility) +
         ",\n \"recommendation\": " + recommendation_json(r.recommendation) +
         ",\n \"cautions\": " + json_list(catalogue_cautions()) + ",\n \"forecast\": " + intake_forecast_json(r) + "}\n";
}

}  // namespace readyby
