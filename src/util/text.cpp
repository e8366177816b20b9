#include "util/text.h"

#include <algorithm>
#include <cstdio>

namespace readyby {

size_t edit_distance(std::string_view a, std::string_view b) {
  std::vector<size_t> row(b.size() + 1);
  for (size_t j = 0; j <= b.size(); ++j) row[j] = j;
  for (size_t i = 1; i <= a.size(); ++i) {
    size_t diagonal = row[0];
    row[0] = i;
    for (size_t j = 1; j <= b.size(); ++j) {
      size_t above = row[j];
      row[j] = std::min({row[j] + 1, row[j - 1] + 1, diagonal + (a[i - 1] == b[j - 1] ? 0 : 1)});
      diagonal = above;
    }
  }
  return row[b.size()];
}

namespace {

// Levenshtein distance when it is at most `bound`, else bound + 1. Only the
// diagonal band |i - j| <= bound is filled (Ukkonen's cut-off), and the work
// stops as soon as a whole row exceeds the bound: O(bound * |a|) time.
size_t bounded_edit_distance(std::string_view a, std::string_view b, size_t bound) {
  size_t diff = a.size() > b.size() ? a.size() - b.size() : b.size() - a.size();
  if (diff > bound) return bound + 1;
  const size_t over = bound + 1;
  std::vector<size_t> row(b.size() + 1, over);
  for (size_t j = 0; j <= std::min(b.size(), bound); ++j) row[j] = j;
  for (size_t i = 1; i <= a.size(); ++i) {
    size_t lo = i > bound ? i - bound : 1, hi = std::min(b.size(), i + bound);
    size_t diagonal = row[lo - 1];
    row[lo - 1] = (lo == 1 && i <= bound) ? i : over;
    size_t row_min = row[lo - 1];
    for (size_t j = lo; j <= hi; ++j) {
      size_t above = row[j];
      size_t v = std::min({above + 1, row[j - 1] + 1, diagonal + (a[i - 1] == b[j - 1] ? 0 : 1)});
      row[j] = std::min(v, over);
      diagonal = above;
      row_min = std::min(row_min, row[j]);
    }
    if (hi < b.size()) row[hi + 1] = over;
    if (row_min > bound) return over;
  }
  return std::min(row[b.size()], over);
}

}  // namespace

std::string nearest(std::string_view word, const std::vector<std::string>& candidates) {
  // Nobody mistypes a name of hundreds of characters: no suggestion, and no
  // quadratic work on a pasted blob.
  if (word.size() > kMaxSuggestedLength) return {};
  size_t limit = std::max<size_t>(2, word.size() / 3);
  size_t best = limit + 1;
  std::string found;
  for (const std::string& c : candidates) {
    size_t d = bounded_edit_distance(word, c, best - 1 < limit ? best - 1 : limit);
    if (d < best) {
      best = d;
      found = c;
      if (d == 0) break;
    }
  }
  return found;
}

std::string did_you_mean(std::string_view word, const std::vector<std::string>& candidates) {
  std::string n = nearest(word, candidates);
  return n.empty() ? std::string() : " (did you mean '" + n + "'?)";
}

size_t invalid_utf8_offset(std::string_view text) {
  const auto* s = reinterpret_cast<const unsigned char*>(text.data());
  size_t n = text.size();
  size_t i = 0;
  while (i < n) {
    unsigned char c = s[i];
    if (c < 0x80) { ++i; continue; }
    size_t len;
    unsigned int cp;
    if (c >= 0xC2 && c <= 0xDF) { len = 2; cp = c & 0x1F; }
    else if (c >= 0xE0 && c <= 0xEF) { len = 3; cp = c & 0x0F; }
    else if (c >= 0xF0 && c <= 0xF4) { len = 4; cp = c & 0x07; }
    else return i;
    if (i + len > n) return i;
    for (size_t k = 1; k < len; ++k) {
      if ((s[i + k] & 0xC0) != 0x80) return i;
      cp = (cp << 6) | (s[i + k] & 0x3F);
    }
    if ((len == 3 && (cp < 0x800 || (cp >= 0xD800 && cp <= 0xDFFF))) ||
        (len == 4 && (cp < 0x10000 || cp > 0x10FFFF))) {
      return i;
    }
    i += len;
  }
  return std::string_view::npos;
}

std::string printable(std::string_view s) {
  std::string out;
  out.reserve(s.size());
  for (char ch : s) {
    auto c = static_cast<unsigned char>(ch);
    if ((c < 0x20 && c != '\t') || c == 0x7F) {
      char buf[8];
      std::snprintf(buf, sizeof buf, "\\x%02x", c);
      out += buf;
    } else {
      out += ch;
    }
  }
  return out;
}

std::string json_quote(std::string_view s) {
  std::string out = "\"";
  for (char ch : s) {
    auto c = static_cast<unsigned char>(ch);
    switch (c) {
      case '"': out += "\\\""; break;
      case '\\': out += "\\\\"; break;
      case '\n': out += "\\n"; break;
      case '\r': out += "\\r"; break;
      case '\t': out += "\\t"; break;
      default:
        if (c < 0x20) {
          char buf[8];
          std::snprintf(buf, sizeof buf, "\\u%04x", c);
          out += buf;
        } else {
          out += ch;
        }
    }
  }
  out += '"';
  return out;
}

std::vector<std::string_view> split(std::string_view s, char separator) {
  std::vector<std::string_view> out;
  size_t start = 0;
  while (true) {
    const size_t at = s.find(separator, start);
    if (at == std::string_view::npos) {
      out.push_back(s.substr(start));
      return out;
    }
    out.push_back(s.substr(start, at - start));
    start = at + 1;
  }
}

std::string json_list(const std::vector<std::string>& items) {
  std::string out = "[";
  for (size_t i = 0; i < items.size(); ++i) out += (i ? ", " : "") + json_quote(items[i]);
  return out + "]";
}

}  // namespace readyby
