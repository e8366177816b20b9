#include "report/margins_report.h"

#include <algorithm>

#include "report/check_text.h"
#include "time/duration.h"
#include "util/text.h"

namespace readyby {

namespace {

void write_header(std::ostream& out, const char* command, const Plan& plan, const Evaluation& ev) {
  LocalDays last = ev.from + date::days(ev.days - 1);
  out << "readyby " << command << ": plan " << plan.id << (plan.title.empty() ? "" : " — " + plan.title) << "\n";
  out << "window: " << format_date(ev.from) << " to " << format_date(last) << " (" << ev.days
      << " days, local dates of each model's zone)\n";
}

std::string binding_run(const Plan& plan, const Margin& m) {
  const Model& model = plan.models[static_cast<size_t>(m.binding_model)];
  return model.id + " " + local_with_offset(m.binding_at, model.zone);
}

size_t id_width(const Plan& plan, const std::vector<int>& nodes) {
  size_t w = 0;
  for (int n : nodes) w = std::max(w, plan.nodes[static_cast<size_t>(n)].id.size());
  return w;
}

std::string padded(const std::string& s, size_t width) { return s + std::string(width > s.size() ? width - s.size() : 0, ' '); }

std::string runs_word(int n) { return std::to_string(n) + (n == 1 ? " run" : " runs"); }

// Names listed in a paragraph (wrapped at 78 columns); beyond `limit`, a
// count of the rest.
constexpr size_t kListLimit = 40;
void write_names(std::ostream& out, const Plan& plan, const std::vector<int>& nodes) {
  size_t col = 80;
  const size_t shown = std::min(nodes.size(), kListLimit);
  for (size_t i = 0; i < shown; ++i) {
    const std::string& id = plan.nodes[static_cast<size_t>(nodes[i])].id;
    if (col + id.size() + 2 > 78) out << "\n  ", col = 2;
    else out << " ", ++col;
    out << id << (i + 1 < shown ? "," : "");
    col += id.size() + 1;
  }
  if (shown < nodes.size()) out << "\n  and " << nodes.size() - shown << " more (--format json lists every node)";
  out << "\n";
}

}  // namespace

std::vector<Margin> margins_in_report_order(std::vector<Margin> margins) {
  std::stable_sort(margins.begin(), margins.end(), [](const Margin& a, const Margin& b) {
    if (a.seconds.has_value() != b.seconds.has_value()) return a.seconds.has_value();
    if (a.seconds && *a.seconds != *b.seconds) return *a.seconds < *b.seconds;
    return a.node < b.node;
  });
  return margins;
}

void write_margins_text(std::ostream& out, const Plan& plan, const Evaluation& ev, const std::vector<Margin>& margins) {
  write_header(out, "margins", plan, ev);
  std::vector<Margin> ordered = margins_in_report_order(margins);
  std::vector<int> bounded, unbounded;
  for (const Margin& m : ordered) (m.seconds ? bounded : unbounded).push_back(m.node);
  if (bounded.empty()) {
    out << "\nno run is ok in this window, so no node has a margin to report\n";
  } else {
    out << "\nhow much later each node could land before a run that is ok today degrades or fails\n"
           "(whole minutes, smallest first):\n";
    const size_t width = id_width(plan, bounded);
    auto margin_text = [](const Margin& m) { return *m.seconds == 0 ? std::string("0m") : human_duration(*m.seconds); };
    size_t margin_width = 0;
    for (const Margin& m : ordered) {
      if (m.seconds) margin_width = std::max(margin_width, margin_text(m).size());
    }
    for (const Margin& m : ordered) {
      if (!m.seconds) continue;
      const Node& node = plan.nodes[static_cast<size_t>(m.node)];
      out << "  " << padded(node.id, width) << "  " << padded(margin_text(m), margin_width) << "  binding run "
          << binding_run(plan, m);
      if (m.room_seconds >= 0) out << " (lands " << human_duration(m.room_seconds) << " before it must)";
      out << "\n";
    }
  }
  if (!unbounded.empty()) {
    out << "\nno run that is ok today depends on " << unbounded.size() << (unbounded.size() == 1 ? " node" : " nodes")
        << " (any delay changes nothing):";
    write_names(out, plan, unbounded);
  }
}

void write_margins_json(std::ostream& out, const Plan& plan, const std::vector<Margin>& margins) {
  std::vector<Margin> ordered = margins_in_report_order(margins);
  out << "{\"margins\": [";
  for (size_t i = 0; i < ordered.size(); ++i) {
    const Margin& m = ordered[i];
    out << (i ? ",\n  " : "\n  ") << "{\"node\": " << json_quote(plan.nodes[static_cast<size_t>(m.node)].id)
        << ", \"margin_seconds\": " << (m.seconds ? std::to_string(*m.seconds) : "null") << ", \"binding\": ";
    if (m.seconds) {
      const Model& model = plan.models[static_cast<size_t>(m.binding_model)];
      out << "{\"model\": " << json_quote(model.id) << ", \"at\": \"" << format_rfc3339(m.binding_at, model.zone) << "\"}";
    } else {
      out << "null";
    }
    out << "}";
  }
  out << "]}\n";
}

void write_impact_text(std::ostream& out, const Plan& plan, const Evaluation& ev, const std::vector<NodeImpact>& impact) {
  write_header(out, "impact", plan, ev);
  std::vector<int> changing, spofs;
  for (const NodeImpact& i : impact) {
    if (i.failed_runs || i.degraded_runs) changing.push_back(i.node);
    if (i.single_point_of_failure()) spofs.push_back(i.node);
  }
  if (changing.empty()) {
    out << "\nno node's failure changes any run in this window\n";
    return;
  }
  out << "\nif a node never landed, these runs would fail or degrade (most failed first):\n";
  const size_t width = id_width(plan, changing);
  for (const NodeImpact& i : impact) {
    if (!i.failed_runs && !i.degraded_runs) continue;
    out << "  " << padded(plan.nodes[static_cast<size_t>(i.node)].id, width) << "  fails " << runs_word(i.failed_runs);
    if (i.degraded_runs) out << ", degrades " << runs_word(i.degraded_runs);
    if (i.single_point_of_failure()) out << "  [single point of failure]";
    out << "\n";
    for (const ModelImpact& m : i.models) {
      out << "  " << std::string(width, ' ') << "    " << plan.models[static_cast<size_t>(m.model)].id << ":";
      if (m.fail) out << " " << m.fail << " failed";
      if (m.degrade) out << (m.fail ? "," : "") << " " << m.degrade << " degraded";
      out << "\n";
    }
  }
  out << "\n";
  if (spofs.empty()) {
    out << "no single point of failure: no node's failure fails runs of two or more models\n";
  } else {
    out << spofs.size() << (spofs.size() == 1 ? " single point of failure" : " single points of failure")
        << " (its failure fails runs of two or more models):";
    write_names(out, plan, spofs);
  }
  size_t quiet = impact.size() - changing.size();
  if (quiet) out << quiet << (quiet == 1 ? " node changes" : " nodes change") << " no run when it fails\n";
}

void write_impact_json(std::ostream& out, const Plan& plan, const std::vector<NodeImpact>& impact) {
  out << "{\"impact\": [";
  for (size_t k = 0; k < impact.size(); ++k) {
    const NodeImpact& i = impact[k];
    out << (k ? ",\n  " : "\n  ") << "{\"node\": " << json_quote(plan.nodes[static_cast<size_t>(i.node)].id)
        << ", \"failed_runs\": " << i.failed_runs << ", \"degraded_runs\": " << i.degraded_runs << ", \"models\": [";
    for (size_t j = 0; j < i.models.size(); ++j) {
      const ModelImpact& m = i.models[j];
      out << (j ? ", " : "") << "{\"model\": " << json_quote(plan.models[static_cast<size_t>(m.model)].id)
          << ", \"fail\": " << m.fail << ", \"degrade\": " << m.degrade << "}";
    }
    out << "]}";
  }
  out << "]}\n";
}

}  // namespace readyby
