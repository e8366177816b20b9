#include "report/html/palette.h"

#include <cmath>
#include <cstdlib>

#include "report/html/markup.h"

namespace readyby::html {

const std::vector<Swatch>& palette() {
  static const std::vector<Swatch> kPalette = {
      {"paper", "#fbfaf5", "#14161b", "page background"},
      {"panel", "#f0eee6", "#1e2128", "background of calendar days, tables' header rows and notes"},
      {"ink", "#1c2029", "#ebe8df", "body text, axis labels"},
      {"ink-soft", "#4b5261", "#b3b8c3", "captions, secondary labels"},
      {"ok", "#2b6847", "#7fd09f", "status ok: disc marks and their labels"},
      {"degraded", "#875400", "#eabb5e", "status degraded: wedge marks and their labels"},
      {"fail", "#a3251b", "#ff9585", "status fail, late, never: block marks, the step at fault, lateness"},
      {"due", "#3b3897", "#b0aeff", "the run's deadline line and its label; declared lands_after lines"},
      {"needs", "#0c5f6d", "#6fd2e0", "the needs-data-through line and its label; trend lines"},
      {"skip", "#565c6a", "#a7adba", "calendar-skipped days and feeds that do not deliver"},
      {"ok-tint", "#e4efe7", "#1b2d22", "background of an ok table cell"},
      {"degraded-tint", "#f5ead2", "#342a18", "background of a degraded table cell"},
      {"fail-tint", "#f7e0dc", "#3c1f1b", "background of a failing table cell"},
      {"rule", "#cfcbbf", "#3b3f4a", "grid lines, borders, hatching (no text)"},
      {"bar", "#aeb6c6", "#55607a", "a chain step's bar (no text)"},
  };
  return kPalette;
}

const Swatch& swatch(std::string_view name) {
  for (const Swatch& s : palette()) {
    if (name == s.name) return s;
  }
  std::abort();  // a programming error: every name used is in the table above
}

const std::vector<TextPair>& text_pairs() {
  static const std::vector<TextPair> kPairs = {
      {"ink", "paper"},          {"ink", "panel"},          {"ink-soft", "paper"},     {"ink-soft", "panel"},
      {"ok", "paper"},           {"ok", "panel"},           {"degraded", "paper"},     {"degraded", "panel"},
      {"fail", "paper"},         {"fail", "panel"},         {"due", "paper"},          {"due", "panel"},
      {"needs", "paper"},        {"needs", "panel"},        {"skip", "paper"},         {"skip", "panel"},
      {"ink", "ok-tint"},        {"ink", "degraded-tint"},  {"ink", "fail-tint"},      {"ok", "ok-tint"},
      {"degraded", "degraded-tint"}, {"fail", "fail-tint"},
  };
  return kPairs;
}

namespace {

double channel(int value) {
  // WCAG 2.1, definition of relative luminance: sRGB channel linearised.
  double c = value / 255.0;
  return c <= 0.03928 ? c / 12.92 : std::pow((c + 0.055) / 1.055, 2.4);
}

int hex_byte(std::string_view hex, size_t at) {
  return static_cast<int>(std::strtol(std::string(hex.substr(at, 2)).c_str(), nullptr, 16));
}

}  // namespace

double relative_luminance(std::string_view hex) {
  if (!hex.empty() && hex[0] == '#') hex.remove_prefix(1);
  if (hex.size() != 6) return 0;
  // WCAG 2.1: L = 0.2126 R + 0.7152 G + 0.0722 B.
  return 0.2126 * channel(hex_byte(hex, 0)) + 0.7152 * channel(hex_byte(hex, 2)) + 0.0722 * channel(hex_byte(hex, 4));
}

double contrast_ratio(std::string_view a, std::string_view b) {
  double la = relative_luminance(a), lb = relative_luminance(b);
  if (la < lb) std::swap(la, lb);
  return (la + 0.05) / (lb + 0.05);
}

std::string palette_css() {
  std::string light, dark;
  for (const Swatch& s : palette()) {
    light += std::string("--") + s.name + ":" + s.light + ";";
    dark += std::string("--") + s.name + ":" + s.dark + ";";
  }
  // Printing always uses the light palette (paper is white-ish).
  return ":root{color-scheme:light dark;" + light + "}\n@media (prefers-color-scheme: dark){:root{" + dark +
         "}}\n@media print{:root{color-scheme:light;" + light + "}}\n";
}

const char* status_swatch(RunStatus s) {
  switch (s) {
    case RunStatus::ok: return "ok";
    case RunStatus::degraded: return "degraded";
    case RunStatus::fail: return "fail";
  }
  return "fail";
}

const char* status_word(RunStatus s) { return to_string(s); }

std::string status_mark(RunStatus status, double cx, double cy, double size) {
  double r = size / 2;
  switch (status) {
    case RunStatus::ok:
      return "<circle class=\"st-ok\" cx=\"" + num(cx) + "\" cy=\"" + num(cy) + "\" r=\"" + num(r) + "\"/>";
    case RunStatus::degraded:
      return "<path class=\"st-degraded\" d=\"M" + num(cx) + " " + num(cy - r) + "L" + num(cx + r) + " " +
             num(cy + r * 0.85) + "L" + num(cx - r) + " " + num(cy + r * 0.85) + "Z\"/>";
    case RunStatus::fail:
      return "<g class=\"st-fail\"><rect x=\"" + num(cx - r) + "\" y=\"" + num(cy - r) + "\" width=\"" + num(size) +
             "\" height=\"" + num(size) + "\"/><path class=\"st-cut\" d=\"M" + num(cx - r * 0.6) + " " +
             num(cy + r * 0.6) + "L" + num(cx + r * 0.6) + " " + num(cy - r * 0.6) + "\"/></g>";
  }
  return "";
}

std::string status_symbols() {
  std::string out;
  const RunStatus all[] = {RunStatus::ok, RunStatus::degraded, RunStatus::fail};
  for (RunStatus s : all) {
    out += std::string("<symbol id=\"rb-") + status_word(s) + "\" viewBox=\"0 0 12 12\">" + status_mark(s, 6, 6, 11) +
           "</symbol>";
  }
  return out;
}

std::string status_use(RunStatus status, double cx, double cy, double size) {
  return std::string("<use href=\"#rb-") + status_word(status) + "\" x=\"" + num(cx - size / 2) + "\" y=\"" +
         num(cy - size / 2) + "\" width=\"" + num(size) + "\" height=\"" + num(size) + "\"/>";
}

}  // namespace readyby::html
