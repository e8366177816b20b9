#include "catalog/catalog.h"

#include <fcntl.h>
#include <dirent.h>
#include <sys/stat.h>

#include <cerrno>
#include <unistd.h>

#include <algorithm>
#include <cstdio>
#include <cstring>
#include <filesystem>
#include <map>

#include "util/yaml_fields.h"
#include "plan/plan_loader.h"
#include "time/zone.h"
#include "util/text.h"
#include "util/yaml_tree.h"

namespace readyby {

namespace fs = std::filesystem;

namespace {

const std::vector<std::string> kEntryKeys = {"id",        "name",    "kind",        "summary",     "outcome",
                                             "horizon",   "population", "settings", "time_point",  "inputs",
                                             "score_range", "performance", "publication", "provenance", "owner",
                                             "go_live",   "status"};
const std::vector<std::string> kLocalOnlyKeys = {"owner", "go_live", "status"};
const std::vector<std::string> kOutcomeKeys = {"concept", "detail"};
const std::vector<std::string> kPopulationKeys = {"age_min", "age_max", "condition"};
const std::vector<std::string> kInputKeys = {"element", "label", "points", "per", "when", "recency"};
const std::vector<std::string> kPerKeys = {"amount", "unit"};
const std::vector<std::string> kRangeKeys = {"min", "max"};
const std::vector<std::string> kPerformanceKeys = {"metric", "value", "cohort"};
const std::vector<std::string> kPublicationKeys = {"authors", "year", "title", "journal", "doi"};

// An id an entry refers to, checked against the vocabulary once it is loaded.
struct Reference {
  enum class Kind { outcome, setting, time_point, element } kind;
  std::string id;
  SourcePos pos;
};

class EntryParser {
 public:
  EntryParser(const SourceFile& file, std::string folder, Diagnostics* diags)
      : file_(file), folder_(std::move(folder)), r_(file.path, diags), diags_(diags) {}

  Entry parse() {
    entry_.path = file_.path;
    YamlNode root;
    if (!parse_yaml(file_.path, file_.text, &root, diags())) return entry_;
    if (root.is_null()) {
      r_.error({}, "empty file: expected a catalogue entry (a map with id, name, kind, outcome, ...)");
      return entry_;
    }
    if (!root.is_map()) {
      r_.error(root.pos, "a catalogue entry must be a map of keys (id, name, kind, ...), found " + root.describe());
      return entry_;
    }
    r_.check_keys(root, kEntryKeys, "an entry");
    load_header(root);
    load_outcome(root);
    load_horizon(root);
    load_population(root);
    load_settings(root);
    load_inputs(root);
    load_score_range(root);
    load_performance(root);
    load_publication(root);
    load_local_fields(root);
    return entry_;
  }

  const std::vector<Reference>& references() const { return refs_; }

 private:
  Diagnostics* diags() { return diags_; }

  void load_header(const YamlNode& root) {
    for (const char* key : {"id", "name", "kind", "summary", "outcome", "settings", "time_point", "inputs",
                            "provenance"}) {
      r_.require(root, key, "an entry", {1, 1});
    }
    std::string stem = fs::path(file_.path).stem().string();
    if (auto id = r_.text(root, "id", "the entry")) {
      const YamlNode* node = root.find("id");
      if (!valid_term_id(*id)) {
        r_.error(node->pos, "invalid entry id '" + *id + "' (use lower-case letters, digits and '-')");
      } else if (*id != stem) {
        r_.error(node->pos, "id '" + *id + "' does not match the file name '" + fs::path(file_.path).filename().string() +
                                "' (expected id '" + stem + "')");
      }
      entry_.id = *id;
    }
    what_ = "entry '" + (entry_.id.empty() ? stem : entry_.id) + "'";
    entry_.name = r_.text(root, "name", what_).value_or("");
    entry_.summary = r_.text(root, "summary", what_).value_or("");
    std::vector<std::string> kinds = {"points", "equation", "rule"};
    if (folder_ == "local") kinds = {"local"};
    if (folder_.empty()) kinds.push_back("local");
    entry_.kind = r_.choice(root, "kind", what_, kinds).value_or("");
    entry_.provenance = r_.choice(root, "provenance", what_, {"from-memory", "checked"}).value_or("");
    if (auto tp = r_.text(root, "time_point", what_)) {
      entry_.time_point = *tp;
      refs_.push_back({Reference::Kind::time_point, *tp, root.find("time_point")->pos});
    }
  }

