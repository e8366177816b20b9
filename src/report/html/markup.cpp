#include "report/html/markup.h"

#include <cmath>
#include <cstdio>

namespace readyby::html {

std::string esc(std::string_view text) {
  std::string out;
  out.reserve(text.size());
  for (char c : text) {
    switch (c) {
      case '&': out += "&amp;"; break;
      case '<': out += "&lt;"; break;
      case '>': out += "&gt;"; break;
      case '"': out += "&quot;"; break;
      case '\'': out += "&#39;"; break;
      default: out += c;
    }
  }
  return out;
}

std::string num(double value) {
  double rounded = std::round(value * 10) / 10;
  if (rounded == 0) rounded = 0;  // no "-0"
  char buf[32];
  if (rounded == std::floor(rounded)) std::snprintf(buf, sizeof buf, "%.0f", rounded);
  else std::snprintf(buf, sizeof buf, "%.1f", rounded);
  return buf;
}

std::string anchor(std::string_view prefix, std::string_view text) {
  std::string out(prefix);
  for (char c : text) {
    bool keep = (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || (c >= '0' && c <= '9') || c == '-' || c == '_';
    out += keep ? c : '-';
  }
  return out;
}

}  // namespace readyby::html
