#include <cmath>
#include <cstdio>

#include "report/check_json.h"
#include "report/nightly_report.h"
#include "time/zone.h"
#include "util/text.h"

namespace readyby {

const char* nightly_status(FeatureStatus s) {
  switch (s) {
    case FeatureStatus::ok: return "ok";
    case FeatureStatus::late: return "late";
    case FeatureStatus::never: return "not-landed";
  }
  return "?";
}

namespace {

std::string number(double v) {
  char buffer[32];
  std::snprintf(buffer, sizeof buffer, "%.4f", v);
  return buffer;
}

template <typename T>
std::string or_null(const std::optional<T>& v) {
  if (!v) return "null";
  if constexpr (std::is_floating_point_v<T>) return std::to_string(std::llround(*v));
  else return std::to_string(*v);
}

const std::string& id_of(const Plan& plan, int node) { return plan.nodes[static_cast<size_t>(node)].id; }

void write_feature(std::ostream& out, const Plan& plan, const NightlyReport& report, const Model& model,
                   const FeatureResult& f) {
  out << "{\"feature\": " << json_quote(id_of(plan, f.feature)) << ", \"optional\": " << (f.optional ? "true" : "false")
      << ", \"needs_data_through\": \"" << format_rfc3339(f.needs_data_through, model.zone) << "\", \"ready_at\": ";
  if (f.ready_at) {
    out << '"' << format_rfc3339(*f.ready_at, model.zone) << "\", \"slack_seconds\": " << f.slack_seconds;
  } else {
    out << "null, \"slack_seconds\": null";
  }
  out << ", \"status\": \"" << nightly_status(f.status) << "\", \"chain\": [";
  std::vector<ChainLanding> steps = report.chain_landings(f);
  for (size_t i = 0; i < steps.size(); ++i) out << (i ? ", " : "") << json_quote(id_of(plan, steps[i].node));
  out << "],\n     \"landings\": [";
  for (size_t i = 0; i < steps.size(); ++i) {
    out << (i ? ", " : "") << "{\"node\": " << json_quote(id_of(plan, steps[i].node)) << ", \"ready_at\": ";
    if (steps[i].ready_at) out << '"' << format_rfc3339(*steps[i].ready_at, model.zone) << '"';
    else out << "null";
    out << ", \"monitored\": " << (steps[i].monitored ? "true" : "false") << "}";
  }
  out << "]}";
}

}  // namespace

void write_nightly_json(std::ostream& out, const Plan& plan, const NightlyReport& report) {
  const Evaluation& ev = report.evaluation;
  out << "{\"plan\": " << json_quote(plan.id) << ", \"timezone\": " << json_quote(plan.zone->name())
      << ", \"date\": \"" << format_date(report.date) << "\", \"window\": " << report.window
      << ", \"window_from\": \"" << format_date(report.window_from) << "\",\n \"ok\": "
      << (report.ok() ? "true" : "false") << ",\n \"runs\": [";
  for (size_t i = 0; i < report.today.size(); ++i) {
    const RunResult& run = ev.runs[report.today[i]];
    const Model& model = plan.models[static_cast<size_t>(run.model)];
    out << (i ? ",\n  " : "\n  ") << "{\"model\": " << json_quote(model.id) << ", \"at\": \""
        << format_rfc3339(run.at, model.zone) << "\", \"status\": \"" << to_string(run.status)
        << "\",\n   \"features\": [";
    for (size_t k = 0; k < run.features.size(); ++k) {
      out << (k ? ",\n    " : "\n    ");
      write_feature(out, plan, report, model, run.features[k]);
    }
    out << "],\n   \"advice\": ";
    bool advised = false;
    for (const NightlyReport::RunAdvice& a : report.advice) {
      if (a.run != report.today[i]) continue;
      out << pattern_json(plan, a.pattern, a.fixes);
      advised = true;
    }
    if (!advised) out << "null";
    out << "}";
  }
  out << "],\n \"unmonitored\": [";
  for (size_t i = 0; i < report.unmonitored.size(); ++i) {
    out << (i ? ", " : "") << json_quote(id_of(plan, report.unmonitored[i]));
  }
  out << "],\n \"silent_after_days\": " << kSilentDays << ", \"silent\": [";
  for (size_t i = 0; i < report.silent.size(); ++i) {
    const SilentNode& q = report.silent[i];
    out << (i ? ", " : "") << "{\"node\": " << json_quote(id_of(plan, q.node)) << ", \"last_landed_at\": ";
    if (q.last_landed_at) out << '"' << format_rfc3339(*q.last_landed_at, plan.zone) << '"';
    else out << "null";
    out << "}";
  }
  out << "],\n \"drift\": [";
  for (size_t i = 0; i < report.drift.size(); ++i) {
    const SourceDrift& d = report.drift[i];
    out << (i ? ",\n  " : "\n  ") << "{\"source\": " << json_quote(id_of(plan, d.source))
        << ", \"deliveries\": " << d.deliveries << ", \"p50_offset_seconds\": " << or_null(d.p50_offset_seconds)
        << ", \"p90_offset_seconds\": " << or_null(d.p90_offset_seconds)
        << ", \"declared_seconds\": " << d.declared_seconds
        << ", \"trend_seconds_per_week\": " << or_null(d.trend_seconds_per_week)
        << ", \"slack_seconds\": " << or_null(d.slack_seconds) << ", \"drifting\": " << (d.drifting ? "true" : "false");
    if (d.drifting) out << ", \"reason\": " << json_quote(d.reason);
    out << "}";
  }
  out << "],\n \"on_time\": [";
  for (size_t i = 0; i < report.on_time.size(); ++i) {
    const OnTimeRate& r = report.on_time[i];
    out << (i ? ",\n  " : "\n  ") << "{\"model\": " << json_quote(plan.models[static_cast<size_t>(r.model)].id)
        << ", \"at_local\": " << json_quote(r.at_local) << ", \"days\": " << r.days << ", \"on_time\": " << r.on_time
        << ", \"degraded\": " << r.degraded << ", \"rate\": " << number(r.rate) << ", \"low\": " << number(r.interval.low)
        << ", \"high\": " << number(r.interval.high) << "}";
  }
  out << "],\n \"weakest_link\": ";
  if (report.weakest_link) {
    const WeakestLink& w = *report.weakest_link;
    out << "{\"node\": " << json_quote(id_of(plan, w.node)) << ", \"failing_runs\": " << w.failing_runs
        << ", \"of_failing_runs\": " << w.total_failing_runs << "}";
  } else {
    out << "null";
  }
  out << "}\n";
}

}  // namespace readyby
