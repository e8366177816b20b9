#include "history/landing_log.h"

#include <algorithm>
#include <cctype>
#include <charconv>
#include <unordered_map>

#include "plan/plan_loader.h"
#include "time/zone.h"
#include "util/text.h"

namespace readyby {

const char* to_string(LandingStatus s) { return s == LandingStatus::ok ? "ok" : "failed"; }

const char* to_string(LogField f) {
  switch (f) {
    case LogField::node: return "node";
    case LogField::landed_at: return "landed_at";
    case LogField::data_through: return "data_through";
    case LogField::scheduled_at: return "scheduled_at";
    case LogField::rows: return "rows";
    case LogField::status: return "status";
  }
  return "?";
}

std::string LogError::str() const {
  std::string out = path;
  if (line > 0) out += ':' + std::to_string(line);
  return printable(out + ": error: " + message);
}

ColumnMap::ColumnMap() {
  for (size_t i = 0; i < kLogFieldCount; ++i) column[i] = to_string(static_cast<LogField>(i));
}

std::optional<ColumnMap> parse_column_map(std::string_view spec, std::string* error) {
  ColumnMap map;
  std::array<bool, kLogFieldCount> seen{};
  std::vector<std::string> names;
  for (size_t i = 0; i < kLogFieldCount; ++i) names.emplace_back(to_string(static_cast<LogField>(i)));
  for (std::string_view item : split(spec, ',')) {
    size_t eq = item.find('=');
    if (eq == std::string_view::npos || eq == 0 || eq + 1 == item.size()) {
      *error = "--map expects FIELD=COLUMN pairs separated by commas, got '" + std::string(item) + "'";
      return std::nullopt;
    }
    std::string field(item.substr(0, eq));
    size_t index = 0;
    while (index < kLogFieldCount && names[index] != field) ++index;
    if (index == kLogFieldCount) {
      *error = "--map: unknown field '" + field + "'" + did_you_mean(field, names) +
               "; fields are node, landed_at, data_through, scheduled_at, rows, status";
      return std::nullopt;
    }
    if (seen[index]) {
      *error = "--map: field '" + field + "' is mapped twice";
      return std::nullopt;
    }
    seen[index] = true;
    map.column[index] = std::string(item.substr(eq + 1));
  }
  return map;
}

bool parse_status_map(std::string_view spec, ColumnMap* map, std::string* error) {
  std::vector<std::pair<std::string, StatusMeaning>> values;
  for (std::string_view item : split(spec, ',')) {
    size_t eq = item.rfind('=');
    if (eq == std::string_view::npos || eq == 0) {
      *error = "--map-status expects VALUE=ok|failed|skip pairs separated by commas, got '" + std::string(item) + "'";
      return false;
    }
    std::string value(item.substr(0, eq));
    std::string_view meaning = item.substr(eq + 1);
    StatusMeaning m;
    if (meaning == "ok") m = StatusMeaning::ok;
    else if (meaning == "failed") m = StatusMeaning::failed;
    else if (meaning == "skip") m = StatusMeaning::skip;
    else {
      *error = "--map-status: '" + std::string(meaning) + "' for value '" + value +
               "' must be ok, failed or skip" + did_you_mean(meaning, {"ok", "failed", "skip"});
      return false;
    }
    for (const auto& [v, ignored] : values) {
      if (v == value) {
        *error = "--map-status: value '" + value + "' is mapped twice";
        return false;
      }
    }
    values.emplace_back(std::move(value), m);
  }
  map->status_values = std::move(values);
  return true;
}

LogFormat detect_log_format(std::string_view path, std::string_view text) {
  if (path.ends_with(".jsonl") || path.ends_with(".ndjson")) return LogFormat::json_lines;
  if (path.ends_with(".csv")) return LogFormat::csv;
  size_t first = text.find_first_not_of(" \t\r\n");
  return first != std::string_view::npos && text[first] == '{' ? LogFormat::json_lines : LogFormat::csv;
}

namespace {

// The raw text of each field of one row; nullopt: absent.
using RawRow = std::array<std::optional<std::string>, kLogFieldCount>;

struct Validator {
  const std::string& path;
  const Plan& plan;
  const ColumnMap& map;
  std::unordered_map<std::string_view, int> node_index;
  std::vector<std::string> node_ids;
  std::unordered_map<std::string, std::string> suggestions;  // unknown node -> its did-you-mean
  LandingLog* out;

