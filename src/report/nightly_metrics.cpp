#include <cmath>
#include <cstdio>

#include "report/nightly_report.h"
#include "time/zone.h"

namespace readyby {

namespace {

// OpenMetrics label value escaping: backslash, double quote, line feed.
std::string label(std::string_view s) {
  std::string out = "\"";
  for (char c : s) {
    if (c == '\\') out += "\\\\";
    else if (c == '"') out += "\\\"";
    else if (c == '\n') out += "\\n";
    else out += c;
  }
  return out + "\"";
}

std::string number(double v) {
  char buffer[32];
  std::snprintf(buffer, sizeof buffer, "%.6g", v);
  return buffer;
}

const std::string& id_of(const Plan& plan, int node) { return plan.nodes[static_cast<size_t>(node)].id; }

void family(std::ostream& out, const char* name, const char* unit, const char* help) {
  out << "# TYPE " << name << " gauge\n";
  if (unit) out << "# UNIT " << name << " " << unit << "\n";
  out << "# HELP " << name << " " << help << "\n";
}

}  // namespace

void write_nightly_metrics(std::ostream& out, const Plan& plan, const NightlyReport& report) {
  const Evaluation& ev = report.evaluation;
  const std::string plan_label = "plan=" + label(plan.id);

  family(out, "readyby_feature_slack_seconds", "seconds",
         "Run time minus the time the feature's data was ready, for the runs of the day (absent when not landed).");
  for (size_t i : report.today) {
    const RunResult& run = ev.runs[i];
    const Model& model = plan.models[static_cast<size_t>(run.model)];
    for (const FeatureResult& f : run.features) {
      if (!f.ready_at) continue;
      out << "readyby_feature_slack_seconds{" << plan_label << ",model=" << label(model.id)
          << ",run=" << label(format_rfc3339(run.at, model.zone)) << ",feature=" << label(id_of(plan, f.feature))
          << "} " << f.slack_seconds << "\n";
    }
  }
  family(out, "readyby_feature_landed", nullptr, "1 when the feature's data landed by any time, 0 when not landed.");
  for (size_t i : report.today) {
    const RunResult& run = ev.runs[i];
    const Model& model = plan.models[static_cast<size_t>(run.model)];
    for (const FeatureResult& f : run.features) {
      out << "readyby_feature_landed{" << plan_label << ",model=" << label(model.id)
          << ",run=" << label(format_rfc3339(run.at, model.zone)) << ",feature=" << label(id_of(plan, f.feature))
          << "} " << (f.ready_at ? 1 : 0) << "\n";
    }
  }
  family(out, "readyby_run_ok", nullptr, "1 when the run of the day is ok or degraded, 0 when it fails.");
  for (size_t i : report.today) {
    const RunResult& run = ev.runs[i];
    const Model& model = plan.models[static_cast<size_t>(run.model)];
    out << "readyby_run_ok{" << plan_label << ",model=" << label(model.id)
        << ",run=" << label(format_rfc3339(run.at, model.zone)) << ",status=" << label(to_string(run.status)) << "} "
        << (run.status == RunStatus::fail ? 0 : 1) << "\n";
  }
  family(out, "readyby_run_on_time_ratio", "ratio", "Share of the window's runs at this local time that were ok.");
  for (const OnTimeRate& r : report.on_time) {
    out << "readyby_run_on_time_ratio{" << plan_label << ",model=" << label(plan.models[static_cast<size_t>(r.model)].id)
        << ",at_local=" << label(r.at_local) << "} " << number(r.rate) << "\n";
  }
  family(out, "readyby_run_on_time_low_ratio", "ratio", "Lower end of the Wilson 95% interval of the on-time rate.");
  for (const OnTimeRate& r : report.on_time) {
    out << "readyby_run_on_time_low_ratio{" << plan_label
        << ",model=" << label(plan.models[static_cast<size_t>(r.model)].id) << ",at_local=" << label(r.at_local)
        << "} " << number(r.interval.low) << "\n";
  }
  family(out, "readyby_source_landing_offset_p90_seconds", "seconds",
         "90th percentile of landing offsets from the scheduled occurrence over the window.");
  for (const SourceDrift& d : report.drift) {
    if (!d.p90_offset_seconds) continue;
    out << "readyby_source_landing_offset_p90_seconds{" << plan_label << ",source=" << label(id_of(plan, d.source))
        << "} " << *d.p90_offset_seconds << "\n";
  }
  family(out, "readyby_source_declared_lands_after_seconds", "seconds", "The source's declared lands_after.");
  for (const SourceDrift& d : report.drift) {
    out << "readyby_source_declared_lands_after_seconds{" << plan_label << ",source=" << label(id_of(plan, d.source))
        << "} " << d.declared_seconds << "\n";
  }
  family(out, "readyby_source_trend_seconds_per_week", nullptr,
         "Theil-Sen slope of landing offsets over the window, seconds per week.");
  for (const SourceDrift& d : report.drift) {
    if (!d.trend_seconds_per_week) continue;
    out << "readyby_source_trend_seconds_per_week{" << plan_label << ",source=" << label(id_of(plan, d.source))
        << "} " << number(*d.trend_seconds_per_week) << "\n";
  }
  family(out, "readyby_source_drifting", nullptr, "1 when the source is flagged as drifting.");
  for (const SourceDrift& d : report.drift) {
    out << "readyby_source_drifting{" << plan_label << ",source=" << label(id_of(plan, d.source)) << "} "
        << (d.drifting ? 1 : 0) << "\n";
  }
  out << "# EOF\n";
}

}  // namespace readyby
