#pragma once
// Reading typed fields out of a YamlNode map, with positioned diagnostics.
//
// The loaders (plan, vocabulary, catalogue entries, proposals) share these readers.
// Each reader reports a wrong type or a bad value at the offending value (or
// at its key when the value is empty) and returns nullopt; an absent key is
// not an error here — callers decide what is required.

#include <optional>
#include <string>
#include <vector>

#include "time/duration.h"
#include "util/diagnostics.h"
#include "util/yaml_tree.h"

namespace readyby {

class FieldReader {
 public:
  FieldReader(std::string path, Diagnostics* diags) : path_(std::move(path)), diags_(diags) {}

  const std::string& path() const { return path_; }
  void error(SourcePos pos, std::string message) { diags_->error(path_, pos, std::move(message)); }

  /// Reports every key of `map` not in `allowed` ("unknown key 'x' in WHAT (did you mean 'y'?)").
  void check_keys(const YamlNode& map, const std::vector<std::string>& allowed, const std::string& what);
  /// Reports "missing required key 'KEY' in WHAT" at `where` when `map` lacks `key`; true when present.
  bool require(const YamlNode& map, const char* key, const std::string& what, SourcePos where);

  /// A text value (any scalar, numbers included: `year: 2010` reads as text "2010").
  std::optional<std::string> text(const YamlNode& map, const char* key, const std::string& what);
  /// A whole number in [lo, hi] written as a plain YAML number.
  std::optional<long> integer(const YamlNode& map, const char* key, const std::string& what, long lo, long hi);
  /// A number (integer or decimal) written as a plain YAML number.
  std::optional<double> number(const YamlNode& map, const char* key, const std::string& what);
  /// true / false.
  std::optional<bool> boolean(const YamlNode& map, const char* key, const std::string& what);
  /// A list of text values (each item's node kept for positions).
  std::optional<std::vector<const YamlNode*>> text_list(const YamlNode& map, const char* key, const std::string& what);
  /// One of `choices`, with a did-you-mean.
  std::optional<std::string> choice(const YamlNode& map, const char* key, const std::string& what,
                                    const std::vector<std::string>& choices);
  /// An ISO 8601 duration (duration.h).
  /// An ISO 8601 duration; longer than `max_seconds` is an error at the value.
  std::optional<Duration> duration(const YamlNode& map, const char* key, const std::string& what,
                                   int64_t max_seconds = kMaxDurationSeconds);

  /// Position of the key whose value is `value` in `map` (the map's own position if not found).
  static SourcePos key_pos(const YamlNode& map, const YamlNode* value);
  /// Position of byte `offset` inside scalar `v` (quoted scalars start one column later).
  static SourcePos inside(const YamlNode& v, size_t offset);
  /// Where to report a problem with `value`: the value, or its key when the value is empty.
  static SourcePos where(const YamlNode& map, const YamlNode* value) {
    return value->is_null() ? key_pos(map, value) : value->pos;
  }

 private:
  std::string path_;
  Diagnostics* diags_;
};

/// Whether `id` matches [a-z0-9-]+ (outcome, setting, time-point, score ids).
bool valid_term_id(std::string_view id);

}  // namespace readyby