  Validator(const std::string& p, const Plan& pl, const ColumnMap& m, LandingLog* o)
      : path(p), plan(pl), map(m), out(o) {
    for (size_t i = 0; i < plan.nodes.size(); ++i) {
      node_index.emplace(plan.nodes[i].id, static_cast<int>(i));
      node_ids.push_back(plan.nodes[i].id);
    }
  }

  void error(int line, std::string message) { out->errors.push_back({path, line, std::move(message)}); }

  std::optional<Instant> instant(int line, const RawRow& raw, LogField f, bool required) {
    const auto& text = raw[static_cast<size_t>(f)];
    if (!text) {
      if (required) error(line, std::string("missing ") + to_string(f));
      return std::nullopt;
    }
    std::optional<Instant> t = parse_rfc3339(*text);
    if (!t) {
      error(line, std::string("bad ") + to_string(f) + " '" + *text +
                      "': expected an RFC 3339 date-time with offset, e.g. 2026-03-08T06:00:00-05:00");
    }
    return t;
  }

  // The meaning of a status value: the log's own values first, then ok and
  // failed; nullopt for any other value.
  std::optional<StatusMeaning> status_meaning(const std::string& value) const {
    for (const auto& [v, m] : map.status_values) {
      if (v == value) return m;
    }
    if (value == "ok") return StatusMeaning::ok;
    if (value == "failed") return StatusMeaning::failed;
    return std::nullopt;
  }

  // Whether the row's status means skip.
  bool skips(const RawRow& raw) const {
    const auto& status_text = raw[static_cast<size_t>(LogField::status)];
    return status_text && status_meaning(*status_text) == StatusMeaning::skip;
  }

