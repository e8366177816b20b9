#include "util/diagnostics.h"

#include <algorithm>
#include <tuple>

#include "util/text.h"

namespace readyby {

std::string Diagnostic::str(std::string_view severity) const {
  std::string out = path;
  if (pos.line > 0) {
    out += ':' + std::to_string(pos.line) + ':' + std::to_string(pos.column);
  }
  out += ": ";
  out += severity;
  out += ": ";
  out += message;
  return printable(out);
}

void Diagnostics::error(const std::string& path, SourcePos pos, std::string message) {
  list_.push_back({path, pos, std::move(message)});
}

void Diagnostics::warning(const std::string& path, SourcePos pos, std::string message) {
  warnings_.push_back({path, pos, std::move(message)});
}

void Diagnostics::add_source(const std::string& path, std::string text) {
  sources_.emplace_back(path, std::move(text));
}

namespace {

std::vector<Diagnostic> sorted_unique(std::vector<Diagnostic> out) {
  std::stable_sort(out.begin(), out.end(), [](const Diagnostic& a, const Diagnostic& b) {
    return std::tie(a.path, a.pos.line, a.pos.column) < std::tie(b.path, b.pos.line, b.pos.column);
  });
  out.erase(std::unique(out.begin(), out.end(),
                        [](const Diagnostic& a, const Diagnostic& b) {
                          return a.path == b.path && a.pos.line == b.pos.line &&
                                 a.pos.column == b.pos.column && a.message == b.message;
                        }),
            out.end());
  return out;
}

}  // namespace

std::vector<Diagnostic> Diagnostics::sorted() const { return sorted_unique(list_); }

std::vector<Diagnostic> Diagnostics::warnings() const { return sorted_unique(warnings_); }

std::string_view source_line(std::string_view text, int line) {
  if (line < 1) return {};
  size_t start = 0;
  for (int i = 1; i < line; ++i) {
    size_t nl = text.find('\n', start);
    if (nl == std::string_view::npos) return {};
    start = nl + 1;
  }
  size_t end = text.find('\n', start);
  std::string_view out = text.substr(start, end == std::string_view::npos ? text.size() - start : end - start);
  if (!out.empty() && out.back() == '\r') out.remove_suffix(1);
  return out;
}

std::string Diagnostics::render() const {
  std::vector<std::pair<Diagnostic, const char*>> all;
  for (Diagnostic& d : sorted()) all.emplace_back(std::move(d), "error");
  for (Diagnostic& d : warnings()) all.emplace_back(std::move(d), "warning");
  std::stable_sort(all.begin(), all.end(), [](const auto& a, const auto& b) {
    return std::tie(a.first.path, a.first.pos.line, a.first.pos.column) <
           std::tie(b.first.path, b.first.pos.line, b.first.pos.column);
  });
  std::string out;
  for (const auto& [d, severity] : all) {
    out += d.str(severity);
    out += '\n';
    if (d.pos.line <= 0) continue;
    for (const auto& [path, text] : sources_) {
      if (path != d.path) continue;
      std::string_view line = source_line(text, d.pos.line);
      if (line.empty() && d.pos.line > 1) break;
      out += "  ";
      out += printable(line);
      out += "\n  ";
      // Keep tabs so the caret lines up under the same column.
      for (int i = 1; i < d.pos.column && static_cast<size_t>(i - 1) < line.size(); ++i) {
        out += line[i - 1] == '\t' ? '\t' : ' ';
      }
      out += "^\n";
      break;
    }
  }
  return out;
}

}  // namespace readyby
