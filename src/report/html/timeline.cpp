#include "report/html/timeline.h"

#include <algorithm>
#include <climits>
#include <cmath>

#include "report/html/calendar.h"
#include "report/html/markup.h"
#include "report/html/palette.h"

namespace readyby::html {

namespace {

constexpr double kWidth = 720, kX0 = 246, kX1 = 706, kTop = 44, kRow = 30, kAxis = 42;

struct Scale {
  int64_t lo = 0, hi = 1;
  double x(Instant t) const {
    return kX0 + (kX1 - kX0) * static_cast<double>(to_unix(t) - lo) / static_cast<double>(hi - lo);
  }
};

Scale scale_for(const ExplainedRun& run) {
  int64_t lo = to_unix(run.needs_data_through), hi = to_unix(run.deadline);
  auto take = [&](const std::optional<Instant>& t) {
    if (!t) return;
    lo = std::min(lo, to_unix(*t));
    hi = std::max(hi, to_unix(*t));
  };
  take(run.deadline);
  for (const TimelineStep& s : run.steps) {
    take(s.start);
    take(s.landed);
    take(s.latest);
    take(s.stale_start);
  }
  int64_t pad = std::max<int64_t>((hi - lo) / 25, 300);
  return Scale{lo - pad, hi + pad};
}

// A local time for labels: "HH:MM", or "MM-DD HH:MM" when the axis spans days.
std::string when(const Zone& zone, Instant t, bool with_date) {
  std::string s = format_local(zone.to_local(t));
  return with_date ? s.substr(5) : s.substr(11);
}

// Tick spacing (seconds) giving at most 8 ticks over `span`.
int64_t tick_step(int64_t span) {
  const int64_t steps[] = {900, 1800, 3600, 7200, 10800, 21600, 43200, 86400, 172800, 604800, 2419200};
  for (int64_t s : steps) {
    if (span / s <= 8) return s;
  }
  return 2419200;
}

void write_axis(std::string& out, const Scale& sc, const Zone& zone, double y) {
  out += "<line class=\"axis\" x1=\"" + num(kX0) + "\" y1=\"" + num(y) + "\" x2=\"" + num(kX1) + "\" y2=\"" + num(y) +
         "\"/>";
  int64_t step = tick_step(sc.hi - sc.lo);
  // Ticks fall on whole multiples of the step in local time.
  LocalTime first_local = zone.to_local(from_unix(sc.lo));
  int64_t l = first_local.time_since_epoch().count();
  l = (l / step + 1) * step;
  std::string last_day;
  for (int guard = 0; guard < 40; ++guard, l += step) {
    Instant t = zone.from_local(LocalTime(Seconds(l)));
    if (to_unix(t) > sc.hi) break;
    double x = sc.x(t);
    std::string local = format_local(zone.to_local(t));
    std::string day = local.substr(5, 5);
    std::string label = day != last_day ? day + " " + local.substr(11) : local.substr(11);
    if (step >= 86400) label = day;
    last_day = day;
    out += "<line class=\"tick\" x1=\"" + num(x) + "\" y1=\"" + num(kTop - 4) + "\" x2=\"" + num(x) + "\" y2=\"" +
           num(y + 4) + "\"/><text class=\"small\" x=\"" + num(x) + "\" y=\"" + num(y + 16) +
           "\" text-anchor=\"middle\">" + label + "</text>";
  }
}

std::string headroom_words(const TimelineStep& s) {
  if (!s.landed) return "never lands";
  if (!s.latest) return "";
  int64_t h = (*s.latest - *s.landed).count();
  return h >= 0 ? human_duration(h) + " to spare" : human_duration(-h) + " late";
}

void write_vertical(std::string& out, const char* cls, double x, double y0, double y1, double label_y,
                    const std::string& label) {
  out += "<line class=\"" + std::string(cls) + "\" x1=\"" + num(x) + "\" y1=\"" + num(y0) + "\" x2=\"" + num(x) +
         "\" y2=\"" + num(y1) + "\"/>";
  const char* anchor_side = x > (kX0 + kX1) / 2 ? "end" : "start";
  double tx = x > (kX0 + kX1) / 2 ? x - 3 : x + 3;
  out += "<text class=\"lbl-" + std::string(cls).substr(5) + "\" x=\"" + num(tx) + "\" y=\"" + num(label_y) +
         "\" text-anchor=\"" + anchor_side + "\">" + esc(label) + "</text>";
}

void write_svg(std::string& out, const Plan& plan, const Model& model, const ExplainedRun& run,
               const std::string& caption_id) {
  const Zone& zone = *model.zone;
  Scale sc = scale_for(run);
  bool dates = sc.hi - sc.lo > 20 * 3600;
  double rows_h = kRow * static_cast<double>(run.steps.size());
  double height = kTop + rows_h + kAxis;
  out += "<svg class=\"timeline-svg\" viewBox=\"0 0 " + num(kWidth) + " " + num(height) + "\" width=\"" + num(kWidth) +
         "\" role=\"img\" aria-labelledby=\"" + caption_id + "\"><title>" +
         esc("Chain of " + plan.nodes[static_cast<size_t>(run.feature)].id + " for the run at " +
             format_local(zone.to_local(run.deadline))) +
         "</title>";
  double y_axis = kTop + rows_h + 6;
  write_axis(out, sc, zone, y_axis);
  for (size_t i = 0; i < run.steps.size(); ++i) {
    const TimelineStep& s = run.steps[i];
    const Node& n = plan.nodes[static_cast<size_t>(s.node)];
    double y = kTop + kRow * static_cast<double>(i);
    std::string title = n.id + " (" + to_string(n.kind) + ")";
    if (s.start) title += ": starts " + format_local(zone.to_local(*s.start));
    title += s.landed ? ", lands " + format_local(zone.to_local(*s.landed)) : ", never lands";
    if (s.latest) title += ", latest on time " + format_local(zone.to_local(*s.latest));
    std::string headroom = headroom_words(s);
    if (!headroom.empty()) title += " (" + headroom + ")";
    if (s.at_fault) title += "; the step at fault";
    out += "<g class=\"step" + std::string(s.at_fault ? " at-fault" : "") + "\" data-node=\"" + esc(n.id) +
           "\"><title>" + esc(title) + "</title>";
    if (i % 2 == 1) {
      out += "<rect class=\"band\" x=\"0\" y=\"" + num(y) + "\" width=\"" + num(kWidth) + "\" height=\"" + num(kRow) +
             "\"/>";
    }
    out += "<text class=\"step-id\" x=\"6\" y=\"" + num(y + 12) + "\">" + esc(n.id) + "</text>";
    std::string detail = std::string(to_string(n.kind)) + " · " +
                         (s.landed ? "lands " + when(zone, *s.landed, dates) : std::string("never lands"));
    bool late = s.landed && s.latest && *s.landed > *s.latest;
    out += "<text class=\"small\" x=\"6\" y=\"" + num(y + 24) + "\">" + esc(detail) + "</text>";
    if (!headroom.empty() && s.landed) {
      out += "<text class=\"small lbl-" + std::string(late ? "fail" : "ok") + "\" x=\"" + num(kX0 - 6) + "\" y=\"" +
             num(y + 24) + "\" text-anchor=\"end\">" + esc(headroom) + "</text>";
    }
    if (s.at_fault) {
      out += "<text class=\"lbl-fail strong\" x=\"" + num(kX0 - 6) + "\" y=\"" + num(y + 12) +
             "\" text-anchor=\"end\">at fault</text>";
    }
    double bar_y = y + 8, bar_h = 14;
    // A wait between the previous step's landing and this step's start (a fixed start).
    if (i > 0 && s.start && run.steps[i - 1].landed && *s.start > *run.steps[i - 1].landed) {
      out += "<line class=\"wait\" x1=\"" + num(sc.x(*run.steps[i - 1].landed)) + "\" y1=\"" + num(bar_y + 7) +
             "\" x2=\"" + num(sc.x(*s.start)) + "\" y2=\"" + num(bar_y + 7) + "\"><title>" +
             esc("waits " + human_duration((*s.start - *run.steps[i - 1].landed).count()) + " for its start") +
             "</title></line>";
    }
    if (s.landed && s.start) {
      double x0 = sc.x(*s.start), x1 = std::max(sc.x(*s.landed), x0 + 2);
      out += "<rect class=\"" + std::string(s.at_fault ? "bar-fault" : "bar") + "\" x=\"" + num(x0) + "\" y=\"" +
             num(bar_y) + "\" width=\"" + num(x1 - x0) + "\" height=\"" + num(bar_h) + "\"/>";
      out += "<line class=\"land\" x1=\"" + num(x1) + "\" y1=\"" + num(bar_y - 2) + "\" x2=\"" + num(x1) + "\" y2=\"" +
             num(bar_y + bar_h + 2) + "\"/>";
    } else {
      // Never: a dashed arrow to the right edge.
      double x0 = sc.x(run.needs_data_through);
      out += "<line class=\"never\" x1=\"" + num(x0) + "\" y1=\"" + num(bar_y + 7) + "\" x2=\"" + num(kX1 - 6) +
             "\" y2=\"" + num(bar_y + 7) + "\"/><path class=\"st-fail\" d=\"M" + num(kX1 - 8) + " " + num(bar_y + 2) +
             "L" + num(kX1) + " " + num(bar_y + 7) + "L" + num(kX1 - 8) + " " + num(bar_y + 12) + "Z\"/>";
    }
    if (s.latest) {
      double x = sc.x(*s.latest);
      out += "<path class=\"caret\" d=\"M" + num(x - 4) + " " + num(y + 2) + "L" + num(x + 4) + " " + num(y + 2) + "L" +
             num(x) + " " + num(y + 8) + "Z\"/>";
    }
    if (s.stale_start) {
      out += "<circle class=\"stale\" cx=\"" + num(sc.x(*s.stale_start)) + "\" cy=\"" + num(bar_y + 7) + "\" r=\"5\"/>";
    }
    out += "</g>";
  }
  double y_end = kTop + rows_h;
  write_vertical(out, "line-needs", sc.x(run.needs_data_through), 18, y_end, 12,
                 "data needed through " + when(zone, run.needs_data_through, dates));
  write_vertical(out, "line-due", sc.x(run.deadline), 30, y_end, 27, "run " + when(zone, run.deadline, dates));
  std::string verdict = run.status == FeatureStatus::never ? "never fresh"
                        : *run.slack_seconds >= 0       ? "slack " + human_duration(*run.slack_seconds)
                                                        : "late by " + human_duration(-*run.slack_seconds);
  double dx = sc.x(run.deadline);
  bool right = dx < kX1 - 90;
  out += "<text class=\"strong lbl-" + std::string(run.status == FeatureStatus::ok ? "ok" : "fail") + "\" x=\"" +
         num(right ? dx + 4 : dx - 4) + "\" y=\"" + num(y_end - 4) + "\" text-anchor=\"" + (right ? "start" : "end") +
         "\">" + esc(verdict) + "</text>";
  out += "</svg>";
}

void write_steps_table(std::string& out, const Plan& plan, const Zone& zone, const ExplainedRun& run) {
  out += "<table class=\"grid steps\"><thead><tr><th scope=\"col\">step</th><th scope=\"col\">kind</th>"
         "<th scope=\"col\">starts</th><th scope=\"col\">lands</th><th scope=\"col\">latest on time</th>"
         "<th scope=\"col\">headroom</th></tr></thead><tbody>";
  auto cell = [&](const std::optional<Instant>& t) { return t ? format_local(zone.to_local(*t)) : std::string("—"); };
  for (const TimelineStep& s : run.steps) {
    const Node& n = plan.nodes[static_cast<size_t>(s.node)];
    bool late = !s.landed || (s.latest && *s.landed > *s.latest);
    out += "<tr" + std::string(s.at_fault ? " class=\"c-fail\"" : "") + "><td>" + esc(n.id) +
           (s.at_fault ? " (at fault)" : "") + "</td><td>" + to_string(n.kind) + "</td><td>" + cell(s.start) +
           "</td><td>" + (s.landed ? cell(s.landed) : "never") + "</td><td>" + cell(s.latest) + "</td><td" +
           (late ? " class=\"c-fail\"" : "") + ">" + esc(headroom_words(s)) + "</td></tr>";
  }
  out += "</tbody></table>";
}

std::string run_summary(const Plan& plan, const Model& model, const ExplainedRun& run) {
  std::string feature = plan.nodes[static_cast<size_t>(run.feature)].id;
  std::string s = "Run at " + format_local(model.zone->to_local(run.deadline)) + " (" + model.zone->name() +
                  "): feature " + feature + " needs data through " +
                  format_local(model.zone->to_local(run.needs_data_through)) + "; ";
  if (run.status == FeatureStatus::never) return s + "no delivery ever reaches it.";
  return s + "ready " + format_local(model.zone->to_local(run.deadline - Seconds(*run.slack_seconds))) + ", " +
         (*run.slack_seconds >= 0 ? "slack " + human_duration(*run.slack_seconds)
                                  : "late by " + human_duration(-*run.slack_seconds)) +
         ".";
}

void write_figure(std::string& out, const PageFacts& page, const ExplainedRun& run, const std::string& id,
                  const std::string& data_pattern, const std::string& heading_html, const std::string& after) {
  const RunResult& result = page.evaluation->runs[run.run];
  const Plan& plan = *page.plan;
  const Model& model = plan.models[static_cast<size_t>(result.model)];
  std::string caption_id = id + "-cap";
  out += "<figure class=\"timeline\" id=\"" + id + "\" data-model=\"" + esc(model.id) + "\" data-status=\"" +
         status_word(result.status) + "\"";
  if (!data_pattern.empty()) out += " data-pattern=\"" + esc(data_pattern) + "\"";
  out += ">" + heading_html;
  write_svg(out, plan, model, run, caption_id);
  out += "<figcaption id=\"" + caption_id + "\">" + esc(run_summary(plan, model, run)) +
         " Each bar runs from a step's start to its landing, a dotted line is a wait for a fixed start, and a caret "
         "marks the latest landing that keeps the run on time.</figcaption>" +
         after;
  write_steps_table(out, plan, *model.zone, run);
  out += "</figure>";
}

}  // namespace

void write_pattern_timeline(std::string& out, const PageFacts& page, size_t index) {
  const Plan& plan = *page.plan;
  const PatternFacts& p = page.advice.patterns[index];
  const Model& model = plan.models[static_cast<size_t>(p.model)];
  std::string heading = "<h4><svg class=\"mark\" viewBox=\"0 0 14 14\" width=\"14\" height=\"14\" aria-hidden=\"true\">" +
                        status_mark(p.status, 7, 7, 12) + "</svg> " + esc(p.description) + "</h4>";
  std::string after;
  if (!p.cause.empty()) after += "<p class=\"cause\"><strong>Cause</strong> (worst run): " + esc(p.cause) + ".</p>";
  for (size_t i = 0; i < p.fixes.size(); ++i) {
    const FixFacts& fix = p.fixes[i];
    after += "<p class=\"fix\"><strong>" + std::string(i == 0 ? "Fix" : "Or") + "</strong>: " + esc(fix.text) +
             "<br><span class=\"" + (fix.breaks_others ? "effect-worse" : "effect") + "\">" + esc(fix.effect) +
             "</span></p>";
  }
  if (p.fixes.empty()) after += "<p class=\"fix\"><strong>No fix</strong>: " + esc(p.no_fix) + "</p>";
  for (size_t i = 0; i < p.worst.steps.size(); ++i) {
    const TimelineStep& step = p.worst.steps[i];
    if (!step.stale_start || step.at_fault) continue;
    const Node& n = plan.nodes[static_cast<size_t>(step.node)];
    after += "<p class=\"note\">Stale read: " + std::string(to_string(n.kind)) + " " + esc(n.id) +
             " starts on a fixed schedule (" + esc(n.trigger ? n.trigger->text : "") + ") at " +
             format_local(model.zone->to_local(*step.stale_start)) +
             ", before its input lands; that start reads old data (ring on the chart).</p>";
  }
  std::string runs;
  size_t shown = 0;
  for (size_t r : p.runs) {
    if (shown++ == 8) {
      runs += ", …";
      break;
    }
    runs += (runs.empty() ? "" : ", ") + format_local(model.zone->to_local(page.evaluation->runs[r].at));
  }
  after += "<p class=\"note\">" + std::to_string(p.runs.size()) + (p.runs.size() == 1 ? " run: " : " runs: ") +
           esc(runs) + "</p>";
  write_figure(out, page, p.worst, pattern_anchor(plan, page, index), p.description, heading, after);
}

void write_run_timeline(std::string& out, const PageFacts& page, const ExplainedRun& run, const std::string& heading) {
  const Model& model = page.plan->models[static_cast<size_t>(page.evaluation->runs[run.run].model)];
  write_figure(out, page, run, anchor("tightest-", model.id), "", "<h4>" + esc(heading) + "</h4>", "");
}

}  // namespace readyby::html