  void row(int line, const RawRow& raw) {
    const auto& status_text = raw[static_cast<size_t>(LogField::status)];
    const std::optional<StatusMeaning> status = status_text ? status_meaning(*status_text) : StatusMeaning::ok;
    if (status == StatusMeaning::skip) {
      ++out->skipped;
      return;
    }
    const size_t before = out->errors.size();
    LandingRow r;
    r.line = line;
    const auto& node = raw[static_cast<size_t>(LogField::node)];
    if (!node) {
      error(line, "missing node");
    } else if (auto it = node_index.find(*node); it != node_index.end()) {
      r.node = it->second;
    } else {
      // One suggestion per distinct unknown name: a log of 100,000 rows of a
      // node the plan lacks must not search the plan's ids 100,000 times.
      auto [hint, fresh] = suggestions.try_emplace(*node);
      if (fresh) hint->second = did_you_mean(*node, node_ids);
      error(line, "unknown node '" + *node + "'" + hint->second + " in plan " + plan.id);
    }
    std::optional<Instant> landed = instant(line, raw, LogField::landed_at, true);
    std::optional<Instant> through = instant(line, raw, LogField::data_through, true);
    std::optional<Instant> scheduled = instant(line, raw, LogField::scheduled_at, false);
    if (landed && through && *through > *landed) {  // quoted as written, with their own offsets
      error(line, "data_through " + *raw[static_cast<size_t>(LogField::data_through)] + " is after landed_at " +
                      *raw[static_cast<size_t>(LogField::landed_at)] +
                      " (a delivery cannot hold data from after it landed)");
    }
    if (const auto& rows = raw[static_cast<size_t>(LogField::rows)]) {
      int64_t n = -1;
      auto [end, ec] = std::from_chars(rows->data(), rows->data() + rows->size(), n);
      if (ec != std::errc() || end != rows->data() + rows->size() || n < 0) {
        error(line, "bad rows '" + *rows + "': expected a whole number >= 0");
      } else {
        r.rows = n;
      }
    }
    if (!status) {
      error(line, "bad status '" + *status_text + "': expected ok or failed" +
                      (map.status_values.empty()
                           ? "; map the log's own values with --map-status, e.g. --map-status '" + *status_text + "=ok'"
                           : " or a value given to --map-status"));
    } else if (*status == StatusMeaning::failed) {
      r.status = LandingStatus::failed;
    }
    if (out->errors.size() != before) return;
    r.landed_at = *landed;
    r.data_through = *through;
    r.scheduled_at = scheduled;
    out->rows.push_back(std::move(r));
  }
};

// Splits one CSV record (RFC 4180 quoting, no line breaks inside quotes) into
// `fields`; false with *error on an unterminated or malformed quote.
bool split_csv(std::string_view line, std::vector<std::string>* fields, std::string* error) {
  fields->clear();
  size_t i = 0;
  while (true) {
    std::string field;
    if (i < line.size() && line[i] == '"') {
      ++i;
      while (true) {
        if (i >= line.size()) {
          *error = "unterminated quoted field";
          return false;
        }
        if (line[i] == '"') {
          if (i + 1 < line.size() && line[i + 1] == '"') {
            field += '"';
            i += 2;
            continue;
          }
          ++i;
          break;
        }
        field += line[i++];
      }
      if (i < line.size() && line[i] != ',') {
        *error = "unexpected text after a quoted field";
        return false;
      }
    } else {
      size_t comma = line.find(',', i);
      if (comma == std::string_view::npos) comma = line.size();
      field.assign(line.substr(i, comma - i));
      i = comma;
    }
    fields->push_back(std::move(field));
    if (i >= line.size()) return true;
    ++i;  // the comma
    if (i == line.size()) {
      fields->emplace_back();
      return true;
    }
  }
}

std::string_view trim(std::string_view s) {
  size_t b = s.find_first_not_of(" \t");
  if (b == std::string_view::npos) return {};
  size_t e = s.find_last_not_of(" \t");
  return s.substr(b, e - b + 1);
}

// Calls f(line_number, line) for each line, without its "\n" or "\r\n".
template <typename F>
void for_each_line(std::string_view text, F f) {
  int number = 0;
  size_t start = 0;
  while (start < text.size()) {
    size_t nl = text.find('\n', start);
    if (nl == std::string_view::npos) nl = text.size();
    std::string_view line = text.substr(start, nl - start);
    if (!line.empty() && line.back() == '\r') line.remove_suffix(1);
    f(++number, line);
    start = nl + 1;
  }
}

// "missing column 'node' (the header has: a, b); ..." — for a required
// field whose column the file does not have, with the columns it does have
// (`where` says whose they are) and how to map one.
std::string missing_column(const ColumnMap& map, LogField f, const std::vector<std::string>& present,
                           const char* where) {
  const std::string field = to_string(f);
  std::string out = "missing column '" + map[f] + "'" + (map[f] == field ? "" : " (mapped to " + field + ")");
  std::string listed;
  for (size_t i = 0; i < present.size() && i < 20; ++i) listed += (i ? ", " : "") + present[i];
  if (present.size() > 20) listed += " and " + std::to_string(present.size() - 20) + " more";
  out += std::string(" (") + where + ": " + (listed.empty() ? "none" : listed) + ")";
  return out + "; if the log names it differently, map it with --map " + field + "=COLUMN";
}

void parse_csv(std::string_view text, const ColumnMap& map, Validator* v) {
  std::array<int, kLogFieldCount> column_of;
  column_of.fill(-1);
  size_t header_fields = 0;
  bool have_header = false;
  bool header_complete = true;
  std::vector<std::string> fields;
  std::string problem;
  RawRow raw;
  for_each_line(text, [&](int number, std::string_view line) {
    if (trim(line).empty()) return;
    if (!split_csv(line, &fields, &problem)) return v->error(number, problem);
    if (!have_header) {
      have_header = true;
      header_fields = fields.size();
      std::vector<std::string> names;
      for (size_t c = 0; c < fields.size(); ++c) {
        std::string_view name = trim(fields[c]);
        names.emplace_back(name);
        for (size_t f = 0; f < kLogFieldCount; ++f) {
          if (name == map.column[f] && column_of[f] < 0) column_of[f] = static_cast<int>(c);
        }
      }
      for (LogField f : {LogField::node, LogField::landed_at, LogField::data_through}) {
        if (column_of[static_cast<size_t>(f)] < 0) {
          v->error(number, missing_column(map, f, names, "the header has"));
          header_complete = false;
        }
      }
      return;
    }
    if (!header_complete) return;  // every row would miss the same columns
    if (fields.size() != header_fields) {
      return v->error(number, "expected " + std::to_string(header_fields) + " fields as in the header, found " +
                                  std::to_string(fields.size()));
    }
    for (size_t f = 0; f < kLogFieldCount; ++f) {
      raw[f].reset();
      if (column_of[f] < 0) continue;
      std::string_view value = trim(fields[static_cast<size_t>(column_of[f])]);
      if (!value.empty()) raw[f] = std::string(value);
    }
    v->row(number, raw);
  });
  if (!have_header) v->error(0, "empty landing log: expected a header row naming node, landed_at, data_through");
}

// A minimal reader for one flat JSON object (RFC 8259): string, number, true,
// false and null values; nested values are refused.
class FlatJson {
 public:
  explicit FlatJson(std::string_view s) : s_(s) {}