  void load_outcome(const YamlNode& root) {
    const YamlNode* outcome = root.find("outcome");
    if (!outcome) return;
    std::string what = "the outcome of " + what_;
    if (!outcome->is_map()) {
      r_.error(FieldReader::where(root, outcome), "'outcome' of " + what_ +
                                                      " must be a map with concept and detail, found " + outcome->describe());
      return;
    }
    r_.check_keys(*outcome, kOutcomeKeys, what);
    if (r_.require(*outcome, "concept", what, FieldReader::key_pos(root, outcome))) {
      if (auto concept_id = r_.text(*outcome, "concept", what)) {
        entry_.outcome = *concept_id;
        refs_.push_back({Reference::Kind::outcome, *concept_id, outcome->find("concept")->pos});
      }
    }
    entry_.outcome_detail = r_.text(*outcome, "detail", what).value_or("");
  }

  void load_horizon(const YamlNode& root) {
    const YamlNode* h = root.find("horizon");
    if (!h) return;
    if (h->is_scalar() && h->value == "in-hospital") {
      entry_.horizon = Horizon{true, {}};
      return;
    }
    if (!h->is_scalar() || looks_numeric(*h)) {
      r_.error(FieldReader::where(root, h), "'horizon' of " + what_ +
                                                " must be an ISO 8601 duration such as P30D, or in-hospital, found " +
                                                h->describe());
      return;
    }
    DurationParse d = parse_duration(h->value);
    if (!d.value) {
      r_.error(FieldReader::inside(*h, d.offset), "bad horizon '" + h->value + "' of " + what_ + ": " + d.error +
                                                      " (use an ISO 8601 duration such as P30D, or in-hospital)");
      return;
    }
    entry_.horizon = Horizon{false, *d.value};
  }

  void load_population(const YamlNode& root) {
    const YamlNode* pop = root.find("population");
    if (!pop || pop->is_null()) return;
    std::string what = "the population of " + what_;
    if (!pop->is_map()) {
      r_.error(pop->pos, "'population' of " + what_ + " must be a map (age_min, age_max, condition), found " +
                             pop->describe());
      return;
    }
    r_.check_keys(*pop, kPopulationKeys, what);
    entry_.age_min = r_.integer(*pop, "age_min", what, 0, 130);
    entry_.age_max = r_.integer(*pop, "age_max", what, 0, 130);
    entry_.condition = r_.text(*pop, "condition", what).value_or("");
    if (entry_.age_min && entry_.age_max && *entry_.age_min > *entry_.age_max) {
      r_.error(pop->find("age_min")->pos, "age_min " + std::to_string(*entry_.age_min) + " of " + what_ +
                                              " is greater than age_max " + std::to_string(*entry_.age_max));
    }
  }

  void load_settings(const YamlNode& root) {
    auto settings = r_.text_list(root, "settings", what_);
    if (!settings) return;
    if (settings->empty() && root.find("settings")->is_sequence()) {
      r_.error(root.find("settings")->pos, "'settings' of " + what_ + " must name at least one care setting");
    }
    for (const YamlNode* s : *settings) {
      entry_.settings.push_back(s->value);
      refs_.push_back({Reference::Kind::setting, s->value, s->pos});
    }
  }

  void load_inputs(const YamlNode& root) {
    const YamlNode* inputs = root.find("inputs");
    if (!inputs) return;
    if (!inputs->is_sequence() || inputs->items.empty()) {
      r_.error(FieldReader::where(root, inputs),
               "'inputs' of " + what_ + " must be a list of scored items ('- element: ...'), found " + inputs->describe());
      return;
    }
    for (size_t i = 0; i < inputs->items.size(); ++i) {
      const YamlNode& item = inputs->items[i];
      std::string what = "input " + std::to_string(i + 1) + " of " + what_;
      if (!item.is_map()) {
        r_.error(item.pos, what + " must be a map with element and label, found " + item.describe());
        continue;
      }
      r_.check_keys(item, kInputKeys, what);
      EntryInput in;
      r_.require(item, "element", what, item.pos);
      r_.require(item, "label", what, item.pos);
      if (auto e = r_.text(item, "element", what)) {
        in.element = *e;
        refs_.push_back({Reference::Kind::element, *e, item.find("element")->pos});
      }
      in.label = r_.text(item, "label", what).value_or("");
      in.points = r_.integer(item, "points", what, -1000, 1000);
      if (entry_.kind == "points" && !item.find("points")) {
        r_.error(item.pos, "missing required key 'points' in " + what + " (a points score gives each item its points)");
      }
      load_per(item, what, &in);
      in.when = r_.text(item, "when", what).value_or("");
      in.recency = r_.duration(item, "recency", what);
      entry_.inputs.push_back(std::move(in));
    }
  }

