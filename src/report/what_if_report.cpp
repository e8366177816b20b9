#include "report/what_if_report.h"

#include <algorithm>
#include <map>

#include "report/check_json.h"
#include "time/duration.h"
#include "util/text.h"

namespace readyby {

std::string edit_json(const Plan& plan, const Edit& e) {
  const std::string target = e.kind == EditKind::runs ? plan.models[static_cast<size_t>(e.target)].id
                                                      : plan.nodes[static_cast<size_t>(e.target)].id;
  std::string out = "{\"edit\": \"" + std::string(to_string(e.kind)) + "\", \"target\": " + json_quote(target);
  if (e.kind == EditKind::delay || e.kind == EditKind::max_age) out += ", \"seconds\": " + std::to_string(e.seconds);
  if (e.kind == EditKind::schedule || e.kind == EditKind::runs) {
    out += ", \"cron\": " + (e.cron ? json_quote(e.cron->text) : std::string("null"));
  }
  return out + ", \"text\": " + json_quote(edit_text(plan, e)) + "}";
}

namespace {

std::string transition(RunStatus before, RunStatus after) {
  return std::string(to_string(before)) + " -> " + to_string(after);
}

}  // namespace

void write_what_if_text(std::ostream& out, const WhatIfResult& r) {
  const Plan& plan = *r.edited;
  const Evaluation& after = *r.after;
  LocalDays last = after.from + date::days(after.days - 1);
  out << "readyby what-if: plan " << plan.id << (plan.title.empty() ? "" : " — " + plan.title) << "\n";
  out << "window: " << format_date(after.from) << " to " << format_date(last) << " (" << after.days
      << " days, local dates of each model's zone)\n";
  out << "edits:\n";
  for (const Edit& e : r.edits) out << "  " << edit_text(*r.plan, e) << "\n";

  if (r.changes.empty()) {
    out << "\nno run changes status\n";
  } else {
    out << "\n" << r.changes.size() << (r.changes.size() == 1 ? " run changes" : " runs change") << " status:\n";
    // Per model (plan order), per transition (first seen first), the runs.
    for (size_t m = 0; m < plan.models.size(); ++m) {
      const Model& model = plan.models[m];
      std::vector<std::pair<std::string, std::vector<Instant>>> groups;
      for (const StatusChange& c : r.changes) {
        if (c.model != static_cast<int>(m)) continue;
        std::string key = transition(c.before, c.after);
        auto it = std::find_if(groups.begin(), groups.end(), [&](const auto& g) { return g.first == key; });
        if (it == groups.end()) groups.push_back({key, {c.at}});
        else it->second.push_back(c.at);
      }
      if (groups.empty()) continue;
      out << "  model " << model.id << " (" << model.zone->name() << ")\n";
      for (const auto& [key, runs] : groups) {
        out << "    " << key << ": " << runs.size() << (runs.size() == 1 ? " run" : " runs") << "\n";
        // The local times, wrapped, at most kShown of them.
        constexpr size_t kShown = 12;
        size_t col = 80;
        for (size_t k = 0; k < runs.size() && k < kShown; ++k) {
          std::string t = format_local(model.zone->to_local(runs[k])) + (k + 1 < runs.size() ? "," : "");
          if (col + t.size() + 1 > 78) out << (k ? "\n" : "") << "      ", col = 6;
          else out << " ", ++col;
          out << t;
          col += t.size();
        }
        if (runs.size() > kShown) out << " and " << runs.size() - kShown << " more (--format json lists every run)";
        out << "\n";
      }
    }
  }

  out << "\nruns per model (before -> after):\n";
  std::vector<RunCounts> before = run_counts(*r.plan, *r.before);
  std::vector<RunCounts> now = run_counts(plan, after);
  size_t width = 0;
  for (const Model& m : plan.models) width = std::max(width, m.id.size());
  for (size_t m = 0; m < plan.models.size(); ++m) {
    const RunCounts& b = before[m];
    const RunCounts& a = now[m];
    auto pair = [](int x, int y) { return x == y ? std::to_string(x) : std::to_string(x) + " -> " + std::to_string(y); };
    std::string id = plan.models[m].id;
    out << "  " << id << std::string(width - id.size(), ' ') << "  ok " << pair(b.ok, a.ok) << ", degraded "
        << pair(b.degraded, a.degraded) << ", failed " << pair(b.fail, a.fail);
    if (b.total() != a.total()) out << " (runs " << b.total() << " -> " << a.total() << ")";
    out << "\n";
  }
}

void write_what_if_json(std::ostream& out, const WhatIfResult& r) {
  out << "{\"edits\": [";
  for (size_t i = 0; i < r.edits.size(); ++i) out << (i ? ", " : "") << edit_json(*r.plan, r.edits[i]);
  out << "],\n \"after\": ";
  write_check_json(out, *r.edited, *r.after);
  out << ", \"changed\": [";
  for (size_t i = 0; i < r.changes.size(); ++i) {
    const StatusChange& c = r.changes[i];
    const Model& model = r.edited->models[static_cast<size_t>(c.model)];
    out << (i ? ",\n  " : "\n  ") << "{\"model\": " << json_quote(model.id) << ", \"at\": \""
        << format_rfc3339(c.at, model.zone) << "\", \"before\": \"" << to_string(c.before) << "\", \"after\": \""
        << to_string(c.after) << "\"}";
  }
  out << "]}\n";
}

}  // namespace readyby