  bool parse(std::vector<std::pair<std::string, std::optional<std::string>>>* members, std::string* error) {
    skip();
    if (!eat('{')) return fail(error, "expected a JSON object ('{')");
    skip();
    if (eat('}')) return at_end(error);
    while (true) {
      std::string key;
      skip();
      if (!string(&key)) return fail(error, "expected a quoted key");
      skip();
      if (!eat(':')) return fail(error, "expected ':' after key '" + key + "'");
      skip();
      std::optional<std::string> value;
      if (!scalar(&value)) return fail(error, "value of '" + key + "' must be a string, number, boolean or null");
      members->emplace_back(std::move(key), std::move(value));
      skip();
      if (eat('}')) return at_end(error);
      if (!eat(',')) return fail(error, "expected ',' or '}'");
    }
  }

 private:
  bool at_end(std::string* error) {
    skip();
    return i_ == s_.size() || fail(error, "unexpected text after the object");
  }
  bool fail(std::string* error, std::string message) {
    *error = "not a JSON object: " + message + " at column " + std::to_string(i_ + 1);
    return false;
  }
  void skip() {
    while (i_ < s_.size() && (s_[i_] == ' ' || s_[i_] == '\t' || s_[i_] == '\r' || s_[i_] == '\n')) ++i_;
  }
  bool eat(char c) {
    if (i_ < s_.size() && s_[i_] == c) return ++i_, true;
    return false;
  }
  static void put_utf8(uint32_t cp, std::string* out) {
    if (cp < 0x80) {
      *out += static_cast<char>(cp);
    } else if (cp < 0x800) {
      *out += static_cast<char>(0xC0 | (cp >> 6));
      *out += static_cast<char>(0x80 | (cp & 0x3F));
    } else if (cp < 0x10000) {
      *out += static_cast<char>(0xE0 | (cp >> 12));
      *out += static_cast<char>(0x80 | ((cp >> 6) & 0x3F));
      *out += static_cast<char>(0x80 | (cp & 0x3F));
    } else {
      *out += static_cast<char>(0xF0 | (cp >> 18));
      *out += static_cast<char>(0x80 | ((cp >> 12) & 0x3F));
      *out += static_cast<char>(0x80 | ((cp >> 6) & 0x3F));
      *out += static_cast<char>(0x80 | (cp & 0x3F));
    }
  }
  bool hex4(uint32_t* cp) {
    if (i_ + 4 > s_.size()) return false;
    uint32_t v = 0;
    for (int k = 0; k < 4; ++k) {
      char c = s_[i_++];
      v <<= 4;
      if (c >= '0' && c <= '9') v |= static_cast<uint32_t>(c - '0');
      else if (c >= 'a' && c <= 'f') v |= static_cast<uint32_t>(c - 'a' + 10);
      else if (c >= 'A' && c <= 'F') v |= static_cast<uint32_t>(c - 'A' + 10);
      else return false;
    }
    *cp = v;
    return true;
  }
  bool string(std::string* out) {
    if (!eat('"')) return false;
    while (i_ < s_.size()) {
      char c = s_[i_++];
      if (c == '"') return true;
      if (static_cast<unsigned char>(c) < 0x20) return false;
      if (c != '\\') {
        *out += c;
        continue;
      }
      if (i_ >= s_.size()) return false;
      char e = s_[i_++];
      switch (e) {
        case '"': case '\\': case '/': *out += e; break;
        case 'b': *out += '\b'; break;
        case 'f': *out += '\f'; break;
        case 'n': *out += '\n'; break;
        case 'r': *out += '\r'; break;
        case 't': *out += '\t'; break;
        case 'u': {
          uint32_t cp = 0;
          if (!hex4(&cp)) return false;
          if (cp >= 0xD800 && cp < 0xDC00) {
            uint32_t low = 0;
            if (!eat('\\') || !eat('u') || !hex4(&low) || low < 0xDC00 || low > 0xDFFF) return false;
            cp = 0x10000 + ((cp - 0xD800) << 10) + (low - 0xDC00);
          } else if (cp >= 0xDC00 && cp <= 0xDFFF) {
            return false;
          }
          put_utf8(cp, out);
          break;
        }
        default: return false;
      }
    }
    return false;
  }
  bool scalar(std::optional<std::string>* out) {
    if (i_ >= s_.size()) return false;
    if (s_[i_] == '"') {
      std::string value;
      if (!string(&value)) return false;
      *out = std::move(value);
      return true;
    }
    for (std::string_view word : {"true", "false", "null"}) {
      if (s_.substr(i_, word.size()) == word) {
        i_ += word.size();
        if (word != "null") *out = std::string(word);
        return true;
      }
    }
    size_t start = i_;
    while (i_ < s_.size() && (std::isdigit(static_cast<unsigned char>(s_[i_])) || s_[i_] == '-' || s_[i_] == '+' ||
                              s_[i_] == '.' || s_[i_] == 'e' || s_[i_] == 'E')) {
      ++i_;
    }
    if (i_ == start) return false;
    *out = std::string(s_.substr(start, i_ - start));
    return true;
  }

