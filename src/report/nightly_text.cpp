#include <cmath>
#include <cstdio>

#include "report/advice_text.h"
#include "report/check_text.h"
#include "report/nightly_report.h"
#include "time/duration.h"
#include "time/zone.h"

namespace readyby {

namespace {

const std::string& id_of(const Plan& plan, int node) { return plan.nodes[static_cast<size_t>(node)].id; }

std::string percent(double v) {
  char buffer[16];
  std::snprintf(buffer, sizeof buffer, "%.0f%%", v * 100);
  return buffer;
}

std::string signed_duration(int64_t seconds) { return (seconds > 0 ? "+" : "") + human_duration(seconds); }

// "lab_results 03-03 02:51 → labs_clean 03-03 03:06 (declared) → ..."
std::string chain_text(const Plan& plan, const NightlyReport& report, const FeatureResult& f, const Zone* zone) {
  std::string out;
  for (const ChainLanding& step : report.chain_landings(f)) {
    if (!out.empty()) out += " → ";
    out += id_of(plan, step.node) + " ";
    out += step.ready_at ? format_local(zone->to_local(*step.ready_at)).substr(5) : std::string("not landed");
    if (!step.monitored && plan.nodes[static_cast<size_t>(step.node)].kind == NodeKind::source) out += " (declared)";
  }
  return out;
}

void write_run(std::ostream& out, const Plan& plan, const NightlyReport& report, const RunResult& run) {
  const Model& model = plan.models[static_cast<size_t>(run.model)];
  const char* mark = run.status == RunStatus::ok ? "✓" : run.status == RunStatus::degraded ? "~" : "✗";
  std::optional<int64_t> tightest;
  for (const FeatureResult& f : run.features) {
    if (f.status == FeatureStatus::ok) tightest = tightest ? std::min(*tightest, f.slack_seconds) : f.slack_seconds;
  }
  out << "  " << mark << " " << model.id << " at " << local_with_offset(run.at, model.zone) << ": "
      << to_string(run.status);
  if (run.status == RunStatus::ok && tightest) out << " (tightest slack " << human_duration(*tightest) << ")";
  out << "\n";
  for (const FeatureResult& f : run.features) {
    if (f.status == FeatureStatus::ok) continue;
    out << "      " << id_of(plan, f.feature) << (f.optional ? " (optional)" : "") << ": ";
    if (f.status == FeatureStatus::late) out << "late by " << human_duration(-f.slack_seconds);
    else out << "not landed";
    out << " (needs data through " << format_local(model.zone->to_local(f.needs_data_through)) << ")\n";
    out << "        chain: " << chain_text(plan, report, f, model.zone) << "\n";
  }
  for (const NightlyReport::RunAdvice& a : report.advice) {
    if (&report.evaluation.runs[a.run] != &run) continue;
    const std::string cause = describe_cause(plan, a.pattern.blame, model.zone);
    if (!cause.empty()) out << "      cause: " << cause << "\n";
    if (a.fixes.fixes.empty()) {
      out << "      fix: " << describe_no_fix(plan, a.pattern, a.fixes) << "\n";
    }
    for (size_t i = 0; i < a.fixes.fixes.size(); ++i) {
      const Fix& fix = a.fixes.fixes[i];
      out << "      " << (i == 0 ? "fix: " : "or: ") << describe_fix(plan, a.pattern, fix) << "\n"
          << "           " << describe_effect(plan, fix) << "\n";
    }
  }
}

}  // namespace

std::string silent_warning(const Plan& plan, const SilentNode& silent, const Zone* zone) {
  std::string out = "no landing of " + id_of(plan, silent.node) + " recorded for " + std::to_string(kSilentDays) +
                    " days (last ";
  out += silent.last_landed_at ? local_with_offset(*silent.last_landed_at, zone) : std::string("before the history read");
  return out + ") though one was due: has the feed stopped, or is its log no longer recorded?";
}

void write_nightly_text(std::ostream& out, const Plan& plan, const NightlyReport& report) {
  const Evaluation& ev = report.evaluation;
  const int days = static_cast<int>((report.date - report.window_from).count()) + 1;
  out << "readyby nightly: plan " << plan.id << " — " << plan.title << "\n";
  out << "date " << format_date(report.date) << " (" << plan.zone->name() << "); history window "
      << format_date(report.window_from) << " to " << format_date(report.date) << " (" << days << " day"
      << (days == 1 ? "" : "s") << (days < report.window ? ", shortened to the recorded history" : "") << ")\n\n";

  out << "runs on " << format_date(report.date) << "\n";
  if (report.today.empty()) out << "  (no runs)\n";
  for (size_t i : report.today) write_run(out, plan, report, ev.runs[i]);
  if (!report.silent.empty()) out << "\n";
  for (const SilentNode& q : report.silent) out << "warning: " << silent_warning(plan, q, plan.zone) << "\n";

  out << "\nunmonitored sources (no landings recorded; their declared schedule is used):";
  if (report.unmonitored.empty()) out << " none";
  for (size_t i = 0; i < report.unmonitored.size(); ++i) out << (i ? ", " : " ") << id_of(plan, report.unmonitored[i]);
  out << "\n";

  out << "\ndrift (landing offset from the scheduled occurrence, over the window)\n";
  if (report.drift.empty()) out << "  no monitored sources\n";
  for (const SourceDrift& d : report.drift) {
    char line[160];
    std::snprintf(line, sizeof line, "  %-20s %3d landings  p50 %-8s p90 %-8s declared %-8s trend %s/week",
                  id_of(plan, d.source).c_str(), d.deliveries,
                  d.p50_offset_seconds ? human_duration(*d.p50_offset_seconds).c_str() : "-",
                  d.p90_offset_seconds ? human_duration(*d.p90_offset_seconds).c_str() : "-",
                  human_duration(d.declared_seconds).c_str(),
                  d.trend_seconds_per_week ? signed_duration(std::llround(*d.trend_seconds_per_week)).c_str() : "-");
    out << line << "\n";
    if (d.drifting) out << "      DRIFTING: " << d.reason << "\n";
  }

  out << "\non-time rate per model run time (runs ok or degraded / evaluated, Wilson 95% interval)\n";
  for (const OnTimeRate& r : report.on_time) {
    out << "  " << plan.models[static_cast<size_t>(r.model)].id << " " << r.at_local << ": " << r.on_time << "/"
        << r.days << " = " << percent(r.rate) << " (" << percent(r.interval.low) << " to " << percent(r.interval.high)
        << ")";
    if (r.degraded > 0) out << "; " << r.degraded << " degraded";
    out << "\n";
  }
  if (report.weakest_link) {
    const WeakestLink& w = *report.weakest_link;
    out << "\nweakest link: " << id_of(plan, w.node) << " starts the late chain of " << w.failing_runs << " of "
        << w.total_failing_runs << " failing run" << (w.total_failing_runs == 1 ? "" : "s") << " in the window\n";
  } else {
    out << "\nweakest link: none (no run failed in the window)\n";
  }
  out << "\n" << (report.ok() ? "all runs of the day ok or degraded" : "some runs of the day fail") << "\n";
}

}  // namespace readyby
