#include "report/html/calendar.h"

#include <algorithm>

#include "report/html/markup.h"
#include "report/html/palette.h"

namespace readyby::html {

namespace {

constexpr double kCellW = 98, kHeadH = 20, kPad = 2;
// Not-fresh features named in a run's hover text; the rest are counted.
constexpr size_t kTitleFeatures = 2;
// Feeds named as off on a day; the rest are counted.
constexpr size_t kNamedFeeds = 4;
constexpr const char* kWeekdays[] = {"Mon", "Tue", "Wed", "Thu", "Fri", "Sat", "Sun"};

// Column of a local date: 0 = Monday .. 6 = Sunday.
int column(LocalDays day) { return (weekday_of(day) + 6) % 7; }

std::string hhmm(const Zone& zone, Instant t) { return format_local(zone.to_local(t)).substr(11); }

// "22 ok · 2 fail": the day's runs by status, in words.
std::string day_counts(const Evaluation& ev, const DayFacts& day) {
  size_t n[3] = {0, 0, 0};
  for (size_t i : day.runs) n[static_cast<int>(ev.runs[i].status)]++;
  std::string out;
  const RunStatus order[] = {RunStatus::ok, RunStatus::degraded, RunStatus::fail};
  for (RunStatus s : order) {
    if (!n[static_cast<int>(s)]) continue;
    out += (out.empty() ? "" : " · ") + std::to_string(n[static_cast<int>(s)]) + " " + status_word(s);
  }
  return out;
}

std::string run_title(const Plan& plan, const Evaluation& ev, const Model& model, size_t index) {
  const RunResult& run = ev.runs[index];
  std::string t = format_local(model.zone->to_local(run.at)) + " " + status_word(run.status);
  std::string missing;
  size_t named = 0, more = 0;
  for (const FeatureResult& f : run.features) {
    if (f.status == FeatureStatus::ok) continue;
    if (named == kTitleFeatures) {
      ++more;
      continue;
    }
    ++named;
    missing += (missing.empty() ? "" : ", ") + plan.nodes[static_cast<size_t>(f.feature)].id + " " +
               (f.status == FeatureStatus::never ? "never fresh" : "late by " + human_duration(-f.slack_seconds));
  }
  if (more) missing += " and " + std::to_string(more) + " more";
  if (!missing.empty()) t += ": " + missing;
  return t;
}

std::string truncate(const std::string& s, size_t chars) {
  return s.size() <= chars ? s : s.substr(0, chars - 1) + "…";
}

std::string feed_names(const Plan& plan, const std::vector<int>& feeds) {
  std::string out;
  for (size_t i = 0; i < feeds.size() && i < kNamedFeeds; ++i) {
    out += (out.empty() ? "" : ", ") + plan.nodes[static_cast<size_t>(feeds[i])].id;
  }
  if (feeds.size() > kNamedFeeds) out += " and " + std::to_string(feeds.size() - kNamedFeeds) + " more";
  return out;
}

struct Layout {
  bool labelled = true;
  size_t per_row = 8;     // marks per row in the compact layout
  double cell_h = 0;
};

Layout layout_for(const ModelFacts& model) {
  size_t most = 0;
  for (const DayFacts& d : model.days) most = std::max(most, d.runs.size());
  Layout l;
  l.labelled = most <= kLabelledRuns;
  size_t lines = l.labelled ? std::max<size_t>(most, 1) : (most + l.per_row - 1) / l.per_row;
  double body = l.labelled ? static_cast<double>(lines) * 15 : static_cast<double>(lines) * 12 + 14;
  l.cell_h = 18 + body + 26;  // date line, runs, two note lines
  return l;
}

void write_day(std::string& out, const PageFacts& page, const Model& model, const DayFacts& day, const Layout& l,
               double x, double y) {
  const Plan& plan = *page.plan;
  const Evaluation& ev = *page.evaluation;
  bool skipped = !day.runs_skipped.empty();
  std::string title = format_date(day.day) + " (" + weekday_name(weekday_of(day.day)) + "): " +
                      std::to_string(day.runs.size()) + (day.runs.size() == 1 ? " run" : " runs");
  for (const std::string& c : day.clock_changes) title += "; " + c;
  for (const std::string& c : day.runs_skipped) title += "; runs skipped by calendar " + c;
  if (!day.feeds_off.empty()) title += "; no delivery from " + feed_names(plan, day.feeds_off);
  out += "<g class=\"day\" data-date=\"" + format_date(day.day) + "\"";
  if (!day.clock_changes.empty()) out += " data-clock-change=\"yes\"";
  if (skipped) out += " data-skipped=\"yes\"";
  out += "><title>" + esc(title) + "</title>";
  out += "<rect class=\"day-box" + std::string(day.clock_changes.empty() ? "" : " clock-change") + "\" x=\"" +
         num(x + kPad) + "\" y=\"" + num(y + kPad) + "\" width=\"" + num(kCellW - 2 * kPad) + "\" height=\"" +
         num(l.cell_h - 2 * kPad) + "\"/>";
  if (skipped) {
    out += "<rect class=\"hatch\" x=\"" + num(x + kPad) + "\" y=\"" + num(y + kPad) + "\" width=\"" +
           num(kCellW - 2 * kPad) + "\" height=\"" + num(l.cell_h - 2 * kPad) + "\"/>";
  }
  unsigned day_of_month = static_cast<unsigned>(date::year_month_day(day.day).day());
  out += "<text class=\"date\" x=\"" + num(x + 7) + "\" y=\"" + num(y + 15) + "\">" + std::to_string(day_of_month) +
         "</text>";
  if (!day.clock_changes.empty()) {
    // "clocks forward 1h 00m in Z" -> "+1h" in the corner; the title has the words.
    bool forward = day.clock_changes.front().find("forward") != std::string::npos;
    out += "<text class=\"clock-tag\" x=\"" + num(x + kCellW - 7) + "\" y=\"" + num(y + 15) +
           "\" text-anchor=\"end\">clock " + (forward ? "+" : "−") + "</text>";
  }
  double ry = y + 20;
  const Zone& zone = *model.zone;
  if (l.labelled) {
    for (size_t i : day.runs) {
      const RunResult& run = ev.runs[i];
      out += "<g class=\"run\" data-status=\"" + std::string(status_word(run.status)) + "\"><title>" +
             esc(run_title(plan, ev, model, i)) + "</title>" + status_use(run.status, x + 13, ry + 5, 9) +
             "<text class=\"lbl-" + status_swatch(run.status) + "\" x=\"" + num(x + 22) + "\" y=\"" + num(ry + 9) +
             "\">" + hhmm(zone, run.at) + " " + status_word(run.status) + "</text></g>";
      ry += 15;
    }
  } else {
    size_t k = 0;
    for (size_t i : day.runs) {
      const RunResult& run = ev.runs[i];
      double cx = x + 10 + 11 * static_cast<double>(k % l.per_row), cy = ry + 5 + 12 * static_cast<double>(k / l.per_row);
      out += "<g class=\"run\" data-status=\"" + std::string(status_word(run.status)) + "\"><title>" +
             esc(run_title(plan, ev, model, i)) + "</title>" + status_use(run.status, cx, cy, 8) + "</g>";
      ++k;
    }
    if (!day.runs.empty()) {
      double ly = ry + 12 * static_cast<double>((day.runs.size() + l.per_row - 1) / l.per_row) + 9;
      out += "<text class=\"small\" x=\"" + num(x + 7) + "\" y=\"" + num(ly) + "\">" + esc(day_counts(ev, day)) +
             "</text>";
    }
  }
  // Two note lines at the bottom of the cell: skipped runs, feeds off.
  double ny = y + l.cell_h - 18;
  if (skipped) {
    out += "<text class=\"note-skip\" x=\"" + num(x + 7) + "\" y=\"" + num(ny) + "\">no run: " +
           esc(truncate(day.runs_skipped.front(), 11)) + "</text>";
  }
  if (!day.feeds_off.empty()) {
    out += "<text class=\"note-skip\" x=\"" + num(x + 7) + "\" y=\"" + num(ny + 11) + "\">off: " +
           esc(truncate(feed_names(plan, day.feeds_off), 12)) + "</text>";
  }
  out += "</g>";
}

void write_svg(std::string& out, const PageFacts& page, const ModelFacts& facts, const std::string& caption_id) {
  const Model& model = page.plan->models[static_cast<size_t>(facts.model)];
  Layout l = layout_for(facts);
  if (facts.days.empty()) return;
  LocalDays first_monday = facts.days.front().day - date::days(column(facts.days.front().day));
  size_t weeks = static_cast<size_t>((facts.days.back().day - first_monday).count() / 7 + 1);
  double width = 7 * kCellW, height = kHeadH + static_cast<double>(weeks) * l.cell_h;
  out += "<svg class=\"calendar\" data-model=\"" + esc(model.id) + "\" viewBox=\"0 0 " + num(width) + " " +
         num(height) + "\" width=\"" + num(width) + "\" role=\"img\" aria-labelledby=\"" + caption_id + "\">";
  out += "<title>" + esc("Calendar of the runs of " + model.id) + "</title>";
  for (int c = 0; c < 7; ++c) {
    out += "<text class=\"weekday\" x=\"" + num(c * kCellW + 7) + "\" y=\"14\">" + kWeekdays[c] + "</text>";
  }
  for (const DayFacts& day : facts.days) {
    size_t week = static_cast<size_t>((day.day - first_monday).count() / 7);
    write_day(out, page, model, day, l, column(day.day) * kCellW, kHeadH + static_cast<double>(week) * l.cell_h);
  }
  out += "</svg>";
}

void write_pattern_list(std::string& out, const PageFacts& page, const ModelFacts& facts) {
  out += "<aside class=\"pattern-list\"><h4>Patterns</h4>";
  if (facts.patterns.empty()) {
    out += "<p>" + std::string(facts.failed + facts.degraded == 0 ? "Every run is ok." : "No pattern.") + "</p>";
  } else {
    out += "<ol>";
    for (size_t p : facts.patterns) {
      const PatternFacts& pattern = page.advice.patterns[p];
      out += "<li><svg class=\"mark\" viewBox=\"0 0 12 12\" width=\"12\" height=\"12\" aria-hidden=\"true\">" +
             status_mark(pattern.status, 6, 6, 10) + "</svg> <a href=\"#" + pattern_anchor(*page.plan, page, p) +
             "\">" + esc(pattern.description) + "</a></li>";
    }
    out += "</ol>";
  }
  out += "</aside>";
}

void write_table(std::string& out, const PageFacts& page, const ModelFacts& facts) {
  const Plan& plan = *page.plan;
  const Evaluation& ev = *page.evaluation;
  out += "<details class=\"numbers\"><summary>The calendar as a table</summary><table class=\"grid\"><thead><tr>"
         "<th scope=\"col\">date</th><th scope=\"col\">runs</th><th scope=\"col\">ok</th><th scope=\"col\">degraded</th>"
         "<th scope=\"col\">fail</th><th scope=\"col\">marks</th></tr></thead><tbody>";
  for (const DayFacts& day : facts.days) {
    size_t n[3] = {0, 0, 0};
    for (size_t i : day.runs) n[static_cast<int>(ev.runs[i].status)]++;
    std::string marks;
    for (const std::string& c : day.clock_changes) marks += (marks.empty() ? "" : "; ") + c;
    for (const std::string& c : day.runs_skipped) marks += (marks.empty() ? "" : "; ") + ("runs skipped by calendar " + c);
    if (!day.feeds_off.empty()) marks += (marks.empty() ? "" : "; ") + ("no delivery from " + feed_names(plan, day.feeds_off));
    out += "<tr><td>" + format_date(day.day) + " " + std::string(weekday_name(weekday_of(day.day))).substr(0, 3) +
           "</td><td class=\"n\">" + std::to_string(day.runs.size()) + "</td><td class=\"n\">" + std::to_string(n[0]) +
           "</td><td class=\"n" + (n[1] ? " c-degraded" : "") + "\">" + std::to_string(n[1]) + "</td><td class=\"n" +
           (n[2] ? " c-fail" : "") + "\">" + std::to_string(n[2]) + "</td><td>" + esc(marks) + "</td></tr>";
  }
  out += "</tbody></table></details>";
}

}  // namespace

std::string pattern_anchor(const Plan& plan, const PageFacts& page, size_t index) {
  const PatternFacts& p = page.advice.patterns[index];
  return anchor("pattern-" + std::to_string(index + 1) + "-", plan.models[static_cast<size_t>(p.model)].id);
}

void write_calendar(std::string& out, const PageFacts& page, const ModelFacts& facts) {
  const Model& model = page.plan->models[static_cast<size_t>(facts.model)];
  std::string caption_id = anchor("cal-cap-", model.id);
  out += "<div class=\"calendar-row\"><figure class=\"calendar-fig\">";
  write_svg(out, page, facts, caption_id);
  LocalDays last = page.evaluation->from + date::days(page.evaluation->days - 1);
  out += "<figcaption id=\"" + caption_id + "\">Runs of " + esc(model.id) + " from " +
         format_date(page.evaluation->from) + " to " + format_date(last) + " (local dates, " + esc(model.zone->name()) +
         "): " + std::to_string(facts.ok) + " ok, " + std::to_string(facts.degraded) + " degraded, " +
         std::to_string(facts.failed) + " failed. A disc is ok, a wedge degraded, a crossed block fail; a dashed frame "
         "marks a clock change, hatching a day whose runs a calendar skips.</figcaption></figure>";
  write_pattern_list(out, page, facts);
  out += "</div>";
  write_table(out, page, facts);
}

}  // namespace readyby::html
