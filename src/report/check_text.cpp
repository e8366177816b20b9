#include "report/check_text.h"

#include <algorithm>
#include <climits>
#include <cstdio>

#include "report/failure_patterns.h"
#include "util/text.h"

namespace readyby {

namespace {

struct Paint {
  bool on;
  std::string operator()(const char* code, const std::string& text) const {
    return on ? std::string("\033[") + code + "m" + text + "\033[0m" : text;
  }
};
constexpr const char* kRed = "31;1";
constexpr const char* kGreen = "32";
constexpr const char* kYellow = "33";
constexpr const char* kBold = "1";
constexpr const char* kDim = "2";

std::string ids(const Plan& plan, const std::vector<int>& nodes, const char* sep) {
  std::string out;
  for (int n : nodes) out += (out.empty() ? "" : sep) + plan.nodes[static_cast<size_t>(n)].id;
  return out;
}

std::string pad(const std::string& s, size_t width) { return s.size() >= width ? s : s + std::string(width - s.size(), ' '); }

}  // namespace

std::string local_with_offset(Instant t, const Zone* zone) {
  std::string rfc = format_rfc3339(t, zone);
  return format_local(zone->to_local(t)) + " " + rfc.substr(19);
}

void write_check_text(std::ostream& out, const Plan& plan, const Evaluation& ev, TextStyle style) {
  Paint paint{style.colour};
  LocalDays last = ev.from + date::days(ev.days - 1);
  out << paint(kBold, "readyby check: plan " + plan.id) << (plan.title.empty() ? "" : " — " + plan.title) << "\n";
  out << "window: " << format_date(ev.from) << " to " << format_date(last) << " (" << ev.days << " days, local dates of each model's zone)\n";

  std::vector<FailurePattern> patterns = failure_patterns(plan, ev);
  for (size_t m = 0; m < plan.models.size(); ++m) {
    const Model& model = plan.models[m];
    int ok = 0, degraded = 0, failed = 0;
    int64_t tightest = INT64_MAX;
    const RunResult* tightest_run = nullptr;
    for (const RunResult& run : ev.runs) {
      if (run.model != static_cast<int>(m)) continue;
      (run.status == RunStatus::ok ? ok : run.status == RunStatus::degraded ? degraded : failed)++;
      for (const FeatureResult& f : run.features) {
        if (f.optional || f.status == FeatureStatus::never) continue;
        if (f.slack_seconds < tightest) tightest = f.slack_seconds, tightest_run = &run;
      }
    }
    int total = ok + degraded + failed;
    out << "\n" << paint(kBold, "model " + model.id) << " (" << model.zone->name() << "): " << total << " runs — ";
    out << paint(kGreen, std::to_string(ok) + " ok") << ", "
        << (degraded ? paint(kYellow, std::to_string(degraded) + " degraded") : "0 degraded") << ", "
        << (failed ? paint(kRed, std::to_string(failed) + " failed") : "0 failed");
    if (tightest_run) {
      out << "; tightest slack " << human_duration(tightest) << " ("
          << format_local(model.zone->to_local(tightest_run->at)) << ")";
    }
    out << "\n";
    if (degraded) {
      // Name the optional features that are missed, once each.
      std::vector<int> missed;
      for (const RunResult& run : ev.runs) {
        if (run.model != static_cast<int>(m)) continue;
        for (const FeatureResult& f : run.features) {
          if (f.optional && f.status != FeatureStatus::ok &&
              std::find(missed.begin(), missed.end(), f.feature) == missed.end()) {
            missed.push_back(f.feature);
          }
        }
      }
      out << "  " << paint(kYellow, "degraded") << ": optional feature" << (missed.size() > 1 ? "s " : " ")
          << ids(plan, missed, ", ") << " not fresh in some runs (the model scores without them)\n";
    }
    for (const FailurePattern& p : patterns) {
      if (p.model != static_cast<int>(m)) continue;
      out << "  " << paint(kRed, "✗ " + p.description) << "\n";
      // How late each failing feature was, worst run of the pattern.
      std::string late;
      for (int f : p.failing_features) {
        int64_t worst = INT64_MAX;
        bool never = false;
        for (size_t r : p.runs) {
          for (const FeatureResult& fr : ev.runs[r].features) {
            if (fr.feature != f) continue;
            if (fr.status == FeatureStatus::never) never = true;
            else worst = std::min(worst, fr.slack_seconds);
          }
        }
        late += (late.empty() ? "" : ", ") + plan.nodes[static_cast<size_t>(f)].id +
                (never ? " (never fresh)" : worst < 0 ? " (late by up to " + human_duration(-worst) + ")" : "");
      }
      out << "      not fresh: " << late << "\n";
      out << "      chain: " << ids(plan, p.critical_chain, " → ") << "\n";
      if (p.fix) {
        out << "      fix: " << p.fix->text
            << (p.runs.size() > 1 ? " (worst run, " + format_local(model.zone->to_local(ev.runs[p.worst_run].at)) + ")" : "")
            << "\n";
      }
      if (p.start_later_seconds) {
        out << "      or: start the run " << human_duration(*p.start_later_seconds) << " later"
            << (p.runs.size() > 1 ? " (enough for every run of this pattern)" : "") << "\n";
      } else {
        out << "      or: no later start within " << human_duration(kLaterStartSearch) << " fixes it\n";
      }
      for (int job : p.stale_jobs) {
        if (p.fix && p.fix->node == job) continue;  // the fix already says it
        const Node& n = plan.nodes[static_cast<size_t>(job)];
        out << "      " << paint(kYellow, "stale read") << ": " << to_string(n.kind) << " '" << n.id
            << "' starts on a fixed schedule (\"" << n.trigger->text
            << "\") before its input has landed; that start reads old data\n";
      }
      out << paint(kDim, "      runs: ");
      std::string runs;
      size_t shown = 0;
      for (size_t r : p.runs) {
        if (shown++ == 6) {
          runs += ", …";
          break;
        }
        runs += (runs.empty() ? "" : ", ") + format_local(model.zone->to_local(ev.runs[r].at));
      }
      out << paint(kDim, runs) << "\n";
    }
  }
  if (!ev.findings.empty()) {
    out << "\n" << paint(kBold, "findings") << "\n";
    for (const Finding& f : ev.findings) {
      out << "  " << (f.kind == "lookback" ? paint(kYellow, f.kind) : paint(kDim, f.kind)) << ": " << f.message << "\n";
    }
  }
  out << "\n" << (ev.ok() ? paint(kGreen, "every run is ok or degraded") : paint(kRed, "some runs fail")) << "\n";
}

void write_run_explanation_text(std::ostream& out, const Plan& plan, const Evaluation& ev, TextStyle style) {
  Paint paint{style.colour};
  const RunResult& run = ev.runs.front();
  const Model& model = plan.models[static_cast<size_t>(run.model)];
  const char* status_colour = run.status == RunStatus::ok ? kGreen : run.status == RunStatus::degraded ? kYellow : kRed;
  out << paint(kBold, "run of model " + model.id + " at " + local_with_offset(run.at, model.zone)) << ": "
      << paint(status_colour, to_string(run.status)) << "\n";
  for (const FeatureResult& f : run.features) {
    const Node& feature = plan.nodes[static_cast<size_t>(f.feature)];
    out << "\n" << paint(kBold, "feature " + feature.id) << (f.optional ? " (optional)" : "")
        << ": max_age " << format_duration(feature.max_age) << ", needs data through "
        << local_with_offset(f.needs_data_through, model.zone) << "\n";
    if (f.ready_at) {
      out << "  ready " << local_with_offset(*f.ready_at, model.zone) << ", slack " << human_duration(f.slack_seconds)
          << ": " << paint(f.status == FeatureStatus::ok ? kGreen : kRed, to_string(f.status)) << "\n";
    } else {
      out << "  " << paint(kRed, "never") << ": no qualifying delivery within 1,462 days\n";
    }
    std::vector<ChainStep> steps = explain_chain(plan, ev, f, run.at);
    out << "  " << pad("step", 28) << pad("kind", 9) << pad("lands", 25) << pad("latest on time", 25) << "slack\n";
    for (const ChainStep& s : steps) {
      const Node& n = plan.nodes[static_cast<size_t>(s.node)];
      std::string kind = to_string(n.kind);
      std::string lands = s.ready ? local_with_offset(*s.ready, model.zone) : "never";
      std::string latest = s.latest ? local_with_offset(*s.latest, model.zone) : "—";
      std::string slack = s.ready && s.latest ? human_duration((*s.latest - *s.ready).count()) : "—";
      bool negative = s.ready && s.latest && *s.latest < *s.ready;
      out << "  " << pad(n.id, 28) << pad(kind, 9) << pad(lands, 25) << pad(latest, 25)
          << (negative ? paint(kRed, slack) : slack) << "\n";
      if (n.kind == NodeKind::source) {
        out << paint(kDim, "      " + (n.stream ? std::string("stream") : "schedule " + n.schedule->text + " (" + n.zone->name() + ")") +
                               ", lands_after " + format_duration(n.lands_after) +
                               (n.stream ? "" : ", data_lag " + format_duration(n.data_lag)))
            << "\n";
      } else {
        out << paint(kDim, "      " + (n.trigger ? "starts at " + n.trigger->text + " (" + n.zone->name() + ")"
                                                 : std::string("starts when its inputs land")) +
                               ", run_time " + format_duration(n.run_time))
            << "\n";
      }
      if (s.stale_start) {
        out << "      " << paint(kYellow, "stale read") << ": its start at " << local_with_offset(*s.stale_start, model.zone)
            << " came before its input landed\n";
      }
    }
  }
}

void write_run_explanation_json(std::ostream& out, const Plan& plan, const Evaluation& ev) {
  const RunResult& run = ev.runs.front();
  const Model& model = plan.models[static_cast<size_t>(run.model)];
  out << "{\"model\": " << json_quote(model.id) << ", \"at\": \"" << format_rfc3339(run.at, model.zone)
      << "\", \"status\": \"" << to_string(run.status) << "\",\n \"features\": [";
  bool first = true;
  for (const FeatureResult& f : run.features) {
    out << (first ? "\n  " : ",\n  ");
    first = false;
    out << "{\"feature\": " << json_quote(plan.nodes[static_cast<size_t>(f.feature)].id)
        << ", \"optional\": " << (f.optional ? "true" : "false") << ", \"needs_data_through\": \""
        << format_rfc3339(f.needs_data_through, model.zone) << "\", \"ready_at\": ";
    if (f.ready_at) out << '"' << format_rfc3339(*f.ready_at, model.zone) << "\", \"slack_seconds\": " << f.slack_seconds;
    else out << "null, \"slack_seconds\": null";
    out << ", \"status\": \"" << to_string(f.status) << "\", \"steps\": [";
    bool first_step = true;
    for (const ChainStep& s : explain_chain(plan, ev, f, run.at)) {
      const Node& n = plan.nodes[static_cast<size_t>(s.node)];
      out << (first_step ? "" : ", ") << "{\"node\": " << json_quote(n.id) << ", \"kind\": \"" << to_string(n.kind)
          << "\", \"ready_at\": ";
      first_step = false;
      if (s.ready) out << '"' << format_rfc3339(*s.ready, model.zone) << '"'; else out << "null";
      out << ", \"latest\": ";
      if (s.latest) out << '"' << format_rfc3339(*s.latest, model.zone) << '"'; else out << "null";
      out << ", \"slack_seconds\": ";
      if (s.ready && s.latest) out << (*s.latest - *s.ready).count(); else out << "null";
      if (s.stale_start) out << ", \"stale_start\": \"" << format_rfc3339(*s.stale_start, model.zone) << '"';
      out << "}";
    }
    out << "]}";
  }
  out << "]}\n";
}

}  // namespace readyby