  // `per: {amount: 5, unit: years}`: the item's points for every `amount` of `unit`.
  void load_per(const YamlNode& item, const std::string& what, EntryInput* in) {
    const YamlNode* per = item.find("per");
    if (!per) return;
    std::string per_what = "'per' of " + what;
    if (!per->is_map()) {
      r_.error(FieldReader::where(item, per), per_what + " must be a map such as {amount: 1, unit: year}, found " +
                                                  per->describe());
      return;
    }
    r_.check_keys(*per, kPerKeys, per_what);
    // Both are checked (no short circuit), so that a 'per' missing both keys reports both.
    const bool has_amount = r_.require(*per, "amount", per_what, per->pos);
    const bool has_unit = r_.require(*per, "unit", per_what, per->pos);
    const bool both = has_amount && has_unit;
    std::optional<double> amount = r_.number(*per, "amount", per_what);
    std::string unit = r_.text(*per, "unit", per_what).value_or("");
    double per_amount = amount.value_or(0);
    if (amount && per_amount <= 0) {
      r_.error(per->find("amount")->pos, "'amount' of " + per_what + " must be greater than 0");
    }
    if (!item.find("points")) {
      r_.error(FieldReader::key_pos(item, per), "'per' in " + what + " needs 'points' (the points for every amount)");
    }
    if (both && per_amount > 0 && !unit.empty()) in->per = PointsPer{per_amount, unit};
    has_per_ = has_per_ || in->per.has_value();
  }

  void load_score_range(const YamlNode& root) {
    const YamlNode* range = root.find("score_range");
    if (!range) return;
    std::string what = "the score_range of " + what_;
    if (!range->is_map()) {
      r_.error(FieldReader::where(root, range), "'score_range' of " + what_ + " must be a map such as {min: 0, max: 9}, found " +
                                                    range->describe());
      return;
    }
    r_.check_keys(*range, kRangeKeys, what);
    bool has_min = r_.require(*range, "min", what, range->pos);
    // A score with points per unit may have no fixed maximum.
    bool has_max = range->find("max") != nullptr;
    if (!has_max && !has_per_) {
      r_.error(range->pos, "missing required key 'max' in " + what +
                               " (only a score with points per unit, 'per', may leave its maximum open)");
      return;
    }
    auto lo = r_.integer(*range, "min", what, -100000, 100000);
    auto hi = has_max ? r_.integer(*range, "max", what, -100000, 100000) : std::nullopt;
    if (!has_min || !lo || (has_max && !hi)) return;
    if (hi && *lo > *hi) {
      r_.error(range->find("min")->pos, "score_range of " + what_ + " is inverted: min " + std::to_string(*lo) +
                                            " is greater than max " + std::to_string(*hi));
      return;
    }
    entry_.score_range = ScoreRange{*lo, hi};
  }

  void load_performance(const YamlNode& root) {
    const YamlNode* perf = root.find("performance");
    if (!perf) return;
    if (!perf->is_sequence()) {
      r_.error(FieldReader::where(root, perf), "'performance' of " + what_ +
                                                   " must be a list of {metric, value, cohort}, found " + perf->describe());
      return;
    }
    for (const YamlNode& item : perf->items) {
      std::string what = "a performance figure of " + what_;
      if (!item.is_map()) {
        r_.error(item.pos, what + " must be a map with metric, value and cohort, found " + item.describe());
        continue;
      }
      r_.check_keys(item, kPerformanceKeys, what);
      Performance p;
      for (const char* key : {"metric", "value"}) r_.require(item, key, what, item.pos);
      p.metric = r_.text(item, "metric", what).value_or("");
      p.value = r_.number(item, "value", what).value_or(0);
      p.cohort = r_.choice(item, "cohort", what, {"derivation", "validation"}).value_or("");
      entry_.performance.push_back(std::move(p));
    }
  }

