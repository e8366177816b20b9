#include "report/html/history_charts.h"

#include <algorithm>
#include <cmath>
#include <cstdio>

#include "report/html/markup.h"
#include "report/html/palette.h"

namespace readyby::html {

namespace {

constexpr double kW = 340, kH = 180, kLeft = 46, kRight = 10, kTop = 12, kBottom = 30;

std::string percent(double p) {
  char buf[16];
  std::snprintf(buf, sizeof buf, "%.0f%%", p * 100);
  return buf;
}

std::string minutes_label(double seconds) {
  return human_duration(static_cast<int64_t>(std::llround(seconds / 60) * 60));
}

std::string drift_caption(const Plan& plan, const SourceChart& c) {
  const Node& n = plan.nodes[static_cast<size_t>(c.source)];
  const SourceDrift& d = c.drift;
  std::string s = n.id + ": " + std::to_string(c.points.size()) + (c.points.size() == 1 ? " landing" : " landings");
  if (c.failed) s += " and " + std::to_string(c.failed) + " failed " + (c.failed == 1 ? "delivery" : "deliveries");
  if (d.p50_offset_seconds) {
    s += "; landing offset p50 " + human_duration(*d.p50_offset_seconds) + ", p90 " +
         human_duration(*d.p90_offset_seconds);
  }
  s += " against a declared lands_after of " + human_duration(d.declared_seconds);
  if (d.trend_seconds_per_week) {
    double m = *d.trend_seconds_per_week / 60;
    char buf[48];
    std::snprintf(buf, sizeof buf, "%+.1f min per week", m);
    s += "; trend " + std::string(buf);
  }
  s += d.drifting ? "; drifting: " + d.reason : "; not drifting";
  return s + ".";
}

void write_source_chart(std::string& out, const Plan& plan, const SourceChart& c) {
  const Node& n = plan.nodes[static_cast<size_t>(c.source)];
  const Zone& zone = *plan.zone;
  std::string id = anchor("offsets-", n.id), caption_id = id + "-cap";
  double ymax = static_cast<double>(c.drift.declared_seconds);
  for (const OffsetPoint& p : c.points) ymax = std::max(ymax, static_cast<double>(p.offset_seconds));
  ymax = std::max(ymax * 1.15, 600.0);
  double ymin = 0;
  for (const OffsetPoint& p : c.points) ymin = std::min(ymin, static_cast<double>(p.offset_seconds));
  double span = static_cast<double>((c.to - c.from).count());
  auto X = [&](Instant t) { return kLeft + (kW - kLeft - kRight) * static_cast<double>((t - c.from).count()) / span; };
  auto Y = [&](double s) { return kTop + (kH - kTop - kBottom) * (1 - (s - ymin) / (ymax - ymin)); };
  out += "<figure class=\"offsets\" id=\"" + id + "\" data-source=\"" + esc(n.id) + "\"><h4>" + esc(n.id) +
         (c.drift.drifting ? " <span class=\"flag\">drifting</span>" : "") + "</h4>";
  out += "<svg viewBox=\"0 0 " + num(kW) + " " + num(kH) + "\" width=\"" + num(kW) +
         "\" role=\"img\" aria-labelledby=\"" + caption_id + "\"><title>" + esc("Landing offsets of " + n.id) +
         "</title>";
  // Axes: minutes on the left, dates along the bottom.
  out += "<line class=\"axis\" x1=\"" + num(kLeft) + "\" y1=\"" + num(kH - kBottom) + "\" x2=\"" + num(kW - kRight) +
         "\" y2=\"" + num(kH - kBottom) + "\"/>";
  for (int i = 0; i <= 3; ++i) {
    double s = ymin + (ymax - ymin) * i / 3;
    out += "<line class=\"tick\" x1=\"" + num(kLeft) + "\" y1=\"" + num(Y(s)) + "\" x2=\"" + num(kW - kRight) +
           "\" y2=\"" + num(Y(s)) + "\"/><text class=\"small\" x=\"" + num(kLeft - 4) + "\" y=\"" + num(Y(s) + 3) +
           "\" text-anchor=\"end\">" + esc(minutes_label(s)) + "</text>";
  }
  int64_t days = (c.to - c.from).count() / kSecondsPerDay;
  int64_t every = std::max<int64_t>(1, (days + 3) / 4);
  for (int64_t d = 0; d <= days; d += every) {
    Instant t = c.from + Seconds(d * kSecondsPerDay);
    out += "<text class=\"small\" x=\"" + num(X(t)) + "\" y=\"" + num(kH - kBottom + 14) +
           "\" text-anchor=\"middle\">" + format_local(zone.to_local(t)).substr(5, 5) + "</text>";
  }
  double declared_y = Y(static_cast<double>(c.drift.declared_seconds));
  out += "<line class=\"line-due\" x1=\"" + num(kLeft) + "\" y1=\"" + num(declared_y) + "\" x2=\"" + num(kW - kRight) +
         "\" y2=\"" + num(declared_y) + "\"><title>" +
         esc("declared lands_after " + human_duration(c.drift.declared_seconds)) +
         "</title></line><text class=\"lbl-due small\" x=\"" + num(kW - kRight - 2) + "\" y=\"" + num(declared_y - 4) +
         "\" text-anchor=\"end\">declared " + esc(human_duration(c.drift.declared_seconds)) + "</text>";
  for (const OffsetPoint& p : c.points) {
    out += "<circle class=\"dot\" cx=\"" + num(X(p.landed_at)) + "\" cy=\"" + num(Y(static_cast<double>(p.offset_seconds))) +
           "\" r=\"2.6\"><title>" +
           esc(format_local(zone.to_local(p.landed_at)) + ": " + human_duration(p.offset_seconds) + " after schedule") +
           "</title></circle>";
  }
  if (c.trend_at_from_seconds && c.drift.trend_seconds_per_week) {
    double per_second = *c.drift.trend_seconds_per_week / (7.0 * kSecondsPerDay);
    double y0 = *c.trend_at_from_seconds, y1 = y0 + per_second * span;
    auto clampY = [&](double s) { return Y(std::clamp(s, ymin, ymax)); };
    out += "<line class=\"line-needs trend\" x1=\"" + num(kLeft) + "\" y1=\"" + num(clampY(y0)) + "\" x2=\"" +
           num(kW - kRight) + "\" y2=\"" + num(clampY(y1)) + "\"><title>Theil–Sen trend</title></line>";
  }
  out += "</svg><figcaption id=\"" + caption_id + "\">" + esc(drift_caption(plan, c)) +
         " Dots: landings (minutes after the scheduled occurrence); dashed: declared lands_after; solid: trend."
         "</figcaption>";
  out += "<details class=\"numbers\"><summary>Landings as a table</summary><table class=\"grid\"><thead><tr>"
         "<th scope=\"col\">landed</th><th scope=\"col\">offset</th></tr></thead><tbody>";
  for (const OffsetPoint& p : c.points) {
    out += "<tr><td>" + format_local(zone.to_local(p.landed_at)) + "</td><td class=\"n\">" +
           esc(human_duration(p.offset_seconds)) + "</td></tr>";
  }
  out += "</tbody></table></details></figure>";
}

void write_on_time(std::string& out, const Plan& plan, const HistoryFacts& h) {
  if (h.on_time.empty()) return;
  const double left = 190, right = 500, row = 26, width = 720;
  double height = 24 + row * static_cast<double>(h.on_time.size()) + 8;
  auto X = [&](double p) { return left + (right - left) * p; };
  out += "<figure class=\"ontime-fig\"><svg viewBox=\"0 0 " + num(width) + " " + num(height) + "\" width=\"" +
         num(width) + "\" role=\"img\" aria-labelledby=\"ontime-cap\"><title>On-time rate per model run time</title>";
  for (int i = 0; i <= 4; ++i) {
    double x = X(i / 4.0);
    out += "<line class=\"tick\" x1=\"" + num(x) + "\" y1=\"16\" x2=\"" + num(x) + "\" y2=\"" + num(height - 6) +
           "\"/><text class=\"small\" x=\"" + num(x) + "\" y=\"12\" text-anchor=\"middle\">" + std::to_string(i * 25) +
           "%</text>";
  }
  for (size_t i = 0; i < h.on_time.size(); ++i) {
    const OnTimeRate& r = h.on_time[i];
    const Model& model = plan.models[static_cast<size_t>(r.model)];
    double y = 24 + row * static_cast<double>(i) + row / 2;
    std::string figures = percent(r.rate) + " (" + std::to_string(r.on_time) + " of " + std::to_string(r.days) +
                          "), 95% interval " + percent(r.interval.low) + "–" + percent(r.interval.high);
    RunStatus mark = r.on_time == r.days ? RunStatus::ok : r.on_time == 0 ? RunStatus::fail : RunStatus::degraded;
    out += "<g class=\"ontime\" data-model=\"" + esc(model.id) + "\" data-at=\"" + esc(r.at_local) + "\"><title>" +
           esc(model.id + " at " + r.at_local + ": " + figures) + "</title><text x=\"6\" y=\"" + num(y + 4) + "\">" +
           esc(model.id + " " + r.at_local) + "</text><line class=\"interval\" x1=\"" + num(X(r.interval.low)) +
           "\" y1=\"" + num(y) + "\" x2=\"" + num(X(r.interval.high)) + "\" y2=\"" + num(y) + "\"/>" +
           status_mark(mark, X(r.rate), y, 9) + "<text class=\"small\" x=\"" + num(right + 12) + "\" y=\"" +
           num(y + 4) + "\">" + esc(figures) + "</text></g>";
  }
  out += "</svg><figcaption id=\"ontime-cap\">Share of runs on time (status ok) per model and local run time, " +
         format_date(h.window_from) + " to " + format_date(h.date) +
         ", with its Wilson 95% interval (bar). The mark is a disc when every run was on time, a block when none "
         "was, a wedge otherwise.</figcaption></figure>";
}

}  // namespace

void write_history_charts(std::string& out, const Plan& plan, const HistoryFacts& h) {
  out += "<p>Landing history from " + format_date(h.window_from) + " to " + format_date(h.date) + " (" +
         std::to_string((h.date - h.window_from).count() + 1) + " days, plan zone " + esc(plan.zone->name()) + "). On " +
         format_date(h.date) + ", " + std::to_string(h.day_runs) + " runs, " + std::to_string(h.day_failed) +
         " failing against what actually landed.";
  if (h.weakest_link) {
    out += " Weakest link: " + esc(plan.nodes[static_cast<size_t>(h.weakest_link->node)].id) + " (starts the chain of " +
           std::to_string(h.weakest_link->failing_runs) + " of " + std::to_string(h.weakest_link->total_failing_runs) +
           " failing runs).";
  }
  if (!h.unmonitored.empty()) {
    out += " Unmonitored sources (no landing recorded; their declared timing is used):";
    for (size_t i = 0; i < h.unmonitored.size(); ++i) {
      out += std::string(i ? ", " : " ") + esc(plan.nodes[static_cast<size_t>(h.unmonitored[i])].id);
    }
    out += ".";
  }
  out += "</p><h3>Landing offsets per monitored source</h3><div class=\"small-multiples\">";
  for (const SourceChart& c : h.sources) write_source_chart(out, plan, c);
  out += "</div><h3>On-time rate per run time</h3>";
  write_on_time(out, plan, h);
}

}  // namespace readyby::html
