#include "report/check_text.h"

#include <algorithm>
#include <climits>
#include <cstdio>

#include "engine/fixes.h"
#include "engine/patterns.h"
#include "report/advice_text.h"
#include "report/check_json.h"
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

// Pads to `width` characters (UTF-8 aware).
std::string pad(const std::string& s, size_t width) {
  size_t chars = 0;
  for (unsigned char c : s) chars += (c & 0xC0) != 0x80;
  return chars >= width ? s : s + std::string(width - chars, ' ');
}

}  // namespace

std::string local_with_offset(Instant t, const Zone* zone) {
  std::string rfc = format_rfc3339(t, zone);
  return format_local(zone->to_local(t)) + " " + rfc.substr(19);
}

namespace {

std::string feature_lateness(const Plan& plan, const Pattern& p) {
  std::string out;
  for (const PatternFeature& f : p.features) {
    out += (out.empty() ? "" : ", ") + plan.nodes[static_cast<size_t>(f.feature)].id;
    if (f.never) out += " (never fresh)";
    else if (f.worst_late_seconds > 0) out += " (late by up to " + human_duration(f.worst_late_seconds) + ")";
  }
  return out;
}

void write_fixes(std::ostream& out, const Plan& plan, const Pattern& p, const FixSearch& search, const Paint& paint,
                 const char* indent) {
  if (search.fixes.empty()) {
    out << indent << "fix: " << describe_no_fix(plan, p, search) << "\n";
    return;
  }
  for (size_t i = 0; i < search.fixes.size(); ++i) {
    const Fix& fix = search.fixes[i];
    out << indent << (i == 0 ? "fix: " : "or: ") << describe_fix(plan, p, fix) << "\n";
    const std::string effect = describe_effect(plan, fix);
    out << indent << "     " << (fix.breaks_others() ? paint(kYellow, effect) : paint(kDim, effect)) << "\n";
  }
}

void write_pattern(std::ostream& out, const Plan& plan, const Pattern& p, const FixSearch& search,
                   const Paint& paint) {
  const Model& model = plan.models[static_cast<size_t>(p.model)];
  const bool fail = p.status == RunStatus::fail;
  out << "  " << paint(fail ? kRed : kYellow, std::string(fail ? "✗ " : "~ ") + describe_pattern(plan, p)) << "\n";
  out << "      " << (fail ? "not fresh: " : "optional, not fresh: ") << feature_lateness(plan, p) << "\n";
  std::vector<int> chain;
  for (const BlameStep& s : p.blame.steps) chain.push_back(s.node);
  out << "      chain: " << ids(plan, chain, " → ") << "\n";
  const std::string cause = describe_cause(plan, p.blame, model.zone);
  if (!cause.empty()) {
    out << "      cause: " << cause
        << (p.runs.size() > 1 ? " (worst run, " + format_local(model.zone->to_local(p.worst_run)) + ")" : "") << "\n";
  }
  write_fixes(out, plan, p, search, paint, "      ");
  for (size_t i = 0; i < p.blame.steps.size(); ++i) {
    const BlameStep& s = p.blame.steps[i];
    if (!s.stale_start || static_cast<int>(i) == p.blame.cause) continue;
    const Node& n = plan.nodes[static_cast<size_t>(s.node)];
    out << "      " << paint(kYellow, "stale read") << ": " << to_string(n.kind) << " '" << n.id
        << "' starts on a fixed schedule (\"" << n.trigger->text << "\") at "
        << format_local(model.zone->to_local(*s.stale_start)) << ", before its input has landed; that start reads old data\n";
  }
  std::string runs;
  size_t shown = 0;
  for (Instant r : p.runs) {
    if (shown++ == 6) {
      runs += ", …";
      break;
    }
    runs += (runs.empty() ? "" : ", ") + format_local(model.zone->to_local(r));
  }
  out << paint(kDim, "      runs: " + runs) << "\n";
}

}  // namespace

