#include <cstdio>

#include "report/forecast_report.h"
#include "time/calendar.h"
#include "time/zone.h"
#include "util/text.h"

namespace readyby {

namespace {

const std::string& id_of(const Plan& plan, int node) { return plan.nodes[static_cast<size_t>(node)].id; }

std::string number(double v) {
  char buffer[32];
  std::snprintf(buffer, sizeof buffer, "%.4f", v);
  return buffer;
}

std::string optional_seconds(const std::optional<int64_t>& v) { return v ? std::to_string(*v) : "null"; }

std::string summary_fields(const OutcomeSummary& s) {
  return "\"occurrences\": " + std::to_string(s.occurrences) + ", \"landings\": " + std::to_string(s.landings) +
         ", \"missing_rate\": " + number(s.missing_rate) +
         ", \"p50_offset_seconds\": " + optional_seconds(s.p50_offset_seconds) +
         ", \"p90_offset_seconds\": " + optional_seconds(s.p90_offset_seconds);
}

std::string nodes_json(const Plan& plan, const LandingModels& models) {
  std::string out = "[";
  for (size_t i = 0; i < models.models.size(); ++i) {
    const LandingModel& m = models.models[i];
    out += std::string(i ? ",\n  " : "\n  ") + "{\"node\": " + json_quote(id_of(plan, m.node)) +
           ", \"basis\": " + (m.basis == OffsetBasis::schedule ? "\"schedule\"" : "\"data-end\"") + ", " +
           summary_fields(m.pooled) + ",\n   \"by_weekday\": ";
    if (!m.by_weekday) {
      out += "null";
    } else {
      out += "[";
      bool first = true;
      for (int d = 1; d <= 7; ++d) {  // Monday first
        const OutcomeSummary& s = m.weekdays[static_cast<size_t>(d % 7)];
        if (s.occurrences == 0) continue;
        out += std::string(first ? "" : ", ") + "{\"weekday\": " + json_quote(weekday_name(d % 7)) + ", " +
               summary_fields(s) + "}";
        first = false;
      }
      out += "]";
    }
    std::vector<std::string> warnings;
    if (m.short_history) warnings.push_back("short");
    if (m.stale) warnings.push_back("stale");
    out += ",\n   \"last_landing\": " +
           (m.last_landing ? json_quote(format_rfc3339(*m.last_landing, plan.zone)) : std::string("null")) +
           ", \"warnings\": " + json_list(warnings) + "}";
  }
  return out + "]";
}

std::string string_list(const std::vector<std::string>& items) {
  std::string out = "[";
  for (size_t i = 0; i < items.size(); ++i) out += std::string(i ? ",\n  " : "\n  ") + json_quote(items[i]);
  return out + "]";
}

// The object's fields up to most_often_late; closed here only when there are no runs.
std::string forecast_json(const Plan& plan, const RunSpecForecast& f) {
  const Model& model = plan.models[static_cast<size_t>(f.model)];
  const RunSpec& spec = model.runs[static_cast<size_t>(f.spec)];
  const TargetForecast& t = f.forecast;
  std::string out = "{\"model\": " + json_quote(model.id) + ", \"at\": " + json_quote(spec.at.text) +
                    ", \"calendar\": " + (spec.calendar >= 0 ? json_quote(plan.calendar(spec.calendar).name) : "null") +
                    ", \"runs\": " + std::to_string(t.runs);
  if (t.runs == 0) {
    return out + ", \"probability\": null, \"interval\": null, \"monte_carlo_se\": null, \"most_often_late\": null, "
                 "\"lowest_run\": null}";
  }
  out += ", \"probability\": " + number(t.probability) + ", \"interval\": " +
         (t.interval ? "[" + number(t.interval->low) + ", " + number(t.interval->high) + "]" : std::string("null")) +
         ", \"monte_carlo_se\": " + number(t.standard_error) + ",\n   \"most_often_late\": ";
  out += t.most_often_late >= 0 ? "{\"node\": " + json_quote(id_of(plan, t.most_often_late)) +
                                      ", \"share\": " + number(t.most_often_late_share) + "}"
                                : std::string("null");
  return out;
}

std::string score_json(const ScoreCard& card) {
  std::string out = "{\"brier\": " + number(card.brier) + ", \"mean_forecast\": " + number(card.mean_forecast) +
                    ", \"calibration\": [";
  for (size_t i = 0; i < card.calibration.size(); ++i) {
    const CalibrationBin& b = card.calibration[i];
    out += std::string(i ? ",\n    " : "\n    ") + "{\"from\": " + number(b.low) + ", \"to\": " + number(b.high) +
           ", \"runs\": " + std::to_string(b.runs) + ", \"mean_forecast\": " + (b.runs ? number(b.mean_forecast) : "null") +
           ", \"observed_on_time\": " + (b.observed ? number(*b.observed) : "null") + "}";
  }
  return out + "]}";
}

}  // namespace

void write_forecast_json(std::ostream& out, const Plan& plan, const ForecastReport& r) {
  out << "{\"plan\": " << json_quote(plan.id) << ", \"from\": " << json_quote(format_date(r.from))
      << ", \"days\": " << r.days << ", \"draws\": " << r.options.draws << ", \"seed\": " << r.options.seed
      << ", \"replicates\": " << r.options.replicates << ", \"draws_per_replicate\": " << r.options.replicate_draws()
      << ",\n \"forecasts\": [";
  for (size_t i = 0; i < r.forecasts.size(); ++i) {
    const RunSpecForecast& f = r.forecasts[i];
    out << (i ? ",\n  " : "\n  ") << forecast_json(plan, f);
    const TargetForecast& t = f.forecast;
    if (t.runs == 0) continue;
    size_t lowest = 0;
    for (size_t k = 1; k < t.run_probability.size(); ++k) {
      if (t.run_probability[k] < t.run_probability[lowest]) lowest = k;
    }
    const Model& model = plan.models[static_cast<size_t>(f.model)];
    out << ", \"lowest_run\": {\"at\": " << json_quote(format_rfc3339(f.runs[lowest], model.zone))
        << ", \"probability\": " << number(t.run_probability[lowest]) << "}}";
  }
  out << "],\n \"nodes\": " << nodes_json(plan, r.models);
  std::vector<std::string> unmonitored;
  for (int n : r.unmonitored) unmonitored.push_back(id_of(plan, n));
  out << ",\n \"unmonitored\": " << json_list(unmonitored);
  out << ",\n \"warnings\": " << string_list(landing_warnings(plan, r.models));
  out << ",\n \"notes\": " << string_list(forecast_notes(plan, r.unmonitored)) << "}\n";
}

void write_backtest_json(std::ostream& out, const Plan& plan, const BacktestReport& r) {
  out << "{\"plan\": " << json_quote(plan.id) << ", \"backtest_from\": " << json_quote(format_date(r.from))
      << ", \"to\": " << json_quote(format_date(r.from + date::days(r.days - 1))) << ", \"days\": " << r.days
      << ", \"draws\": " << r.options.draws << ", \"seed\": " << r.options.seed << ", \"runs\": " << r.runs.size()
      << ",\n \"forecast\": " << score_json(r.forecast) << ",\n \"baseline\": " << score_json(r.baseline)
      << ",\n \"whole_days\": " << score_json(r.whole_days) << ",\n \"by_model\": [";
  for (size_t i = 0; i < r.by_model.size(); ++i) {
    const ModelBacktest& m = r.by_model[i];
    out << (i ? ",\n  " : "\n  ") << "{\"model\": " << json_quote(plan.models[static_cast<size_t>(m.model)].id)
        << ", \"runs\": " << m.runs << ", \"observed_on_time\": " << m.observed_on_time
        << ", \"declared_on_time\": " << m.declared_on_time << ", \"mean_forecast\": " << number(m.mean_forecast)
        << ", \"brier_forecast\": " << number(m.brier_forecast) << ", \"brier_baseline\": " << number(m.brier_baseline)
        << ", \"brier_whole_days\": " << number(m.brier_whole_days) << "}";
  }
  out << "],\n \"independence\": {\"brier_independent\": " << number(r.forecast.brier)
      << ", \"brier_whole_days\": " << number(r.whole_days.brier) << ", \"serial\": [";
  for (size_t i = 0; i < r.serial.size(); ++i) {
    const SerialDependence& s = r.serial[i];
    out << (i ? ", " : "") << "{\"node\": " << json_quote(id_of(plan, s.node)) << ", \"pairs\": " << s.pairs
        << ", \"lag1\": " << (s.lag1 ? number(*s.lag1) : "null") << "}";
  }
  out << "],\n  \"strongest_pair\": ";
  if (r.strongest_pair) {
    out << "{\"a\": " << json_quote(id_of(plan, r.strongest_pair->a)) << ", \"b\": "
        << json_quote(id_of(plan, r.strongest_pair->b)) << ", \"days\": " << r.strongest_pair->days
        << ", \"correlation\": " << number(r.strongest_pair->correlation) << "}";
  } else {
    out << "null";
  }
  out << "},\n \"nodes\": " << nodes_json(plan, r.models);
  out << ",\n \"warnings\": " << string_list(landing_warnings(plan, r.models));
  out << ",\n \"notes\": " << string_list(forecast_notes(plan, {})) << "}\n";
}

}  // namespace readyby
