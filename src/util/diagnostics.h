#pragma once
// Diagnostics: positioned error messages about an input file.
//
// Every bad input is reported as `PATH:LINE:COL: error: MESSAGE` (1-based line
// and column, the position of the offending key or value), followed by the
// source line and a caret under the column. Loaders collect every error of a
// file before giving up, so a user fixes a file in one pass.

#include <string>
#include <string_view>
#include <vector>

namespace readyby {

/// A position in a text file. line/column are 1-based; 0 means "unknown"
/// (then only the path is printed, e.g. for an empty file's single error).
struct SourcePos {
  int line = 0;
  int column = 0;
};

/// One error about an input.
struct Diagnostic {
  std::string path;
  SourcePos pos;
  std::string message;

  /// `PATH:LINE:COL: error: MESSAGE` (or `PATH: error: MESSAGE` when the
  /// position is unknown). No trailing newline.
  std::string str() const { return str("error"); }
  /// The same with another severity word, e.g. "warning".
  std::string str(std::string_view severity) const;
};

/// The errors found in one or more files, plus the source text needed to show
/// the offending line. Diagnostics are kept in the order reported; `sorted()`
/// orders them by path, line and column for printing.
class Diagnostics {
 public:
  void error(const std::string& path, SourcePos pos, std::string message);
  /// A warning: printed like an error with `warning:`, but kept apart —
  /// empty(), size(), list() and sorted() are about errors only.
  void warning(const std::string& path, SourcePos pos, std::string message);
  /// The warnings, sorted and deduplicated like sorted().
  std::vector<Diagnostic> warnings() const;
  /// Registers the text of `path` so that `render` can quote its lines.
  void add_source(const std::string& path, std::string text);

  bool empty() const { return list_.empty(); }
  size_t size() const { return list_.size(); }
  const std::vector<Diagnostic>& list() const { return list_; }
  /// Sorted by (path, line, column), stable for equal positions; duplicates
  /// (same position and message) removed.
  std::vector<Diagnostic> sorted() const;

  /// Every diagnostic as `str()`, each followed by its source line and a caret
  /// line when the source is known, errors and warnings together in position
  /// order. Ends with a newline when not empty.
  std::string render() const;

 private:
  std::vector<Diagnostic> list_;
  std::vector<Diagnostic> warnings_;
  std::vector<std::pair<std::string, std::string>> sources_;
};

/// The 1-based `line` of `text` without its newline; empty when out of range.
std::string_view source_line(std::string_view text, int line);

}  // namespace readyby
