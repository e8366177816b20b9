#include <cmath>
#include <cstdio>

#include "report/forecast_report.h"
#include "time/duration.h"
#include "time/zone.h"

namespace readyby {

namespace {

const std::string& id_of(const Plan& plan, int node) { return plan.nodes[static_cast<size_t>(node)].id; }

std::string fixed(double v, int decimals) {
  char buffer[32];
  std::snprintf(buffer, sizeof buffer, "%.*f", decimals, v);
  return buffer;
}

std::string percent(double v) {
  char buffer[16];
  std::snprintf(buffer, sizeof buffer, "%.0f%%", v * 100);
  return buffer;
}

// Pads to `width` characters (UTF-8 aware), always leaving one space after.
std::string pad(const std::string& s, size_t width) {
  size_t chars = 0;
  for (unsigned char c : s) chars += (c & 0xC0) != 0x80;
  return chars >= width ? s + " " : s + std::string(width - chars, ' ');
}

std::string right(const std::string& s, size_t width) {
  size_t chars = 0;
  for (unsigned char c : s) chars += (c & 0xC0) != 0x80;
  return chars >= width ? s : std::string(width - chars, ' ') + s;
}

std::string run_spec_text(const Plan& plan, const Model& model, int spec) {
  const RunSpec& s = model.runs[static_cast<size_t>(spec)];
  std::string out = "\"" + s.at.text + "\"";
  if (s.calendar >= 0) out += " (" + plan.calendar(s.calendar).name + ")";
  return out;
}

std::string offset_text(const std::optional<int64_t>& seconds) { return seconds ? human_duration(*seconds) : "—"; }

void landing_models_section(std::ostream& out, const Plan& plan, const LandingModels& models, LocalDays before) {
  if (models.models.empty()) {
    out << "\nno landings recorded before " << format_date(before) << ": every node keeps its declared timing\n";
    return;
  }
  out << "\nwhat the forecast stands on (landings recorded before " << format_date(before) << "):\n";
  out << "  " << pad("node", 22) << right("landings", 8) << right("missing", 9) << right("p50 offset", 12)
      << right("p90 offset", 12) << "  " << pad("declared", 10) << "distribution\n";
  for (const LandingModel& m : models.models) {
    const Node& node = plan.nodes[static_cast<size_t>(m.node)];
    std::string declared = "—";
    if (m.basis == OffsetBasis::schedule && node.kind == NodeKind::source) declared = human_duration(node.lands_after.seconds);
    else if (m.basis == OffsetBasis::schedule) declared = human_duration(node.run_time.seconds);
    std::string shape = m.by_weekday ? "by weekday" : "pooled";
    if (m.basis == OffsetBasis::data_end) shape += ", from data end every " + human_duration(m.cadence_seconds);
    out << "  " << pad(node.id, 22) << right(std::to_string(m.pooled.landings), 8)
        << right(fixed(m.pooled.missing_rate * 100, 1) + "%", 9) << right(offset_text(m.pooled.p50_offset_seconds), 12)
        << right(offset_text(m.pooled.p90_offset_seconds), 12) << "  " << pad(declared, 10) << shape << "\n";
  }
}

void list_section(std::ostream& out, const char* title, const char* bullet, const std::vector<std::string>& items) {
  if (items.empty()) return;
  out << "\n" << title << ":\n";
  for (const std::string& s : items) out << "  " << bullet << " " << s << "\n";
}

void calibration_section(std::ostream& out, const char* title, const ScoreCard& card) {
  out << "\n" << title << ":\n";
  out << "  " << pad("forecast", 11) << right("runs", 5) << right("mean forecast", 15) << right("observed on time", 18)
      << "\n";
  for (const CalibrationBin& bin : card.calibration) {
    if (bin.runs == 0) continue;
    out << "  " << pad(fixed(bin.low, 1) + "–" + fixed(bin.high, 1), 11) << right(std::to_string(bin.runs), 5)
        << right(percent(bin.mean_forecast), 15) << right(percent(*bin.observed), 18) << "\n";
  }
}

}  // namespace

void write_forecast_text(std::ostream& out, const Plan& plan, const ForecastReport& r) {
  out << "readyby forecast: plan " << plan.id << ", runs with local dates " << format_date(r.from) << " to "
      << format_date(r.from + date::days(r.days - 1)) << " (" << r.days << " days)\n";
  out << r.options.draws << " draws from the recorded landing history, seed " << r.options.seed;
  if (r.options.replicates > 0) {
    out << "; 95% intervals from " << r.options.replicates << " bootstrap resamples of the history";
  }
  out << "\n\n";
  out << "  " << pad("model", 20) << pad("runs at", 26) << right("runs", 5) << right("on time", 9) << "  "
      << pad("95% interval", 14) << "most often late\n";
  for (const RunSpecForecast& f : r.forecasts) {
    const Model& model = plan.models[static_cast<size_t>(f.model)];
    const TargetForecast& t = f.forecast;
    out << "  " << pad(model.id, 20) << pad(run_spec_text(plan, model, f.spec), 26) << right(std::to_string(t.runs), 5);
    if (t.runs == 0) {
      out << right("—", 9) << "\n";
      continue;
    }
    out << right(percent(t.probability), 9) << "  ";
    std::string interval = "—";
    if (t.interval) {
      interval = fixed(t.interval->low * 100, 0) + "–" + percent(t.interval->high);
      if (percent(t.interval->low) == percent(t.interval->high)) interval = percent(t.interval->low);
    }
    out << pad(interval, 14);
    if (t.most_often_late >= 0) {
      out << id_of(plan, t.most_often_late) << " (" << percent(t.most_often_late_share) << " of late runs)";
    } else {
      out << "never late in any draw";
    }
    out << "\n";
  }
  landing_models_section(out, plan, r.models, r.from);
  list_section(out, "warnings", "!", landing_warnings(plan, r.models));
  list_section(out, "notes", "-", forecast_notes(plan, r.unmonitored));
}

void write_backtest_text(std::ostream& out, const Plan& plan, const BacktestReport& r) {
  out << "readyby forecast --backtest-from " << format_date(r.from) << ": plan " << plan.id << "\n";
  out << "fitted on landings recorded before " << format_date(r.from) << "; scored on the " << r.forecast.runs
      << " runs with local dates " << format_date(r.from) << " to " << format_date(r.from + date::days(r.days - 1))
      << " against what nightly finds in the recorded landings (" << r.options.draws << " draws, seed "
      << r.options.seed << ")\n\n";
  int observed = 0;
  for (const BacktestRun& run : r.runs) observed += run.observed_ok;
  out << "  " << pad("", 30) << right("Brier", 7) << right("mean forecast", 15) << "\n";
  out << "  " << pad("forecast from history", 30) << right(fixed(r.forecast.brier, 3), 7)
      << right(percent(r.forecast.mean_forecast), 15) << "\n";
  out << "  " << pad("declared schedule (check)", 30) << right(fixed(r.baseline.brier, 3), 7)
      << right(percent(r.baseline.mean_forecast), 15) << "\n";
  out << "  observed on time: " << observed << " of " << r.runs.size() << " runs"
      << (r.runs.empty() ? "" : " (" + percent(static_cast<double>(observed) / static_cast<double>(r.runs.size())) + ")")
      << "; Brier 0 is perfect, always saying 50% scores 0.250\n";

  out << "\nby model:\n";
  out << "  " << pad("model", 20) << right("runs", 5) << right("on time", 9) << right("forecast", 10)
      << right("declared", 10) << right("Brier forecast", 16) << right("Brier declared", 16) << "\n";
  for (const ModelBacktest& m : r.by_model) {
    out << "  " << pad(plan.models[static_cast<size_t>(m.model)].id, 20) << right(std::to_string(m.runs), 5)
        << right(std::to_string(m.observed_on_time), 9) << right(percent(m.mean_forecast), 10)
        << right(percent(static_cast<double>(m.declared_on_time) / m.runs), 10) << right(fixed(m.brier_forecast, 3), 16)
        << right(fixed(m.brier_baseline, 3), 16) << "\n";
  }
  calibration_section(out, "calibration of the forecast", r.forecast);
  calibration_section(out, "calibration of the declared schedule", r.baseline);

  out << "\nindependence check (draws treat every delivery as independent):\n";
  out << "  - whole-day draws (each day takes every feed's landings from one recorded day of the same weekday): Brier "
      << fixed(r.whole_days.brier, 3) << " against " << fixed(r.forecast.brier, 3)
      << " for independent draws\n";
  const SerialDependence* strongest = nullptr;
  for (const SerialDependence& s : r.serial) {
    if (s.lag1 && (!strongest || std::abs(*s.lag1) > std::abs(*strongest->lag1))) strongest = &s;
  }
  if (strongest) {
    out << "  - consecutive deliveries of one feed: strongest lag-1 correlation " << fixed(*strongest->lag1, 2) << " ("
        << id_of(plan, strongest->node) << ", " << strongest->pairs
        << " pairs); a trend or a run of late days shows up here, and independent draws ignore it\n";
  }
  if (r.strongest_pair) {
    out << "  - feeds on the same day: strongest correlation " << fixed(r.strongest_pair->correlation, 2) << " ("
        << id_of(plan, r.strongest_pair->a) << " and " << id_of(plan, r.strongest_pair->b) << ", "
        << r.strongest_pair->days << " days)\n";
  }
  landing_models_section(out, plan, r.models, r.from);
  list_section(out, "warnings", "!", landing_warnings(plan, r.models));
  std::vector<int> none;
  list_section(out, "notes", "-", forecast_notes(plan, none));
}

}  // namespace readyby