void write_check_text(std::ostream& out, const Plan& plan, const Evaluation& ev, TextStyle style) {
  Paint paint{style.colour};
  // One pass over the runs (computed now when the evaluation is lazy); only
  // the runs that are not ok are remembered, as small records.
  PatternCollector collector(plan, ev);
  collect_runs(ev, &collector);
  const std::vector<Pattern> patterns = collector.patterns();
  FixFinder finder(collector);

  LocalDays last = ev.from + date::days(ev.days - 1);
  out << paint(kBold, "readyby check: plan " + plan.id) << (plan.title.empty() ? "" : " — " + plan.title) << "\n";
  out << "window: " << format_date(ev.from) << " to " << format_date(last) << " (" << ev.days << " days, local dates of each model's zone)\n";

  bool failed_any = false;
  for (size_t m = 0; m < plan.models.size(); ++m) {
    const Model& model = plan.models[m];
    const ModelSummary& s = collector.summaries()[m];
    failed_any = failed_any || s.failed > 0;
    out << "\n" << paint(kBold, "model " + model.id) << " (" << model.zone->name() << "): " << s.runs << " runs — ";
    out << paint(kGreen, std::to_string(s.ok) + " ok") << ", "
        << (s.degraded ? paint(kYellow, std::to_string(s.degraded) + " degraded") : "0 degraded") << ", "
        << (s.failed ? paint(kRed, std::to_string(s.failed) + " failed") : "0 failed");
    if (s.tightest_required_seconds) {
      out << "; tightest slack " << human_duration(*s.tightest_required_seconds) << " ("
          << format_local(model.zone->to_local(*s.tightest_required_at)) << ")";
    }
    if (s.tightest_optional_seconds) {
      out << "; optional features: tightest slack " << human_duration(*s.tightest_optional_seconds) << " ("
          << format_local(model.zone->to_local(*s.tightest_optional_at)) << ")";
    }
    out << "\n";
    if (s.degraded) {
      out << "  " << paint(kYellow, "degraded") << ": optional feature" << (s.degraded_features.size() > 1 ? "s " : " ")
          << ids(plan, s.degraded_features, ", ") << " not fresh in some runs (the model scores without them)\n";
    }
    for (const Pattern& p : patterns) {
      if (p.model == static_cast<int>(m)) write_pattern(out, plan, p, finder.find(p), paint);
    }
  }
  if (!ev.findings.empty()) {
    out << "\n" << paint(kBold, "findings") << "\n";
    for (const Finding& f : ev.findings) {
      out << "  " << (f.kind == "lookback" ? paint(kYellow, f.kind) : paint(kDim, f.kind)) << ": " << f.message << "\n";
    }
  }
  out << "\n" << (!failed_any ? paint(kGreen, "every run is ok or degraded") : paint(kRed, "some runs fail")) << "\n";
}

