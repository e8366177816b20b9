#include "report/nightly_report.h"
#include "time/duration.h"
#include "time/zone.h"

namespace readyby {

namespace {

// XML 1.0 character data / attribute value escaping; control characters that
// XML 1.0 forbids become U+FFFD.
std::string xml_escape(std::string_view s) {
  std::string out;
  out.reserve(s.size());
  for (char c : s) {
    switch (c) {
      case '&': out += "&amp;"; break;
      case '<': out += "&lt;"; break;
      case '>': out += "&gt;"; break;
      case '"': out += "&quot;"; break;
      case '\'': out += "&apos;"; break;
      default:
        if (static_cast<unsigned char>(c) < 0x20 && c != '\n' && c != '\t' && c != '\r') out += "\xEF\xBF\xBD";
        else out += c;
    }
  }
  return out;
}

const std::string& id_of(const Plan& plan, int node) { return plan.nodes[static_cast<size_t>(node)].id; }

std::string failure_text(const Plan& plan, const NightlyReport& report, const RunResult& run, const Zone* zone,
                         std::string* summary) {
  std::string text;
  for (const FeatureResult& f : run.features) {
    if (f.status == FeatureStatus::ok) continue;
    std::string what = id_of(plan, f.feature) + (f.optional ? " (optional)" : "") + ": " +
                       (f.status == FeatureStatus::late ? "late by " + human_duration(-f.slack_seconds)
                                                        : std::string("not landed"));
    if (!f.optional) *summary += (summary->empty() ? "" : "; ") + what;
    text += what + "\n  chain:";
    for (const ChainLanding& step : report.chain_landings(f)) {
      text += " " + id_of(plan, step.node) + "@" +
              (step.ready_at ? format_rfc3339(*step.ready_at, zone) : std::string("not-landed"));
    }
    text += "\n";
  }
  return text;
}

}  // namespace

void write_nightly_junit(std::ostream& out, const Plan& plan, const NightlyReport& report) {
  const Evaluation& ev = report.evaluation;
  int failures = 0;
  for (size_t i : report.today) failures += ev.runs[i].status == RunStatus::fail ? 1 : 0;
  // Names stay the same from night to night (plan, model, local run time),
  // so that a CI dashboard tracks each run's history; the date and the run's
  // instant are in the properties and the texts.
  const std::string suite = "readyby nightly " + plan.id;
  out << "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n";
  out << "<testsuites name=\"" << xml_escape(suite) << "\" tests=\"" << report.today.size() << "\" failures=\""
      << failures << "\" errors=\"0\">\n";
  out << "  <testsuite name=\"" << xml_escape(suite) << "\" tests=\"" << report.today.size() << "\" failures=\""
      << failures << "\" errors=\"0\" skipped=\"0\">\n";
  out << "    <properties>\n";
  const std::pair<const char*, std::string> properties[] = {
      {"plan", plan.id},
      {"date", format_date(report.date)},
      {"timezone", plan.zone->name()},
      {"window_from", format_date(report.window_from)},
  };
  for (const auto& [name, value] : properties) {
    out << "      <property name=\"" << name << "\" value=\"" << xml_escape(value) << "\"/>\n";
  }
  out << "    </properties>\n";
  for (size_t i : report.today) {
    const RunResult& run = ev.runs[i];
    const Model& model = plan.models[static_cast<size_t>(run.model)];
    out << "    <testcase classname=\"" << xml_escape(plan.id + "." + model.id) << "\" name=\""
        << xml_escape(model.id + " at " + local_run_time(run.at, *model.zone)) << "\" time=\"0\"";
    if (run.status == RunStatus::ok) {
      out << "/>\n";
      continue;
    }
    out << ">\n";
    std::string summary;
    std::string text = "run at " + format_rfc3339(run.at, model.zone) + "\n" +
                       failure_text(plan, report, run, model.zone, &summary);
    if (run.status == RunStatus::fail) {
      out << "      <failure type=\"fail\" message=\"" << xml_escape(summary) << "\">" << xml_escape(text)
          << "</failure>\n";
    } else {
      out << "      <system-out>degraded: " << xml_escape(text) << "</system-out>\n";
    }
    out << "    </testcase>\n";
  }
  if (!report.silent.empty()) {
    out << "    <system-err>";
    for (const SilentNode& q : report.silent) out << xml_escape(silent_warning(plan, q, plan.zone)) << "\n";
    out << "</system-err>\n";
  }
  out << "  </testsuite>\n</testsuites>\n";
}

}  // namespace readyby
