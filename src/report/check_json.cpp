#include "report/check_json.h"

#include "util/text.h"

namespace readyby {

void write_check_json(std::ostream& out, const Plan& plan, const Evaluation& ev) {
  out << "{\"plan\": " << json_quote(plan.id) << ", \"timezone\": " << json_quote(plan.zone->name())
      << ", \"from\": " << json_quote(format_date(ev.from)) << ", \"days\": " << ev.days
      << ",\n \"ok\": " << (ev.ok() ? "true" : "false") << ",\n \"runs\": [";
  bool first_run = true;
  std::string chain_text;
  for (const RunResult& run : ev.runs) {
    const Model& model = plan.models[static_cast<size_t>(run.model)];
    out << (first_run ? "\n  " : ",\n  ");
    first_run = false;
    out << "{\"model\": " << json_quote(model.id) << ", \"at\": \"" << format_rfc3339(run.at, model.zone)
        << "\", \"status\": \"" << to_string(run.status) << "\",\n   \"features\": [";
    bool first_feature = true;
    for (const FeatureResult& f : run.features) {
      out << (first_feature ? "\n    " : ",\n    ");
      first_feature = false;
      out << "{\"feature\": " << json_quote(plan.nodes[static_cast<size_t>(f.feature)].id)
          << ", \"optional\": " << (f.optional ? "true" : "false") << ", \"needs_data_through\": \""
          << format_rfc3339(f.needs_data_through, model.zone) << "\", \"ready_at\": ";
      if (f.ready_at) {
        out << '"' << format_rfc3339(*f.ready_at, model.zone) << "\", \"slack_seconds\": " << f.slack_seconds;
      } else {
        out << "null, \"slack_seconds\": null";
      }
      out << ", \"status\": \"" << to_string(f.status) << "\", \"chain\": [";
      bool first_node = true;
      for (int n : ev.chain(f)) {
        out << (first_node ? "" : ", ") << json_quote(plan.nodes[static_cast<size_t>(n)].id);
        first_node = false;
      }
      out << "]}";
    }
    out << "]}";
  }
  out << "],\n \"findings\": [";
  bool first_finding = true;
  for (const Finding& f : ev.findings) {
    out << (first_finding ? "\n  " : ",\n  ");
    first_finding = false;
    out << "{\"kind\": " << json_quote(f.kind);
    if (f.feature >= 0) out << ", \"feature\": " << json_quote(plan.nodes[static_cast<size_t>(f.feature)].id);
    if (f.source >= 0) out << ", \"source\": " << json_quote(plan.nodes[static_cast<size_t>(f.source)].id);
    if (f.node >= 0) {
      const Node& n = plan.nodes[static_cast<size_t>(f.node)];
      out << ", \"node\": " << json_quote(n.id) << ", \"node_kind\": \"" << to_string(n.kind) << '"';
    }
    out << ", \"message\": " << json_quote(f.message) << "}";
  }
  out << "]}\n";
}

}  // namespace readyby