  std::string_view s_;
  size_t i_ = 0;
};

void parse_json_lines(std::string_view text, const ColumnMap& map, Validator* v) {
  std::vector<std::pair<std::string, std::optional<std::string>>> members;
  std::string problem;
  RawRow raw;
  bool any = false;
  std::array<bool, kLogFieldCount> hinted{};  // the --map hint is given once per field
  for_each_line(text, [&](int number, std::string_view line) {
    if (trim(line).empty()) return;
    any = true;
    members.clear();
    if (!FlatJson(line).parse(&members, &problem)) return v->error(number, problem);
    std::array<bool, kLogFieldCount> present{};
    for (size_t f = 0; f < kLogFieldCount; ++f) {
      raw[f].reset();
      for (const auto& [key, value] : members) {
        if (key == map.column[f]) {
          present[f] = true;
          if (value && !trim(*value).empty()) raw[f] = std::string(trim(*value));
          break;
        }
      }
    }
    if (v->skips(raw)) return v->row(number, raw);  // counted, not checked
    bool complete = true;
    for (LogField field : {LogField::node, LogField::landed_at, LogField::data_through}) {
      const auto f = static_cast<size_t>(field);
      if (present[f]) continue;
      std::vector<std::string> keys;
      for (const auto& member : members) keys.push_back(member.first);
      v->error(number, hinted[f] ? "missing column '" + map[field] + "'"
                                 : missing_column(map, field, keys, "this line has"));
      hinted[f] = true;
      complete = false;
    }
    if (complete) v->row(number, raw);
  });
  if (!any) v->error(0, "empty landing log: no rows");
}

}  // namespace

LandingLog parse_landing_log(std::string_view text, const std::string& path, const Plan& plan,
                             const ColumnMap& map) {
  LandingLog out;
  Validator v(path, plan, map, &out);
  // A UTF-8 byte order mark, as spreadsheet exports write it, is not part of
  // the first column's name.
  if (text.substr(0, 3) == "\xEF\xBB\xBF") text.remove_prefix(3);
  size_t bad_utf8 = invalid_utf8_offset(text);
  if (bad_utf8 != std::string_view::npos) {
    int line = 1 + static_cast<int>(std::count(text.begin(), text.begin() + static_cast<std::ptrdiff_t>(bad_utf8), '\n'));
    v.error(line, "the file is not valid UTF-8");
    return out;
  }
  if (detect_log_format(path, text) == LogFormat::json_lines) parse_json_lines(text, map, &v);
  else parse_csv(text, map, &v);
  if (!out.errors.empty()) out.rows.clear();
  return out;
}

LandingLog read_landing_log(const std::string& path, const Plan& plan, const ColumnMap& map) {
  std::string text;
  if (!read_file(path, &text)) {
    LandingLog out;
    out.errors.push_back({path, 0, "cannot read the file"});
    return out;
  }
  return parse_landing_log(text, path, plan, map);
}

}  // namespace readyby
