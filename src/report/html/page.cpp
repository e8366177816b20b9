#include "report/html/page.h"

#include <filesystem>

#include "report/html/calendar.h"
#include "report/html/history_charts.h"
#include "report/html/intake_section.h"
#include "report/html/lineage_svg.h"
#include "report/html/markup.h"
#include "report/html/palette.h"
#include "report/html/timeline.h"

namespace readyby::html {

namespace {

const char kLayoutCss[] = R"CSS(
*{box-sizing:border-box}
body{margin:0;background:var(--paper);color:var(--ink);font:15px/1.45 ui-sans-serif,system-ui,sans-serif}
main{max-width:1060px;margin:0 auto;padding:20px 24px 40px}
h1{font-size:1.55em;margin:.2em 0 .1em}
h2{font-size:1.3em;margin:1.6em 0 .3em;padding-top:.5em;border-top:3px solid var(--ink)}
h3{font-size:1.08em;margin:1.3em 0 .4em}
h4{font-size:1em;margin:.6em 0 .3em}
a{color:var(--due)}
p{margin:.4em 0}
code{font-family:ui-monospace,monospace;font-size:.92em}
.soft,figcaption,.note{color:var(--ink-soft)}
figcaption{font-size:.88em;margin:.3em 0 .5em;max-width:62em}
figure{margin:.8em 0 1.4em}
svg{max-width:100%;height:auto;overflow:visible}
svg text{fill:var(--ink);font-size:11px;font-family:ui-sans-serif,system-ui,sans-serif}
svg text.small{font-size:9.5px;fill:var(--ink-soft)}
svg text.strong{font-weight:700}
.lbl-ok{fill:var(--ok)}.lbl-degraded{fill:var(--degraded)}.lbl-fail{fill:var(--fail)}
.lbl-due{fill:var(--due)}.lbl-needs{fill:var(--needs)}
svg text.small.lbl-ok{fill:var(--ok)}svg text.small.lbl-fail{fill:var(--fail)}svg text.small.lbl-due{fill:var(--due)}
.st-ok{fill:var(--ok)}.st-degraded{fill:var(--degraded)}.st-fail rect,path.st-fail{fill:var(--fail)}
.st-cut{stroke:var(--paper);stroke-width:1.6;fill:none}
.weekday{font-weight:600}
.day-box{fill:var(--panel);stroke:var(--rule)}
.day-box.clock-change{stroke:var(--due);stroke-dasharray:4 3;stroke-width:1.6}
.hatch{fill:url(#rb-hatch)}
.date{font-weight:600}
svg text.clock-tag{fill:var(--due);font-size:9.5px;font-weight:700}
svg text.note-skip{fill:var(--skip);font-size:9px}
.calendar-row{display:flex;flex-wrap:wrap;gap:8px 22px;align-items:flex-start}
.calendar-fig{flex:0 1 690px;margin:0}
.pattern-list{flex:1 1 240px;background:var(--panel);padding:8px 14px;border-left:4px solid var(--rule)}
.pattern-list ol{padding-left:1.1em;margin:.3em 0}.pattern-list li{margin:.3em 0}
.band{fill:var(--panel)}
.bar{fill:var(--bar)}.bar-fault{fill:var(--fail)}
.land{stroke:var(--ink);stroke-width:1.6}
.caret{fill:var(--due)}
.stale{fill:none;stroke:var(--degraded);stroke-width:2}
.never{stroke:var(--fail);stroke-dasharray:5 3;stroke-width:2}
.wait{stroke:var(--ink-soft);stroke-dasharray:2 3;stroke-width:2}
.line-needs{stroke:var(--needs);stroke-dasharray:6 4;stroke-width:1.6}
.line-due{stroke:var(--due);stroke-width:2}
.offsets .line-due{stroke-dasharray:5 3;stroke-width:1.4}
.line-needs.trend{stroke-dasharray:none;stroke-width:2}
.axis{stroke:var(--ink-soft)}.tick{stroke:var(--rule);stroke-width:.8}
.step-id{font-weight:600}
.fix{background:var(--panel);border-left:4px solid var(--due);padding:6px 10px;color:var(--ink);max-width:62em}
.fix .effect{color:var(--ink-soft)}.fix .effect-worse{color:var(--degraded);font-weight:600}
.cause{max-width:62em}
.edge{fill:none;stroke:var(--ink-soft);stroke-width:1.2;marker-end:url(#rb-arrow)}
.arrow-head{fill:var(--ink-soft)}
.lbox{fill:var(--panel);stroke:var(--ok);stroke-width:1.4}
.ln-degraded .lbox{stroke:var(--degraded);stroke-width:2.4}
.ln-fail .lbox{stroke:var(--fail);stroke-width:2.8}
.lmodel .lbox{stroke:var(--ink);stroke-width:1.4}.lbox-inner{fill:none;stroke:var(--ink);stroke-width:1}
.lid{font-weight:600}
.strip-ok rect{fill:var(--ok)}.strip-degraded rect{fill:var(--degraded)}.strip-fail rect{fill:var(--fail)}
.dot{fill:var(--ink-soft)}
.interval{stroke:var(--bar);stroke-width:7;stroke-linecap:round}
.small-multiples{display:flex;flex-wrap:wrap;gap:0 22px}
.small-multiples figure{flex:0 1 318px}
.flag{color:var(--fail);font-weight:700;font-size:.85em;border:1.5px solid var(--fail);padding:0 4px;border-radius:3px}
table.grid{border-collapse:collapse;margin:.5em 0 1em;font-size:.88em}
table.grid caption{text-align:left;font-weight:600;padding:.3em 0}
table.grid th,table.grid td{border:1px solid var(--rule);padding:3px 8px;text-align:left;vertical-align:top}
table.grid th{background:var(--panel)}
td.n{text-align:right;font-variant-numeric:tabular-nums}
.c-ok{background:var(--ok-tint);color:var(--ok)}
.c-degraded{background:var(--degraded-tint);color:var(--degraded)}
.c-fail{background:var(--fail-tint);color:var(--fail)}
tr.c-fail td{color:var(--ink)}
ul.criteria{margin:0;padding-left:1em}
ul.criteria li{background:none}
ul.criteria li.c-ok,ul.criteria li.c-degraded,ul.criteria li.c-fail{color:var(--ink)}
ul.criteria li.c-ok strong{color:var(--ok)}ul.criteria li.c-degraded strong{color:var(--degraded)}ul.criteria li.c-fail strong{color:var(--fail)}
details.numbers{margin:.2em 0 1em}
details.numbers summary{cursor:pointer;color:var(--due)}
.legend{display:flex;flex-wrap:wrap;gap:4px 18px;font-size:.9em;background:var(--panel);padding:8px 12px;margin:.8em 0}
.legend span{display:inline-flex;align-items:center;gap:6px}
.decision{border:2px solid var(--due);padding:8px 14px;margin:.6em 0}
.decision-word{font-size:1.3em;font-weight:700;color:var(--due)}
.cautions{background:var(--panel);border:2px solid var(--degraded);padding:6px 14px;margin:1em 0}
nav ol{columns:2;padding-left:1.2em}
.defs{position:absolute;width:0;height:0;overflow:hidden}
footer{margin-top:2em;font-size:.88em;color:var(--ink-soft)}
@media print{
  @page{size:A4;margin:12mm}
  body{font-size:10.5pt}
  main{max-width:none;padding:0}
  nav{display:none}
  section.model,section.history,section.intake{break-before:page}
  figure,table.grid tr,.fix,.pattern-list{break-inside:avoid}
  h2,h3,h4{break-after:avoid}
  details.numbers summary{display:none}
}
)CSS";

// Patterns, markers and (added by render_page, which closes the element) the
// status symbols shared by every SVG of the page, referenced by id.
const char kDefs[] =
    "<svg class=\"defs\" width=\"0\" height=\"0\" aria-hidden=\"true\" focusable=\"false\"><defs>"
    "<pattern id=\"rb-hatch\" width=\"7\" height=\"7\" patternUnits=\"userSpaceOnUse\" patternTransform=\"rotate(45)\">"
    "<line x1=\"0\" y1=\"0\" x2=\"0\" y2=\"7\" style=\"stroke:var(--rule);stroke-width:3\"/></pattern>"
    "<marker id=\"rb-arrow\" viewBox=\"0 0 8 8\" refX=\"7\" refY=\"4\" markerWidth=\"7\" markerHeight=\"7\" "
    "orient=\"auto\"><path class=\"arrow-head\" d=\"M0 0L8 4L0 8Z\"/></marker>";

std::string mark_svg(RunStatus s) {
  return "<svg viewBox=\"0 0 14 14\" width=\"14\" height=\"14\" aria-hidden=\"true\">" + status_mark(s, 7, 7, 12) +
         "</svg>";
}

void legend(std::string& out) {
  out += "<div class=\"legend\" role=\"note\"><strong>Marks</strong>";
  const RunStatus all[] = {RunStatus::ok, RunStatus::degraded, RunStatus::fail};
  const char* words[] = {"ok: every feature fresh", "degraded: an optional feature late",
                         "fail: a required feature late or never fresh"};
  for (int i = 0; i < 3; ++i) out += "<span>" + mark_svg(all[i]) + words[i] + "</span>";
  out += "<span><svg viewBox=\"0 0 26 14\" width=\"26\" height=\"14\" aria-hidden=\"true\"><line class=\"line-due\" "
         "x1=\"13\" y1=\"0\" x2=\"13\" y2=\"14\"/></svg>run deadline</span>"
         "<span><svg viewBox=\"0 0 26 14\" width=\"26\" height=\"14\" aria-hidden=\"true\"><line class=\"line-needs\" "
         "x1=\"13\" y1=\"0\" x2=\"13\" y2=\"14\"/></svg>data needed through</span>"
         "<span><svg viewBox=\"0 0 14 14\" width=\"14\" height=\"14\" aria-hidden=\"true\"><path class=\"caret\" "
         "d=\"M2 3L12 3L7 11Z\"/></svg>latest on-time landing</span>"
         "<span><svg viewBox=\"0 0 30 14\" width=\"30\" height=\"14\" aria-hidden=\"true\"><rect class=\"bar-fault\" "
         "x=\"1\" y=\"2\" width=\"28\" height=\"10\"/></svg>step at fault</span>"
         "<span><svg viewBox=\"0 0 14 14\" width=\"14\" height=\"14\" aria-hidden=\"true\"><circle class=\"stale\" "
         "cx=\"7\" cy=\"7\" r=\"5\"/></svg>fixed start that read old data</span>"
         "<span><svg viewBox=\"0 0 26 16\" width=\"26\" height=\"16\" aria-hidden=\"true\"><rect class=\"day-box "
         "clock-change\" x=\"1\" y=\"1\" width=\"24\" height=\"14\"/></svg>clock change that day</span>"
         "<span><svg viewBox=\"0 0 26 16\" width=\"26\" height=\"16\" aria-hidden=\"true\"><rect class=\"day-box\" "
         "x=\"1\" y=\"1\" width=\"24\" height=\"14\"/><rect class=\"hatch\" x=\"1\" y=\"1\" width=\"24\" "
         "height=\"14\"/></svg>runs skipped by a calendar</span></div>";
}

std::string slack_cell(const ModelFacts& m) {
  if (!m.tightest_slack_seconds) return "—";
  return *m.tightest_slack_seconds >= 0 ? human_duration(*m.tightest_slack_seconds)
                                        : "late by " + human_duration(-*m.tightest_slack_seconds);
}

void summary_table(std::string& out, const PageFacts& facts) {
  const Plan& plan = *facts.plan;
  out += "<table class=\"grid summary\"><thead><tr><th scope=\"col\">model</th><th scope=\"col\">zone</th>"
         "<th scope=\"col\">runs</th><th scope=\"col\">ok</th><th scope=\"col\">degraded</th><th scope=\"col\">fail</th>"
         "<th scope=\"col\">tightest slack</th><th scope=\"col\">patterns</th></tr></thead><tbody>";
  for (const ModelFacts& m : facts.models) {
    const Model& model = plan.models[static_cast<size_t>(m.model)];
    RunStatus worst = m.failed ? RunStatus::fail : m.degraded ? RunStatus::degraded : RunStatus::ok;
    out += "<tr><td>" + mark_svg(worst) + " <a href=\"#" + anchor("model-", model.id) + "\">" + esc(model.id) +
           "</a></td><td>" + esc(model.zone->name()) + "</td><td class=\"n\">" +
           std::to_string(m.ok + m.degraded + m.failed) + "</td><td class=\"n\">" + std::to_string(m.ok) +
           "</td><td class=\"n" + (m.degraded ? " c-degraded" : "") + "\">" + std::to_string(m.degraded) +
           "</td><td class=\"n" + (m.failed ? " c-fail" : "") + "\">" + std::to_string(m.failed) + "</td><td>" +
           esc(slack_cell(m)) + "</td><td class=\"n\">" + std::to_string(m.patterns.size()) + "</td></tr>";
  }
  out += "</tbody></table>";
}

void model_section(std::string& out, const PageFacts& facts, const ModelFacts& m, const LineageDrawer& lineage) {
  const Plan& plan = *facts.plan;
  const Model& model = plan.models[static_cast<size_t>(m.model)];
  out += "<section class=\"model\" id=\"" + anchor("model-", model.id) + "\" data-model=\"" + esc(model.id) +
         "\"><h2>Model " + esc(model.id) + "</h2>";
  if (!model.description.empty()) out += "<p>" + esc(model.description) + "</p>";
  std::string runs;
  for (const RunSpec& r : model.runs) runs += (runs.empty() ? "" : ", ") + ("<code>" + esc(r.at.text) + "</code>");
  out += "<p class=\"soft\">Runs " + runs + " in " + esc(model.zone->name()) + "; " +
         std::to_string(model.features.size()) + " features; tightest slack " + esc(slack_cell(m)) + ".</p>";
  out += "<h3>Calendar</h3>";
  write_calendar(out, facts, m);
  out += "<h3>Timelines</h3>";
  if (!m.patterns.empty()) {
    for (size_t p : m.patterns) write_pattern_timeline(out, facts, p);
  } else if (m.explained) {
    write_run_timeline(out, facts, *m.explained, "No run fails or is degraded; the tightest run");
  } else {
    out += "<p>No run in the window.</p>";
  }
  out += "<h3>Lineage</h3>";
  lineage.write(out, facts, m);
  out += "</section>";
}

void findings(std::string& out, const PageFacts& facts) {
  const Evaluation& ev = *facts.evaluation;
  if (ev.findings.empty()) return;
  out += "<section class=\"findings\" id=\"findings\"><h2>Findings</h2><table class=\"grid\"><thead><tr>"
         "<th scope=\"col\">kind</th><th scope=\"col\">finding</th></tr></thead><tbody>";
  for (const Finding& f : ev.findings) {
    out += "<tr><td" + std::string(f.kind == "lookback" ? " class=\"c-degraded\"" : "") + ">" + esc(f.kind) +
           "</td><td>" + esc(f.message) + "</td></tr>";
  }
  out += "</tbody></table></section>";
}

void contents(std::string& out, const PageFacts& facts) {
  const Plan& plan = *facts.plan;
  out += "<nav aria-label=\"Contents\"><h2>Contents</h2><ol>";
  for (const ModelFacts& m : facts.models) {
    const std::string& id = plan.models[static_cast<size_t>(m.model)].id;
    out += "<li><a href=\"#" + anchor("model-", id) + "\">Model " + esc(id) + "</a></li>";
  }
  if (!facts.evaluation->findings.empty()) out += "<li><a href=\"#findings\">Findings</a></li>";
  if (facts.history) out += "<li><a href=\"#history\">Landing history</a></li>";
  if (facts.intake) out += "<li><a href=\"#intake\">Intake screening</a></li>";
  out += "</ol></nav>";
}

}  // namespace

std::string page_css() { return palette_css() + kLayoutCss; }

std::string render_page(const PageFacts& facts) {
  const Plan& plan = *facts.plan;
  const Evaluation& ev = *facts.evaluation;
  std::string out;
  out.reserve(1 << 20);
  LocalDays last = ev.from + date::days(ev.days - 1);
  std::string title = "readyby report: " + plan.id;
  out += "<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">"
         "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">"
         "<meta name=\"color-scheme\" content=\"light dark\"><title>" +
         esc(title) + "</title><style>" + page_css() + "</style></head><body>" + kDefs + status_symbols() + "</defs></svg><main><header><h1>" +
         esc(plan.title.empty() ? plan.id : plan.title) + "</h1><p class=\"soft\">Plan <code>" + esc(plan.id) +
         "</code> (file " + esc(std::filesystem::path(plan.path).filename().string()) + "), zone " + esc(plan.zone->name()) + "; runs with local dates from " +
         format_date(ev.from) + " to " + format_date(last) + " (" + std::to_string(ev.days) +
         " days). Written by readyby.</p>";
  summary_table(out, facts);
  legend(out);
  out += "</header>";
  contents(out, facts);
  LineageDrawer lineage;
  for (const ModelFacts& m : facts.models) model_section(out, facts, m, lineage);
  findings(out, facts);
  if (facts.history) {
    out += "<section class=\"history\" id=\"history\"><h2>Landing history</h2>";
    write_history_charts(out, plan, *facts.history);
    out += "</section>";
  }
  if (facts.intake) {
    out += "<section class=\"intake\" id=\"intake\"><h2>Intake screening</h2>";
    write_intake_section(out, *facts.intake);
    out += "</section>";
  }
  out += "<footer><p>readyby reports on data timing and on what published literature says; it gives no clinical "
         "advice.</p></footer></main></body></html>\n";
  return out;
}

}  // namespace readyby::html
