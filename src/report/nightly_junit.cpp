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
  const std::string suite = "readyby nightly " + plan.id + " " + format_date(report.date);
  out << "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n";
  out << "<testsuites name=\"" << xml_escape(suite) << "\" tests=\"" << report.today.size() << "\" failures=\""
      << failures << "\" errors=\"0\">\n";
  out << "  <testsuite name=\"" << xml_escape(suite) << "\" tests=\"" << report.today.size() << "\" failures=\""
      << failures << "\" errors=\"0\" skipped=\"0\">\n";
  for (size_t i : report.today) {
    const RunResult& run = ev.runs[i];
    const Model& model = plan.models[static_cast<size_t>(run.model)];
    out << "    <testcase classname=\"" << xml_escape(plan.id + "." + model.id) << "\" name=\""
        << xml_escape(model.id + " at " + format_rfc3339(run.at, model.zone)) << "\" time=\"0\"";
    if (run.status == RunStatus::ok) {
      out << "/>\n";
      continue;
    }
    out << ">\n";
    std::string summary;
    std::string text = failure_text(plan, report, run, model.zone, &summary);
    if (run.status == RunStatus::fail) {
      out << "      <failure type=\"fail\" message=\"" << xml_escape(summary) << "\">" << xml_escape(text)
          << "</failure>\n";
    } else {
      out << "      <system-out>degraded: " << xml_escape(text) << "</system-out>\n";
    }
    out << "    </testcase>\n";
  }
  out << "  </testsuite>\n</testsuites>\n";
}

}  // namespace readyby
