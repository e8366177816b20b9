#pragma once
// Landing logs: one delivery a row, read from CSV (with a header row) or JSON
// Lines (one flat object a line), validated against a data plan.
//
// Columns:
//   node          a node id of the plan: a source, or a job or feature whose
//                 completions are logged                       (required)
//   landed_at     RFC 3339 date-time with offset: the data became usable  (required)
//   data_through  RFC 3339 date-time with offset: the data reaches this   (required)
//   scheduled_at  RFC 3339: the scheduled occurrence this delivery served (optional)
//   rows          whole number >= 0                                        (optional)
//   status        `ok` (the default when empty or absent) or `failed`     (optional)
// Other columns are ignored, so exports with extra fields load unchanged.
// Empty CSV fields and JSON nulls count as absent.
//
// A ColumnMap renames columns for logs exported from other systems
// (`landed_at=load_end_ts,data_through=watermark`).
//
// Every problem of every row is reported, each as `PATH:LINE: error: MESSAGE`
// (LINE 1-based; the header is line 1 of a CSV file): a required column the
// file does not have (naming the columns it has and --map), unknown node
// (with a did-you-mean), missing or malformed timestamps, data_through after
// landed_at, bad status, bad rows, a CSV row with the wrong number of fields,
// a line that is not a JSON object. Timestamps are quoted as written in the
// file. A file with any error yields no rows, so that callers reject it whole.

#include <array>
#include <cstdint>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "plan/plan.h"
#include "time/instant.h"

namespace readyby {

enum class LandingStatus { ok, failed };
const char* to_string(LandingStatus s);

/// One validated delivery.
struct LandingRow {
  int line = 0;                        // 1-based line in its file
  int node = -1;                       // index into Plan::nodes
  Instant landed_at;
  Instant data_through;                // <= landed_at
  std::optional<Instant> scheduled_at;
  std::optional<int64_t> rows;
  LandingStatus status = LandingStatus::ok;
};

/// One problem in a landing log, at a line (0: the file as a whole).
struct LogError {
  std::string path;
  int line = 0;
  std::string message;
  /// `PATH:LINE: error: MESSAGE`, or `PATH: error: MESSAGE` when line is 0.
  std::string str() const;
};

/// The log's columns, in this order everywhere (ColumnMap, messages).
enum class LogField { node, landed_at, data_through, scheduled_at, rows, status };
inline constexpr size_t kLogFieldCount = 6;
const char* to_string(LogField f);

/// What a value of the status column means: a delivery that is ok, one that
/// failed, or `skip` — the row is not a delivery (e.g. a job still running)
/// and is left out without further checks.
enum class StatusMeaning { ok, failed, skip };

/// How a log from another system is read: the column name that holds each
/// field (by default the field's own name), and its own status values.
struct ColumnMap {
  std::array<std::string, kLogFieldCount> column;
  /// Status values and their meaning, compared exactly; `ok`, `failed` and
  /// an empty value keep their meaning unless listed here.
  std::vector<std::pair<std::string, StatusMeaning>> status_values;
  ColumnMap();
  const std::string& operator[](LogField f) const { return column[static_cast<size_t>(f)]; }
};

/// Parses `FIELD=COLUMN[,FIELD=COLUMN...]` on top of the default map. On a bad
/// spec (unknown field — with a did-you-mean —, missing `=`, empty column,
/// a field given twice) returns nullopt and sets *error.
std::optional<ColumnMap> parse_column_map(std::string_view spec, std::string* error);

/// Parses `VALUE=ok|failed|skip[,VALUE=...]` (e.g. `SUCCESS=ok,ERROR=failed`)
/// into `map->status_values`. On a bad spec (missing `=`, empty value, a
/// meaning other than ok, failed or skip, a value given twice) returns false
/// and sets *error.
bool parse_status_map(std::string_view spec, ColumnMap* map, std::string* error);

enum class LogFormat { csv, json_lines };
/// `.jsonl`/`.ndjson` → JSON Lines, `.csv` → CSV; otherwise JSON Lines when the
/// first non-blank character of `text` is `{`, else CSV.
LogFormat detect_log_format(std::string_view path, std::string_view text);

struct LandingLog {
  std::vector<LandingRow> rows;     // empty whenever `errors` is not
  std::vector<LogError> errors;     // in line order
  int skipped = 0;                  // rows left out because their status means skip
};

/// Parses and validates the log in `text`, naming it `path` in errors.
LandingLog parse_landing_log(std::string_view text, const std::string& path, const Plan& plan,
                             const ColumnMap& map);
/// Reads the file at `path` and parses it; an unreadable file is one error.
LandingLog read_landing_log(const std::string& path, const Plan& plan, const ColumnMap& map);

}  // namespace readyby
