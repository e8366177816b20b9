#include "report/check_json.h"

#include "util/text.h"

namespace readyby {

namespace {

// Buffers output in large blocks: a plan-wide check writes millions of small
// pieces, and going through the stream for each costs more than computing them.
class BlockWriter {
 public:
  explicit BlockWriter(std::ostream& out) : out_(out) { buffer_.reserve(kBlock + 4096); }
  ~BlockWriter() { flush(); }
  BlockWriter& operator<<(std::string_view s) {
    buffer_.append(s);
    if (buffer_.size() >= kBlock) flush();
    return *this;
  }
  BlockWriter& operator<<(const std::string& s) { return *this << std::string_view(s); }
  BlockWriter& operator<<(const char* s) { return *this << std::string_view(s); }
  BlockWriter& operator<<(char c) { return *this << std::string_view(&c, 1); }
  BlockWriter& operator<<(int64_t v) { return *this << std::string_view(std::to_string(v)); }
  BlockWriter& operator<<(int v) { return *this << static_cast<int64_t>(v); }
  void flush() {
    out_.write(buffer_.data(), static_cast<std::streamsize>(buffer_.size()));
    buffer_.clear();
  }

 private:
  static constexpr size_t kBlock = 1 << 20;
  std::ostream& out_;
  std::string buffer_;
};

}  // namespace

void write_check_json(std::ostream& stream, const Plan& plan, const Evaluation& ev) {
  BlockWriter out(stream);
  // Node ids are quoted once, not once per mention.
  std::vector<std::string> quoted;
  quoted.reserve(plan.nodes.size());
  for (const Node& n : plan.nodes) quoted.push_back(json_quote(n.id));
  out << "{\"plan\": " << json_quote(plan.id) << ", \"timezone\": " << json_quote(plan.zone->name())
      << ", \"from\": " << json_quote(format_date(ev.from)) << ", \"days\": " << ev.days
      << ",\n \"ok\": " << (ev.ok() ? "true" : "false") << ",\n \"runs\": [";
  bool first_run = true;
  std::string chain_text;
  // Stored runs, or (for a lazy evaluation) each run computed as it is written.
  const size_t run_count = ev.runs.empty() ? ev.pending_count() : ev.runs.size();
  for (size_t r = 0; r < run_count; ++r) {
    RunResult computed;
    if (ev.runs.empty()) computed = ev.pending_run(r);
    const RunResult& run = ev.runs.empty() ? computed : ev.runs[r];
    const Model& model = plan.models[static_cast<size_t>(run.model)];
    out << (first_run ? "\n  " : ",\n  ");
    first_run = false;
    out << "{\"model\": " << json_quote(model.id) << ", \"at\": \"" << format_rfc3339(run.at, model.zone)
        << "\", \"status\": \"" << to_string(run.status) << "\",\n   \"features\": [";
    bool first_feature = true;
    for (const FeatureResult& f : run.features) {
      out << (first_feature ? "\n    " : ",\n    ");
      first_feature = false;
      out << "{\"feature\": " << quoted[static_cast<size_t>(f.feature)]
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
        out << (first_node ? "" : ", ") << quoted[static_cast<size_t>(n)];
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
