#include "util/yaml_fields.h"

#include <algorithm>
#include <cerrno>
#include <cstdlib>

#include "util/text.h"

namespace readyby {

bool valid_term_id(std::string_view id) {
  if (id.empty()) return false;
  return std::all_of(id.begin(), id.end(),
                     [](char c) { return (c >= 'a' && c <= 'z') || (c >= '0' && c <= '9') || c == '-'; });
}

SourcePos FieldReader::key_pos(const YamlNode& map, const YamlNode* value) {
  for (const auto& [k, v] : map.entries) {
    if (&v == value) return k.pos;
  }
  return map.pos;
}

SourcePos FieldReader::inside(const YamlNode& v, size_t offset) {
  bool quoted = !v.plain && v.pos.line > 0;
  return {v.pos.line, v.pos.column + static_cast<int>(offset) + (quoted ? 1 : 0)};
}

void FieldReader::check_keys(const YamlNode& map, const std::vector<std::string>& allowed, const std::string& what) {
  for (const auto& [key, value] : map.entries) {
    if (!key.is_scalar()) {
      error(key.pos, "keys of " + what + " must be plain names");
      continue;
    }
    if (std::find(allowed.begin(), allowed.end(), key.value) == allowed.end()) {
      error(key.pos, "unknown key '" + key.value + "' in " + what + did_you_mean(key.value, allowed));
    }
  }
}

bool FieldReader::require(const YamlNode& map, const char* key, const std::string& what, SourcePos where) {
  if (map.find(key)) return true;
  error(where, "missing required key '" + std::string(key) + "' in " + what);
  return false;
}

std::optional<std::string> FieldReader::text(const YamlNode& map, const char* key, const std::string& what) {
  const YamlNode* v = map.find(key);
  if (!v) return std::nullopt;
  if (!v->is_scalar() || v->value.empty()) {
    error(where(map, v), "'" + std::string(key) + "' of " + what + " must be text, found " + v->describe());
    return std::nullopt;
  }
  return v->value;
}

std::optional<long> FieldReader::integer(const YamlNode& map, const char* key, const std::string& what, long lo,
                                         long hi) {
  const YamlNode* v = map.find(key);
  if (!v) return std::nullopt;
  std::string range = " from " + std::to_string(lo) + " to " + std::to_string(hi);
  if (!v->is_scalar() || !v->plain || !looks_numeric(*v)) {
    error(where(map, v), "'" + std::string(key) + "' of " + what + " must be a whole number" + range + ", found " +
                             v->describe());
    return std::nullopt;
  }
  errno = 0;
  char* end = nullptr;
  long n = std::strtol(v->value.c_str(), &end, 10);
  if (*end || errno == ERANGE || n < lo || n > hi) {
    error(v->pos, "'" + std::string(key) + "' of " + what + " must be a whole number" + range + ", found " +
                      v->describe());
    return std::nullopt;
  }
  return n;
}

std::optional<double> FieldReader::number(const YamlNode& map, const char* key, const std::string& what) {
  const YamlNode* v = map.find(key);
  if (!v) return std::nullopt;
  char* end = nullptr;
  double x = v->is_scalar() && looks_numeric(*v) ? std::strtod(v->value.c_str(), &end) : 0;
  if (!end || *end) {
    error(where(map, v), "'" + std::string(key) + "' of " + what + " must be a number, found " + v->describe());
    return std::nullopt;
  }
  return x;
}

std::optional<bool> FieldReader::boolean(const YamlNode& map, const char* key, const std::string& what) {
  const YamlNode* v = map.find(key);
  if (!v) return std::nullopt;
  if (v->is_scalar() && v->plain && (v->value == "true" || v->value == "false")) return v->value == "true";
  error(where(map, v), "'" + std::string(key) + "' of " + what + " must be true or false, found " + v->describe());
  return std::nullopt;
}

std::optional<std::vector<const YamlNode*>> FieldReader::text_list(const YamlNode& map, const char* key,
                                                                   const std::string& what) {
  const YamlNode* v = map.find(key);
  if (!v) return std::nullopt;
  if (!v->is_sequence()) {
    error(where(map, v), "'" + std::string(key) + "' of " + what + " must be a list, e.g. [a, b], found " +
                             v->describe());
    return std::nullopt;
  }
  std::vector<const YamlNode*> out;
  for (const YamlNode& item : v->items) {
    if (!item.is_scalar() || item.value.empty()) {
      error(item.pos, "items of '" + std::string(key) + "' of " + what + " must be text, found " + item.describe());
      continue;
    }
    out.push_back(&item);
  }
  return out;
}

std::optional<std::string> FieldReader::choice(const YamlNode& map, const char* key, const std::string& what,
                                               const std::vector<std::string>& choices) {
  std::optional<std::string> v = text(map, key, what);
  if (!v) return std::nullopt;
  if (std::find(choices.begin(), choices.end(), *v) != choices.end()) return v;
  std::string list;
  for (const std::string& c : choices) list += (list.empty() ? "" : ", ") + c;
  error(map.find(key)->pos,
        "'" + std::string(key) + "' of " + what + " must be one of " + list + ", found '" + *v + "'" +
            did_you_mean(*v, choices));
  return std::nullopt;
}

std::optional<Duration> FieldReader::duration(const YamlNode& map, const char* key, const std::string& what,
                                              int64_t max_seconds) {
  const YamlNode* v = map.find(key);
  if (!v) return std::nullopt;
  const std::string field = "'" + std::string(key) + "' of " + what;
  if (v->is_null()) {
    error(key_pos(map, v), field + " has no value (expected an ISO 8601 duration such as PT30M)");
    return std::nullopt;
  }
  if (!v->is_scalar()) {
    error(v->pos, field + " must be an ISO 8601 duration such as PT30M, found " + v->describe());
    return std::nullopt;
  }
  if (looks_numeric(*v)) {
    error(v->pos, field + " must be an ISO 8601 duration such as PT30M or P1D, found " + v->describe() +
                      " (a bare number has no unit)");
    return std::nullopt;
  }
  DurationParse d = parse_duration(v->value);
  if (!d.value) {
    error(inside(*v, d.offset), "bad duration '" + v->value + "' for '" + key + "' of " + what + ": " + d.error);
    return std::nullopt;
  }
  if (d.value->seconds > max_seconds) {
    error(v->pos, "'" + std::string(key) + "' of " + what + " is " + v->value + ", longer than " +
                      std::to_string(max_seconds / 86400) + " days, the longest a plan's timing may span (P" +
                      std::to_string(max_seconds / 86400) + "D)");
    return std::nullopt;
  }
  return d.value;
}

}  // namespace readyby