  void load_publication(const YamlNode& root) {
    const YamlNode* pub = root.find("publication");
    if (entry_.kind == "local") {
      if (pub) r_.error(FieldReader::key_pos(root, pub), "a local model has no 'publication' (it is not published)");
      return;
    }
    if (!pub) {
      r_.error({1, 1}, "missing publication for " + what_ +
                           ": a published score needs its primary publication (authors, year, title, journal)");
      return;
    }
    std::string what = "the publication of " + what_;
    if (!pub->is_map()) {
      r_.error(FieldReader::where(root, pub), "'publication' of " + what_ +
                                                  " must be a map (authors, year, title, journal, doi), found " + pub->describe());
      return;
    }
    r_.check_keys(*pub, kPublicationKeys, what);
    SourcePos at = FieldReader::key_pos(root, pub);
    Publication p;
    for (const char* key : {"authors", "year", "title", "journal"}) r_.require(*pub, key, what, at);
    p.authors = r_.text(*pub, "authors", what).value_or("");
    p.year = static_cast<int>(r_.integer(*pub, "year", what, 1900, 2100).value_or(0));
    p.title = r_.text(*pub, "title", what).value_or("");
    p.journal = r_.text(*pub, "journal", what).value_or("");
    if (auto doi = r_.text(*pub, "doi", what)) {
      if (!doi->starts_with("10.") || doi->find('/') == std::string::npos) {
        r_.error(pub->find("doi")->pos, "'" + *doi + "' is not a DOI (expected 10.NNNN/...; leave 'doi' out when unsure)");
      } else {
        p.doi = *doi;
      }
    }
    entry_.publication = std::move(p);
  }

  void load_local_fields(const YamlNode& root) {
    if (entry_.kind != "local") {
      for (const std::string& key : kLocalOnlyKeys) {
        if (const YamlNode* v = root.find(key)) {
          r_.error(FieldReader::key_pos(root, v), "'" + key + "' applies only to local models (kind: local)");
        }
      }
      return;
    }
    for (const char* key : {"owner", "go_live", "status"}) r_.require(root, key, "a local model", {1, 1});
    entry_.owner = r_.text(root, "owner", what_).value_or("");
    entry_.status = r_.choice(root, "status", what_, {"live", "pilot", "retired"}).value_or("");
    if (auto go_live = r_.text(root, "go_live", what_)) {
      if (!parse_date(*go_live)) {
        r_.error(root.find("go_live")->pos, "'go_live' of " + what_ + " must be a date YYYY-MM-DD, found '" + *go_live + "'");
      } else {
        entry_.go_live = *go_live;
      }
    }
  }

