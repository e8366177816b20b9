// The forecast section of the intake report in text, Markdown and JSON.
#include <cstdio>

#include "report/forecast_report.h"
#include "report/intake_report.h"
#include "time/zone.h"
#include "util/text.h"

namespace readyby {

namespace {

std::string number(double v) {
  char buffer[32];
  std::snprintf(buffer, sizeof buffer, "%.4f", v);
  return buffer;
}

std::string percent(double v) {
  char buffer[16];
  std::snprintf(buffer, sizeof buffer, "%.0f%%", v * 100);
  return buffer;
}

const std::string& id_of(const Plan& plan, int node) { return plan.nodes[static_cast<size_t>(node)].id; }

std::string unit(const IntakeForecast& f) { return f.daily ? "days" : "runs"; }

std::string late_text(const Plan& plan, const TargetForecast& t) {
  if (t.most_often_late < 0) return "";
  return "; most often late: " + id_of(plan, t.most_often_late) + " (" + percent(t.most_often_late_share) +
         " of late " + std::string("runs") + ")";
}

std::string inputs_text(const CandidateForecast& c) {
  const std::string n = std::to_string(c.inputs_forecast);
  if (c.inputs_forecast == c.inputs_total) return c.inputs_total == 1 ? "its input" : "its " + n + " inputs";
  return "its " + n + " available input" + (c.inputs_forecast == 1 ? "" : "s") + " (of " +
         std::to_string(c.inputs_total) + ")";
}

std::string header(const IntakeReport& r) {
  const IntakeForecast& f = *r.forecast;
  return "forecast from the landing history (" + std::to_string(f.options.draws) + " draws, seed " +
         std::to_string(f.options.seed) + "; landings recorded before " + format_date(r.from) + ")";
}

std::string target_json(const Plan& plan, const TargetForecast& t) {
  std::string out = "\"runs\": " + std::to_string(t.runs) + ", \"probability\": " + (t.runs ? number(t.probability) : "null") +
                    ", \"interval\": " +
                    (t.interval ? "[" + number(t.interval->low) + ", " + number(t.interval->high) + "]" : "null") +
                    ", \"most_often_late\": ";
  if (t.most_often_late < 0) return out + "null";
  return out + "{\"node\": " + json_quote(id_of(plan, t.most_often_late)) +
         ", \"share\": " + number(t.most_often_late_share) + "}";
}

}  // namespace

std::string intake_forecast_text(const IntakeReport& r) {
  if (!r.forecast) return "";
  const IntakeForecast& f = *r.forecast;
  const Plan& plan = *r.plan;
  std::string out = "\n" + header(r) + ":\n";
  out += "  " + r.timing.model + "'s runs would have every input fresh on " +
         percent_with_interval(f.model.probability, f.model.interval) + " of " + unit(f) + late_text(plan, f.model) +
         "\n";
  for (const CandidateForecast& c : f.candidates) {
    out += "  " + c.entry->name + " [" + c.entry->id + "]: " + inputs_text(c) + " would all be fresh on " +
           percent_with_interval(c.forecast.probability, c.forecast.interval) + " of " + unit(f) +
           late_text(plan, c.forecast) + "\n";
  }
  for (const std::string& w : landing_warnings(plan, f.models)) out += "  ! " + w + "\n";
  const std::vector<std::string> notes = forecast_notes(plan, f.unmonitored);
  out += "  - " + notes.front() + "\n";
  if (!f.unmonitored.empty()) out += "  - " + notes.back() + "\n";
  return out;
}

std::string intake_forecast_markdown(const IntakeReport& r) {
  if (!r.forecast) return "";
  const IntakeForecast& f = *r.forecast;
  const Plan& plan = *r.plan;
  auto row = [&](const std::string& what, const std::string& inputs, const TargetForecast& t) {
    std::string interval = t.interval ? percent(t.interval->low) + "–" + percent(t.interval->high) : "—";
    std::string late = t.most_often_late < 0 ? "—"
                                             : "`" + id_of(plan, t.most_often_late) + "` (" +
                                                   percent(t.most_often_late_share) + ")";
    return "| " + what + " | " + inputs + " | " + percent(t.probability) + " | " + interval + " | " + late + " |\n";
  };
  std::string out = "\n#### Forecast from the landing history\n\n";
  out += "Share of " + unit(f) + " on which every input would be fresh, from " + std::to_string(f.options.draws) +
         " draws of the feeds' recorded landings before " + format_date(r.from) + " (seed " +
         std::to_string(f.options.seed) + ").\n\n";
  out += "| | inputs | fresh | 95% interval | most often late |\n|---|---|---:|---|---|\n";
  out += row("`" + r.timing.model + "` (proposed)", "its features", f.model);
  for (const CandidateForecast& c : f.candidates) {
    out += row(c.entry->name, std::to_string(c.inputs_forecast) + " of " + std::to_string(c.inputs_total), c.forecast);
  }
  for (const std::string& w : landing_warnings(plan, f.models)) out += "\n> " + w;
  out += "\n" + forecast_notes(plan, f.unmonitored).front() + "\n";
  return out;
}

std::string intake_forecast_json(const IntakeReport& r) {
  if (!r.forecast) return "null";
  const IntakeForecast& f = *r.forecast;
  const Plan& plan = *r.plan;
  std::string out = "{\"draws\": " + std::to_string(f.options.draws) + ", \"seed\": " + std::to_string(f.options.seed) +
                    ", \"unit\": " + json_quote(unit(f)) + ",\n  \"model\": {" + target_json(plan, f.model) +
                    "},\n  \"candidates\": [";
  for (size_t i = 0; i < f.candidates.size(); ++i) {
    const CandidateForecast& c = f.candidates[i];
    out += std::string(i ? ",\n   " : "\n   ") + "{\"id\": " + json_quote(c.entry->id) +
           ", \"name\": " + json_quote(c.entry->name) + ", \"inputs_forecast\": " + std::to_string(c.inputs_forecast) +
           ", \"inputs_total\": " + std::to_string(c.inputs_total) + ", " + target_json(plan, c.forecast) + "}";
  }
  std::vector<std::string> unmonitored;
  for (int n : f.unmonitored) unmonitored.push_back(id_of(plan, n));
  out += "],\n  \"unmonitored\": " + json_list(unmonitored) +
         ",\n  \"warnings\": " + json_list(landing_warnings(plan, f.models)) +
         ",\n  \"notes\": " + json_list(forecast_notes(plan, f.unmonitored)) + "}";
  return out;
}

}  // namespace readyby