void write_run_explanation_text(std::ostream& out, const Plan& plan, const RunExplanation& x, TextStyle style) {
  Paint paint{style.colour};
  const RunResult& run = x.run;
  const Model& model = plan.models[static_cast<size_t>(run.model)];
  const LocalDays day = date::floor<date::days>(model.zone->to_local(run.at));
  const char* status_colour = run.status == RunStatus::ok ? kGreen : run.status == RunStatus::degraded ? kYellow : kRed;
  if (!x.scheduled) {
    out << paint(kYellow, "note") << ": " << format_local(model.zone->to_local(run.at)) << " is not a scheduled run of model "
        << model.id << " (runs at";
    for (const RunSpec& spec : model.runs) out << " \"" << spec.at.text << "\"";
    out << "); nearest scheduled runs: "
        << (x.previous_run ? local_with_offset(*x.previous_run, model.zone) : std::string("none")) << " before, "
        << (x.next_run ? local_with_offset(*x.next_run, model.zone) : std::string("none"))
        << " after. Explained as if it ran then.\n";
  }
  out << paint(kBold, std::string(x.scheduled ? "run" : "unscheduled run") + " of model " + model.id + " at " +
                          local_with_offset(run.at, model.zone))
      << ": " << paint(status_colour, to_string(run.status)) << "\n";
  for (size_t k = 0; k < run.features.size(); ++k) {
    const FeatureResult& f = run.features[k];
    const Blame& b = x.blames[k];
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
    out << "  " << pad("step", 28) << pad("kind", 9) << pad("lands", 25) << pad("latest on time", 25)
        << pad("late: own", 12) << "waiting\n";
    for (size_t i = 0; i < b.steps.size(); ++i) {
      const BlameStep& s = b.steps[i];
      const Node& n = plan.nodes[static_cast<size_t>(s.node)];
      const bool cause = static_cast<int>(i) == b.cause;
      std::string lands = s.ready ? local_with_offset(*s.ready, model.zone) : "never";
      std::string latest = s.deadline_before_data ? "— before its data"
                           : s.latest             ? local_with_offset(*s.latest, model.zone)
                                                  : "—";
      std::string own = s.own_late_seconds ? human_duration(s.own_late_seconds) : "-";
      std::string waited = s.waited_seconds ? human_duration(s.waited_seconds) : "-";
      out << "  " << pad(n.id, 28) << pad(to_string(n.kind), 9) << pad(lands, 25) << pad(latest, 25)
          << (s.own_late_seconds ? paint(kRed, pad(own, 12)) : pad(own, 12)) << waited
          << (cause ? paint(kRed, "  ← cause") : "") << "\n";
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
      if (s.stale_start && !cause) {
        out << "      " << paint(kYellow, "stale read") << ": its start at " << clock_on(*s.stale_start, model.zone, day)
            << " came before its input landed\n";
      }
    }
    const std::string cause = describe_cause(plan, b, model.zone);
    if (!cause.empty()) out << "  " << paint(kBold, "cause") << ": " << cause << "\n";
  }
  if (x.pattern && x.fixes) {
    out << "\n" << paint(kBold, "to make this run ok") << " (each fix re-checked; effects over " << x.window_days
        << " days from " << format_date(x.window_from) << ")\n";
    write_fixes(out, plan, *x.pattern, *x.fixes, paint, "  ");
  }
}

void write_run_explanation_json(std::ostream& out, const Plan& plan, const RunExplanation& x) {
  auto json_time = [](const std::optional<Instant>& t, const Zone* zone) {
    return t ? "\"" + format_rfc3339(*t, zone) + "\"" : std::string("null");
  };
  const RunResult& run = x.run;
  const Model& model = plan.models[static_cast<size_t>(run.model)];
  out << "{\"model\": " << json_quote(model.id) << ", \"at\": \"" << format_rfc3339(run.at, model.zone)
      << "\", \"status\": \"" << to_string(run.status) << "\", \"scheduled\": " << (x.scheduled ? "true" : "false")
      << ", \"previous_run\": " << (x.scheduled ? std::string("null") : json_time(x.previous_run, model.zone))
      << ", \"next_run\": " << (x.scheduled ? std::string("null") : json_time(x.next_run, model.zone)) << ",\n \"features\": [";
  for (size_t k = 0; k < run.features.size(); ++k) {
    const FeatureResult& f = run.features[k];
    const Blame& b = x.blames[k];
    out << (k == 0 ? "\n  " : ",\n  ");
    out << "{\"feature\": " << json_quote(plan.nodes[static_cast<size_t>(f.feature)].id)
        << ", \"optional\": " << (f.optional ? "true" : "false") << ", \"needs_data_through\": \""
        << format_rfc3339(f.needs_data_through, model.zone) << "\", \"ready_at\": ";
    if (f.ready_at) out << '"' << format_rfc3339(*f.ready_at, model.zone) << "\", \"slack_seconds\": " << f.slack_seconds;
    else out << "null, \"slack_seconds\": null";
    out << ", \"status\": \"" << to_string(f.status) << "\", \"steps\": " << blame_steps_json(plan, b, model.zone)
        << ", \"cause\": ";
    if (b.cause < 0) {
      out << "null";
    } else {
      out << "{\"node\": " << json_quote(plan.nodes[static_cast<size_t>(b.cause_node())].id) << ", \"kind\": \""
          << to_string(b.kind) << "\", \"text\": " << json_quote(describe_cause(plan, b, model.zone)) << "}";
    }
    out << "}";
  }
  out << "],\n ";
  if (x.pattern && x.fixes) out << fix_keys_json(plan, *x.pattern, *x.fixes);
  else out << "\"fixes\": null, \"no_fix\": null";
  out << "}\n";
}

}  // namespace readyby