  const SourceFile& file_;
  std::string folder_;
  FieldReader r_;
  Diagnostics* diags_;
  Entry entry_;
  std::string what_ = "the entry";
  std::vector<Reference> refs_;
  bool has_per_ = false;   // some input has points per unit
};

void check_references(const std::vector<Reference>& refs, const std::string& path, const Vocabulary& vocabulary,
                      Diagnostics* diags) {
  std::vector<std::string> outcome_ids, setting_ids, time_point_ids, element_ids;
  for (const Reference& ref : refs) {
    switch (ref.kind) {
      case Reference::Kind::outcome:
        if (vocabulary.outcome(ref.id)) break;
        if (outcome_ids.empty()) outcome_ids = Vocabulary::ids(vocabulary.outcomes);
        diags->error(path, ref.pos, "unknown outcome concept '" + ref.id + "'" + did_you_mean(ref.id, outcome_ids));
        break;
      case Reference::Kind::setting:
        if (vocabulary.setting(ref.id)) break;
        if (setting_ids.empty()) setting_ids = Vocabulary::ids(vocabulary.settings);
        diags->error(path, ref.pos, "unknown setting '" + ref.id + "'" + did_you_mean(ref.id, setting_ids));
        break;
      case Reference::Kind::time_point:
        if (vocabulary.time_point(ref.id)) break;
        if (time_point_ids.empty()) time_point_ids = Vocabulary::ids(vocabulary.time_points);
        diags->error(path, ref.pos, "unknown time point '" + ref.id + "'" + did_you_mean(ref.id, time_point_ids));
        break;
      case Reference::Kind::element:
        if (vocabulary.element(ref.id)) break;
        if (element_ids.empty()) element_ids = vocabulary.element_ids();
        diags->error(path, ref.pos, "unknown element '" + ref.id + "'" + did_you_mean(ref.id, element_ids));
        break;
    }
  }
}

// read_file's job with plain POSIX calls: a catalogue may hold thousands of files.
bool read_whole_file(const std::string& path, std::string* out) {
  int fd = ::open(path.c_str(), O_RDONLY | O_CLOEXEC);
  if (fd < 0) return false;
  struct stat st;
  bool ok = ::fstat(fd, &st) == 0;
  out->clear();
  if (ok) out->resize(static_cast<size_t>(st.st_size));
  size_t done = 0;
  while (ok) {
    if (done == out->size()) out->resize(done + 4096);  // the file grew, or st_size was 0
    ssize_t n = ::read(fd, out->data() + done, out->size() - done);
    if (n < 0) ok = false;
    if (n <= 0) break;
    done += static_cast<size_t>(n);
  }
  out->resize(done);
  ::close(fd);
  return ok;
}

// The `*.yaml` regular files of `dir`, sorted by path, each with its size and
// modification time. Stats relative to the open folder, so that a large
// catalogue costs one short lookup per file.
bool list_yaml(const fs::path& dir, std::vector<SourceFile>* out, std::error_code* ec) {
  DIR* d = ::opendir(dir.c_str());
  if (!d) {
    *ec = std::error_code(errno, std::generic_category());
    return false;
  }
  const std::string prefix = dir.string() + "/";
  while (struct dirent* e = ::readdir(d)) {
    std::string_view name(e->d_name);
    if (!name.ends_with(".yaml")) continue;
    struct stat st;
    if (::fstatat(::dirfd(d), e->d_name, &st, 0) != 0 || !S_ISREG(st.st_mode)) continue;
    SourceFile f{prefix + e->d_name, "", static_cast<int64_t>(st.st_size),
                 static_cast<int64_t>(st.st_mtim.tv_sec) * 1000000000LL + st.st_mtim.tv_nsec};
    out->push_back(std::move(f));
  }
  ::closedir(d);
  std::sort(out->begin(), out->end(), [](const SourceFile& a, const SourceFile& b) { return a.path < b.path; });
  return true;
}

}  // namespace

std::string PointsPer::str() const {
  char amount_text[32];
  std::snprintf(amount_text, sizeof amount_text, "%g", amount);
  if (amount == 1) return "per " + unit;
  std::string plural = unit.ends_with("s") ? unit : unit + "s";
  return std::string("per ") + amount_text + " " + plural;
}

std::string ScoreRange::str() const {
  return std::to_string(min) + (max ? " to " + std::to_string(*max) : " upwards");
}

std::string Horizon::str() const { return in_hospital ? "in-hospital" : format_duration(duration); }

std::string Publication::citation() const {
  std::string out = authors + (!authors.empty() && authors.back() == '.' ? " " : ". ") + title;
  if (!out.empty() && out.back() != '.' && out.back() != '?') out += '.';
  out += " " + journal + " " + std::to_string(year) + ".";
  if (!doi.empty()) out += " doi:" + doi;
  return out;
}

std::string Entry::reference() const {
  if (publication) return publication->citation();
  return "in-house model (" + owner + "; " + status + " since " + go_live + ")";
}

const Entry* Catalog::find(const std::string& id) const {
  auto it = std::lower_bound(entries.begin(), entries.end(), id, [](const Entry& e, const std::string& x) { return e.id < x; });
  return it != entries.end() && it->id == id ? &*it : nullptr;
}


bool read_texts(RegistryFiles* files, Diagnostics* diags) {
  size_t before = diags->size();
  auto read_one = [&](SourceFile& f) {
    if (!f.text.empty() || f.size == 0) return;
    if (!read_whole_file(f.path, &f.text)) diags->error(f.path, {}, "cannot read the file");
  };
  for (SourceFile& f : files->vocabulary) read_one(f);
  for (RegistryFiles::EntryFile& e : files->entries) read_one(e.file);
  return diags->size() == before;
}

std::string stat_signature(const RegistryFiles& files) {
  RegistryFiles key;
  key.registries = files.registries;
  auto add = [&key](const SourceFile& f) {
    key.vocabulary.push_back({f.path + "\n" + std::to_string(f.size) + "\n" + std::to_string(f.mtime_ns), ""});
  };
  for (const SourceFile& f : files.vocabulary) add(f);
  for (const RegistryFiles::EntryFile& e : files.entries) add(e.file);
  return content_hash(key);
}

bool read_registries(const std::vector<std::string>& registries, RegistryFiles* out, Diagnostics* diags,
                     bool read_text) {
  size_t before = diags->size();
  out->registries = registries;
  for (size_t layer = 0; layer < registries.size(); ++layer) {
    fs::path root(registries[layer]);
    std::error_code ec;
    if (!fs::is_directory(root, ec)) {
      diags->error(registries[layer], {}, "registry folder not found");
      continue;
    }
    // The error_code overloads: an unreadable folder is "not there" here and
    // an error when it is listed, never an exception.
    bool structured = fs::is_directory(root / "vocabulary", ec) || fs::is_directory(root / "scores", ec) ||
                      fs::is_directory(root / "local", ec);
    std::vector<std::pair<std::string, fs::path>> folders;  // folder name, path
    if (structured) {
      for (const char* sub : {"vocabulary", "scores", "local"}) {
        if (fs::is_directory(root / sub, ec)) folders.emplace_back(sub, root / sub);
      }
    } else {
      folders.emplace_back("", root);
    }
    for (const auto& [name, dir] : folders) {
      std::vector<SourceFile> listed;
      if (!list_yaml(dir, &listed, &ec)) {
        diags->error(dir.string(), {}, "cannot list the folder: " + ec.message());
        continue;
      }
      for (SourceFile& f : listed) {
        if (read_text && !read_whole_file(f.path, &f.text)) {
          diags->error(f.path, {}, "cannot read the file");
          continue;
        }
        if (name == "vocabulary") {
          out->vocabulary.push_back(std::move(f));
        } else {
          out->entries.push_back({std::move(f), static_cast<int>(layer), name});
        }
      }
    }
  }
  return diags->size() == before;
}

std::string content_hash(const RegistryFiles& files) {
  // 64-bit multiply-xorshift over 8-byte words: not cryptographic, only a
  // change detector (any edit, rename, addition or removal changes it).
  uint64_t h = 0x9e3779b97f4a7c15ULL;
  auto mix = [&h](uint64_t word) {
    h ^= word;
    h *= 0xff51afd7ed558ccdULL;
    h ^= h >> 32;
  };
  auto feed = [&mix](const std::string& s) {
    size_t i = 0;
    for (; i + 8 <= s.size(); i += 8) {
      uint64_t w;
      std::memcpy(&w, s.data() + i, 8);
      mix(w);
    }
    uint64_t tail = 0;
    std::memcpy(&tail, s.data() + i, s.size() - i);
    mix(tail ^ (static_cast<uint64_t>(s.size()) << 56));
  };
  for (const std::string& r : files.registries) feed(r);
  for (const SourceFile& f : files.vocabulary) {
    feed(f.path);
    feed(f.text);
  }
  for (const auto& e : files.entries) {
    feed(e.file.path);
    feed(e.file.text);
  }
  char hex[17];
  std::snprintf(hex, sizeof hex, "%016llx", static_cast<unsigned long long>(h));
  return hex;
}

Entry parse_entry(const SourceFile& file, const std::string& folder, Diagnostics* diags) {
  diags->add_source(file.path, file.text);
  EntryParser parser(file, folder, diags);
  return parser.parse();
}

bool load_catalog(const RegistryFiles& files, Catalog* out, Diagnostics* diags) {
  size_t before = diags->size();
  load_vocabulary(files.vocabulary, &out->vocabulary, diags);
  std::map<std::string, const RegistryFiles::EntryFile*> defined;  // id -> first file in its layer
  std::map<std::string, Entry> by_id;
  for (const auto& ef : files.entries) {
    diags->add_source(ef.file.path, ef.file.text);
    EntryParser parser(ef.file, ef.folder, diags);
    Entry entry = parser.parse();
    entry.layer = ef.layer;
    check_references(parser.references(), ef.file.path, out->vocabulary, diags);
    if (entry.id.empty()) continue;
    auto [it, inserted] = defined.emplace(entry.id, &ef);
    if (!inserted && it->second->layer == ef.layer) {
      diags->error(ef.file.path, {1, 1}, "duplicate entry id '" + entry.id + "' (also defined in " +
                                             it->second->file.path + ")");
      continue;
    }
    it->second = &ef;
    by_id[entry.id] = std::move(entry);
  }
  for (auto& [id, entry] : by_id) out->entries.push_back(std::move(entry));
  return diags->size() == before;
}

}  // namespace readyby
