#include <cmath>
#include <cstdio>
#include <set>

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

std::string run_time_of(const Plan& plan, const RunResult& run) {
  return local_run_time(run.at, *plan.models[static_cast<size_t>(run.model)].zone);
}

void family(std::ostream& out, const char* name, const char* unit, const char* help) {
  out << "# TYPE " << name << " gauge\n";
  if (unit) out << "# UNIT " << name << " " << unit << "\n";
  out << "# HELP " << name << " " << help << "\n";
}

}  // namespace

void write_nightly_metrics(std::ostream& out, const Plan& plan, const NightlyReport& report) {
  const Evaluation& ev = report.evaluation;
  const std::string plan_label = "plan=" + label(plan.id);

  // The runs of the day, each once per model and local run time: the label
  // set stays the same from night to night, so each is one series.
  std::vector<size_t> runs;
  std::set<std::pair<int, std::string>> seen;
  for (size_t i : report.today) {
    const RunResult& run = ev.runs[i];
    if (seen.emplace(run.model, run_time_of(plan, run)).second) runs.push_back(i);
  }
  auto run_labels = [&](const RunResult& run) {
    const Model& model = plan.models[static_cast<size_t>(run.model)];
    return plan_label + ",model=" + label(model.id) + ",run=" + label(run_time_of(plan, run));
  };

  family(out, "readyby_nightly_last_evaluated_timestamp_seconds", "seconds",
         "When the nightly check that wrote these values ran (Unix time).");
  if (report.evaluated_at) {
    out << "readyby_nightly_last_evaluated_timestamp_seconds{" << plan_label << "} "
        << report.evaluated_at->time_since_epoch().count() << "\n";
  }
  family(out, "readyby_nightly_date_timestamp_seconds", "seconds",
         "Start of the local date whose runs these values describe, in the plan's zone (Unix time).");
  out << "readyby_nightly_date_timestamp_seconds{" << plan_label << "} "
      << plan.zone->from_local(LocalTime(report.date.time_since_epoch())).time_since_epoch().count() << "\n";

  family(out, "readyby_feature_slack_seconds", "seconds",
         "Run time minus the time the feature's data was ready, for the day's run at this local time (NaN when "
         "not landed).");
  for (size_t i : runs) {
    const RunResult& run = ev.runs[i];
    for (const FeatureResult& f : run.features) {
      out << "readyby_feature_slack_seconds{" << run_labels(run) << ",feature=" << label(id_of(plan, f.feature))
          << "} " << (f.ready_at ? std::to_string(f.slack_seconds) : std::string("NaN")) << "\n";
    }
  }
  family(out, "readyby_feature_landed", nullptr, "1 when the feature's data landed by any time, 0 when not landed.");
  for (size_t i : runs) {
    const RunResult& run = ev.runs[i];
    for (const FeatureResult& f : run.features) {
      out << "readyby_feature_landed{" << run_labels(run) << ",feature=" << label(id_of(plan, f.feature)) << "} "
          << (f.ready_at ? 1 : 0) << "\n";
    }
  }
  family(out, "readyby_run_ok", nullptr,
         "1 when the day's run at this local time is ok or degraded (every required feature fresh), 0 when it fails.");
  for (size_t i : runs) {
    const RunResult& run = ev.runs[i];
    out << "readyby_run_ok{" << run_labels(run) << "} " << (run.status == RunStatus::fail ? 0 : 1) << "\n";
  }
  family(out, "readyby_run_degraded", nullptr,
         "1 when the day's run at this local time is degraded (an optional feature not fresh), else 0.");
  for (size_t i : runs) {
    const RunResult& run = ev.runs[i];
    out << "readyby_run_degraded{" << run_labels(run) << "} " << (run.status == RunStatus::degraded ? 1 : 0) << "\n";
  }
  auto rate_labels = [&](const OnTimeRate& r) {
    return plan_label + ",model=" + label(plan.models[static_cast<size_t>(r.model)].id) + ",run=" + label(r.at_local);
  };
  family(out, "readyby_run_on_time_ratio", "ratio",
         "Share of the window's runs at this local time that were on time (ok or degraded).");
  for (const OnTimeRate& r : report.on_time) {
    out << "readyby_run_on_time_ratio{" << rate_labels(r) << "} " << number(r.rate) << "\n";
  }
  family(out, "readyby_run_on_time_low_ratio", "ratio", "Lower end of the Wilson 95% interval of the on-time rate.");
  for (const OnTimeRate& r : report.on_time) {
    out << "readyby_run_on_time_low_ratio{" << rate_labels(r) << "} " << number(r.interval.low) << "\n";
  }
  family(out, "readyby_node_last_landed_timestamp_seconds", "seconds",
         "When the monitored node's latest recorded delivery landed (Unix time; ok or failed).");
  for (size_t n = 0; n < report.last_landed.size(); ++n) {
    if (!report.last_landed[n]) continue;
    out << "readyby_node_last_landed_timestamp_seconds{" << plan_label << ",node=" << label(plan.nodes[n].id) << "} "
        << report.last_landed[n]->time_since_epoch().count() << "\n";
  }
  const std::string silent_help = "1 when the monitored node has no recorded landing for " +
                                  std::to_string(kSilentDays) + " days though one was due, else 0.";
  family(out, "readyby_node_silent", nullptr, silent_help.c_str());
  for (size_t n = 0; n < report.monitored.size(); ++n) {
    if (!report.monitored[n]) continue;
    bool silent = false;
    for (const SilentNode& q : report.silent) silent = silent || q.node == static_cast<int>(n);
    out << "readyby_node_silent{" << plan_label << ",node=" << label(plan.nodes[n].id) << "} " << (silent ? 1 : 0)
        << "\n";
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
