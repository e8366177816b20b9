#pragma once
// The catalogue: published scores and an organisation's own models
// (registries/SCHEMA.md `scores/` and `local/`), loaded into plain structs
// and validated against the vocabulary.
//
// A registry is a folder with `vocabulary/`, `scores/` and `local/`; a folder
// without those holds entry files directly. The shipped registry comes first;
// further registries (`--registry DIR`) are layered over it: their vocabulary
// is merged (an id defined twice is still an error) and an entry whose id an
// earlier registry already defines replaces that entry. Within one registry an
// id may be defined once.

#include <optional>
#include <string>
#include <vector>

#include "catalog/vocabulary.h"
#include "time/duration.h"
#include "util/diagnostics.h"

namespace readyby {

/// How far ahead an entry predicts.
struct Horizon {
  bool in_hospital = false;   // `in-hospital`: until discharge, however long
  Duration duration;          // when !in_hospital
  std::string str() const;    // "in-hospital" or the ISO form, e.g. "P30D"
};

/// Points that grow with a measurement: `points` for every `amount` of
/// `unit` (PESI: 1 point per 1 year of age; ASTRAL: 1 per 5 years).
struct PointsPer {
  double amount = 1;    // > 0
  std::string unit;     // e.g. "year", "NIHSS point"
  /// "per year", "per 5 years".
  std::string str() const;
};

struct EntryInput {
  std::string element;               // an element id of the vocabulary
  std::string label;
  std::optional<long> points;        // points scores: fixed points, or points per unit when `per` is set
  std::optional<PointsPer> per;      // nullopt: `points` is a fixed number
  std::string when;                  // free text, e.g. ">= 75 years"; empty: always
  std::optional<Duration> recency;   // nullopt: not stated
};

/// The range of a points score's total.
struct ScoreRange {
  long min = 0;
  std::optional<long> max;           // nullopt: no fixed maximum (a `per` item grows with its measurement)
  bool operator==(const ScoreRange&) const = default;
  /// "0 to 9", "0 upwards".
  std::string str() const;
};

struct Performance {
  std::string metric;   // e.g. c-statistic
  double value = 0;
  std::string cohort;   // derivation | validation
};

struct Publication {
  std::string authors;
  int year = 0;
  std::string title;
  std::string journal;
  std::string doi;      // empty: not given
  /// "Authors. Title. Journal YEAR. doi:..." for reports.
  std::string citation() const;
};

struct Entry {
  std::string id;
  std::string name;
  std::string kind;                  // points | equation | rule | local
  std::string summary;
  std::string outcome;               // outcome concept id
  std::string outcome_detail;
  std::optional<Horizon> horizon;    // nullopt: not stated
  std::optional<long> age_min, age_max;
  std::string condition;
  std::vector<std::string> settings;
  std::string time_point;
  std::vector<EntryInput> inputs;
  std::optional<ScoreRange> score_range;              // nullopt: not stated
  std::vector<Performance> performance;
  std::optional<Publication> publication;             // always set for published scores
  std::string provenance;            // from-memory | checked
  std::string owner, go_live, status;  // local models only
  std::string path;                  // the file it came from
  int layer = 0;                     // 0: the shipped registry; 1..: --registry folders in order

  bool local() const { return kind == "local"; }
  /// The publication's citation, or "in-house model (OWNER; STATUS since GO_LIVE)".
  std::string reference() const;
};

/// The files of a set of layered registries, as read from disk.
struct RegistryFiles {
  std::vector<SourceFile> vocabulary;
  struct EntryFile {
    SourceFile file;
    int layer = 0;
    std::string folder;   // "scores", "local" or "" (entry files directly in the registry folder)
  };
  std::vector<EntryFile> entries;
  std::vector<std::string> registries;   // the registry folders, layer order
};

/// Lists and reads every `*.yaml` of `registries` (layer order, files sorted by
/// name), with each file's size and modification time. With `read_text`
/// false the texts are left empty (see read_texts). Unreadable folders or
/// files are reported to `diags`; returns false then.
bool read_registries(const std::vector<std::string>& registries, RegistryFiles* out, Diagnostics* diags,
                     bool read_text = true);

/// Reads the text of every listed file whose text is still empty. False (with
/// the problem in `diags`) when a file cannot be read.
bool read_texts(RegistryFiles* files, Diagnostics* diags);

/// A 64-bit hash (hex) of every file's path, size and modification time: a
/// cheap pre-check, as version-control tools do (common practice), so that an
/// unchanged catalogue is not re-read. Only a matching content hash makes an
/// index valid; this key merely lets a verified index be reused.
std::string stat_signature(const RegistryFiles& files);

/// A 64-bit content hash (hex) of every file's path and text, in order: any
/// change to any YAML file changes it.
std::string content_hash(const RegistryFiles& files);

struct Catalog {
  Vocabulary vocabulary;
  std::vector<Entry> entries;   // sorted by id; later layers already applied

  /// nullptr when no entry has this id.
  const Entry* find(const std::string& id) const;
};

/// Parses one entry file without looking at the vocabulary: structure, types,
/// required keys, id = file name, durations, inverted ranges, publication
/// rules. Returns the entry even when errors were found (fields that failed
/// are left empty) — callers check `diags`.
Entry parse_entry(const SourceFile& file, const std::string& folder, Diagnostics* diags);

/// Loads and validates everything in `files`: the vocabulary, every entry as
/// parse_entry does, every concept, setting, time point and element id an
/// entry uses (with a did-you-mean) and duplicate ids within a registry. Returns true (and fills `out`)
/// when no error was found; otherwise every error is in `diags`.
bool load_catalog(const RegistryFiles& files, Catalog* out, Diagnostics* diags);

}  // namespace readyby
