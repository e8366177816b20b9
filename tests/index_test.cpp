#include <catch2/catch.hpp>

#include <unistd.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <optional>

#include "catalog/index.h"
#include "catalog_fixture.h"
#include "history_helpers.h"

using namespace readyby;
namespace fs = std::filesystem;

namespace {

// A fresh cache folder under the system temp folder, removed afterwards.
struct TempCache {
  fs::path dir = fs::temp_directory_path() / ("readyby-index-test-" + std::to_string(::getpid()));
  TempCache() {
    fs::remove_all(dir);
    fs::create_directories(dir);
  }
  ~TempCache() { fs::remove_all(dir); }
  size_t files() const {
    return static_cast<size_t>(std::distance(fs::directory_iterator(dir), fs::directory_iterator()));
  }
};

SearchQuery query(const std::string& text, const std::string& setting, std::vector<std::string> outcomes, size_t limit) {
  SearchQuery q;
  q.text = text;
  q.setting = setting;
  q.outcomes = std::move(outcomes);
  q.limit = limit;
  return q;
}

std::vector<std::string> ids_of(const std::vector<SearchHit>& hits) {
  std::vector<std::string> out;
  for (const SearchHit& h : hits) out.push_back(h.id);
  return out;
}

}  // namespace

TEST_CASE("the index is built once, reused, and rebuilt when the YAML changes") {
  TempCache cache;
  const testing::Shipped& s = testing::shipped();
  Diagnostics diags;
  IndexOpen first = CatalogIndex::open(s.files, cache.dir.string(), &diags);
  INFO(diags.render() << first.error);
  REQUIRE(first.index);
  CHECK(first.index->rebuilt());
  CHECK(first.index->size() == s.catalog.entries.size());
  CHECK(cache.files() == 2);  // the index and its stat key beside it; no temporary file left behind

  IndexOpen second = CatalogIndex::open(s.files, cache.dir.string(), &diags);
  REQUIRE(second.index);
  CHECK_FALSE(second.index->rebuilt());
  CHECK(second.index->file() == first.index->file());

  // Touching a file without changing it: the stat key differs, the content
  // hash does not, so the index is reused (and the new stat key remembered).
  RegistryFiles touched = s.files;
  touched.entries[0].file.mtime_ns += 1000;
  IndexOpen touched_open = CatalogIndex::open(touched, cache.dir.string(), &diags);
  REQUIRE(touched_open.index);
  CHECK_FALSE(touched_open.index->rebuilt());
  CHECK(touched_open.index->hash() == first.index->hash());

  RegistryFiles changed = s.files;
  changed.entries[0].file.text += "# an edit\n";
  changed.entries[0].file.size += 10;  // an edit changes the file's size or time
  IndexOpen third = CatalogIndex::open(changed, cache.dir.string(), &diags);
  REQUIRE(third.index);
  CHECK(third.index->rebuilt());
  CHECK(third.index->hash() != first.index->hash());
  CHECK(cache.files() == 2);

  // A catalogue with errors builds nothing and leaves the old index alone.
  RegistryFiles broken = s.files;
  broken.entries[0].file.text = "id: [\n";
  broken.entries[0].file.mtime_ns += 2000;
  Diagnostics broken_diags;
  IndexOpen fourth = CatalogIndex::open(broken, cache.dir.string(), &broken_diags);
  CHECK_FALSE(fourth.index);
  CHECK_FALSE(broken_diags.empty());
  CHECK(cache.files() == 2);
}

TEST_CASE("entries round-trip through the index") {
  TempCache cache;
  const testing::Shipped& s = testing::shipped();
  Diagnostics diags;
  IndexOpen opened = CatalogIndex::open(s.files, cache.dir.string(), &diags);
  REQUIRE(opened.index);
  std::string error;
  std::vector<Entry> entries = opened.index->entries(&error);
  CHECK(error.empty());
  REQUIRE(entries.size() == s.catalog.entries.size());
  for (size_t i = 0; i < entries.size(); ++i) {
    const Entry& a = entries[i];
    const Entry& b = s.catalog.entries[i];
    INFO(b.id);
    CHECK(a.id == b.id);
    CHECK(a.outcome == b.outcome);
    CHECK(a.settings == b.settings);
    CHECK(a.age_min == b.age_min);
    CHECK(a.age_max == b.age_max);
    CHECK((a.horizon ? a.horizon->str() : "") == (b.horizon ? b.horizon->str() : ""));
    CHECK(a.inputs.size() == b.inputs.size());
    CHECK(a.performance.size() == b.performance.size());
    CHECK(a.score_range == b.score_range);
    CHECK(a.reference() == b.reference());
  }
  std::optional<Entry> curb = opened.index->entry("curb-65", &error);
  REQUIRE(curb);
  CHECK(curb->inputs.size() == 5);
  CHECK_FALSE(opened.index->entry("curb-66", &error));
}

TEST_CASE("search ranks by BM25 and filters by setting and outcome") {
  TempCache cache;
  Diagnostics diags;
  IndexOpen opened = CatalogIndex::open(testing::shipped().files, cache.dir.string(), &diags);
  REQUIRE(opened.index);
  const CatalogIndex& index = *opened.index;
  std::string error;

  // The catalogue holds several pneumonia severity scores; the classic three
  // must be among the first ten.
  std::vector<std::string> pneumonia = ids_of(index.search(query("pneumonia severity", "", {}, 10), &error));
  CHECK(error.empty());
  REQUIRE(pneumonia.size() == 10);
  for (const char* id : {"crb-65", "curb-65", "psi-port"}) {
    INFO(id);
    CHECK(std::find(pneumonia.begin(), pneumonia.end(), id) != pneumonia.end());
  }

  // Stemming: "readmissions" finds the readmission indices.
  std::vector<std::string> readmit = ids_of(index.search(query("readmissions", "", {"readmission-30d"}, 20), &error));
  CHECK(std::find(readmit.begin(), readmit.end(), "lace-index") != readmit.end());
  std::vector<SearchHit> by_outcome = index.search(query("readmissions", "", {"readmission-30d"}, 20), &error);
  REQUIRE_FALSE(by_outcome.empty());  // LACE at least (the shipped catalogue has no in-house models)
  for (const SearchHit& h : by_outcome) {
    INFO(h.id);
    CHECK(h.outcome == "readmission-30d");
  }
  std::vector<SearchHit> by_setting = index.search(query("mortality", "intensive-care", {}, 50), &error);
  REQUIRE(by_setting.size() >= 2);
  // The filter removes something: the same words without it find more.
  CHECK(index.search(query("mortality", "", {}, 50), &error).size() > by_setting.size());
  for (const SearchHit& h : by_setting) {
    INFO(h.id);
    CHECK(std::find(h.settings.begin(), h.settings.end(), "intensive-care") != h.settings.end());
  }
  CHECK(index.search(query("  ", "", {}, 5), &error).empty());
  CHECK(index.search(query("\"quoted\" AND (weird) NEAR", "", {}, 5), &error).size() <= 5);
  // FTS5 query syntax in the text is not interpreted: quotes, parentheses,
  // prefix stars, column filters and initial-token marks are word breaks.
  std::vector<std::string> with_syntax = ids_of(index.search(query("\"pneumonia\" (severity)* ^ -:", "", {}, 10), &error));
  CHECK(error.empty());
  CHECK(with_syntax == pneumonia);
  CHECK(error.empty());
}

TEST_CASE("the cache folder follows READYBY_CACHE_DIR") {
  TempCache cache;
  fs::path wanted = cache.dir / "nested" / "cache";
  const char* old = std::getenv("READYBY_CACHE_DIR");
  std::string saved = old ? old : "";
  setenv("READYBY_CACHE_DIR", wanted.c_str(), 1);
  CHECK(index_dir() == wanted.string());
  CHECK(fs::is_directory(wanted));
  if (old) setenv("READYBY_CACHE_DIR", saved.c_str(), 1);
  else unsetenv("READYBY_CACHE_DIR");
}

namespace {

// Runs `count` readyby processes at once with the same arguments and cache
// folder; returns their results.
std::vector<readyby_test::RunResult> run_at_once(const readyby_test::TempDir& dir, size_t count,
                                                 const std::vector<std::vector<std::string>>& commands,
                                                 const std::string& cache) {
  std::vector<pid_t> pids;
  std::vector<std::string> outs, errs;
  static int round = 0;
  ++round;
  for (size_t i = 0; i < count; ++i) {
    std::string tag = std::to_string(round) + "-" + std::to_string(i);
    outs.push_back(dir.file("out-" + tag));
    errs.push_back(dir.file("err-" + tag));
    pids.push_back(readyby_test::spawn_readyby(commands[i % commands.size()], outs.back(), errs.back(),
                                               {"READYBY_CACHE_DIR=" + cache}));
  }
  std::vector<readyby_test::RunResult> results;
  for (size_t i = 0; i < count; ++i) {
    readyby_test::RunResult r;
    r.status = readyby_test::wait_for(pids[i]);
    r.out = readyby_test::read_text(outs[i]);
    r.err = readyby_test::read_text(errs[i]);
    results.push_back(std::move(r));
  }
  return results;
}

}  // namespace

// Regression: concurrent readers and writers of one cache folder once crashed
// (a failed prepare followed by sqlite3_clear_bindings(NULL)) and printed
// empty answers (SQLITE_BUSY read as "no more rows"). Every process must now
// give exactly the answer a lone process gives, on a fresh cache, a stale one
// (files touched: the stat key changes) and a changed catalogue (rebuild).
TEST_CASE("concurrent catalogue readers and writers give the lone process's answer") {
  readyby_test::TempDir dir;
  const std::string source = READYBY_SOURCE_DIR;
  const std::string registry = dir.file("org-registry");
  const std::string model = registry + "/local/org-readmit.yaml";
  fs::create_directories(registry + "/local");
  readyby_test::write_text(model, R"YAML(id: org-readmit
name: "Organisation readmission model (fictional example)"
kind: local
summary: "Fictional in-house model for the concurrency test."
outcome: {concept: readmission-30d}
horizon: P30D
settings: [ward]
time_point: discharge
inputs:
  - element: util.admissions_12m
    label: "Admissions in the previous 12 months"
owner: "Fictional analytics team"
go_live: 2024-01-01
status: live
provenance: from-memory
)YAML");
  const std::vector<std::vector<std::string>> commands = {
      {"reuse", source + "/pipelines/readmit-30d.proposal.yaml", "--registry", registry, "--format", "json"},
      {"catalog", "search", "pneumonia severity", "--registry", registry, "--format", "json"},
  };
  // What a lone process answers, in a cache of its own.
  std::vector<std::string> expected;
  for (const auto& command : commands) {
    auto alone = run_at_once(dir, 1, {command}, dir.file("lone-cache"));
    REQUIRE(alone[0].status == 0);
    expected.push_back(alone[0].out);
  }
  REQUIRE(expected[0].find("\"lace-index\"") != std::string::npos);
  const std::string cache = dir.file("shared-cache");
  const char* stages[] = {"fresh cache", "stale stat key", "changed catalogue"};
  for (const char* stage : stages) {
    if (std::string(stage) == "stale stat key") {
      fs::last_write_time(model, fs::file_time_type::clock::now());
    } else if (std::string(stage) == "changed catalogue") {
      std::ofstream(model, std::ios::app) << "# a comment changes the content\n";
    }
    auto results = run_at_once(dir, 12, commands, cache);
    for (size_t i = 0; i < results.size(); ++i) {
      INFO(stage << ", process " << i << ": " << results[i].err);
      CHECK(results[i].status == 0);
      CHECK(results[i].out == expected[i % commands.size()]);
    }
  }
  // Nothing half-written is left in the cache folder.
  for (const auto& f : fs::directory_iterator(cache)) {
    INFO(f.path());
    CHECK(f.path().string().find(".tmp-") == std::string::npos);
  }
}

// Regression: a predictable folder in the shared temp folder planted by
// another account must never be used (it could hold a forged index).
TEST_CASE("the temp-folder fallback for the cache is private or refused") {
  readyby_test::TempDir dir;
  struct SavedEnv {
    std::vector<std::pair<std::string, std::optional<std::string>>> saved;
    void set(const char* name, const char* value) {
      const char* old = std::getenv(name);
      saved.emplace_back(name, old ? std::optional<std::string>(old) : std::nullopt);
      if (value) setenv(name, value, 1);
      else unsetenv(name);
    }
    ~SavedEnv() {
      for (auto it = saved.rbegin(); it != saved.rend(); ++it) {
        if (it->second) setenv(it->first.c_str(), it->second->c_str(), 1);
        else unsetenv(it->first.c_str());
      }
    }
  } env;
  env.set("READYBY_CACHE_DIR", nullptr);
  env.set("XDG_CACHE_HOME", nullptr);
  env.set("HOME", nullptr);
  env.set("TMPDIR", dir.path().c_str());
  const fs::path fallback = fs::path(dir.path()) / ("readyby-" + std::to_string(::geteuid()));

  // Created private when missing.
  CHECK(index_dir() == fallback.string());
  CHECK((fs::status(fallback).permissions() & fs::perms::all) == fs::perms::owner_all);

  // Refused when others may write into it.
  fs::permissions(fallback, fs::perms::all);
  std::string why;
  CHECK(index_dir(&why).empty());
  CHECK(why.find("writable by other users") != std::string::npos);

  // Refused when it belongs to someone else (only root can arrange that here).
  if (::geteuid() == 0) {
    fs::permissions(fallback, fs::perms::owner_all, fs::perm_options::replace);
    REQUIRE(::chown(fallback.c_str(), 65534, 65534) == 0);
    CHECK(index_dir(&why).empty());
    CHECK(why.find("belongs to another user") != std::string::npos);
  }

  // Refused when it is a symbolic link to somebody's folder.
  fs::remove(fallback);
  fs::create_directories(dir.file("planted"));
  fs::create_directory_symlink(dir.file("planted"), fallback);
  CHECK(index_dir(&why).empty());
  CHECK(why.find("symbolic link") != std::string::npos);

  // XDG_CACHE_HOME is preferred when set.
  env.set("XDG_CACHE_HOME", dir.file("xdg").c_str());
  CHECK(index_dir() == dir.file("xdg") + "/readyby");
}

TEST_CASE("search reads every text field and measures how much of the query an entry holds") {
  TempCache cache;
  Diagnostics diags;
  IndexOpen opened = CatalogIndex::open(testing::shipped().files, cache.dir.string(), &diags);
  REQUIRE(opened.index);
  const CatalogIndex& index = *opened.index;
  std::string error;
  // qSOFA's name and outcome do not say "sepsis"; its summary and publication title do.
  std::vector<SearchHit> sepsis = index.search(query("sepsis", "", {}, 20), &error);
  auto qsofa = std::find_if(sepsis.begin(), sepsis.end(), [](const SearchHit& h) { return h.id == "qsofa"; });
  REQUIRE(qsofa != sepsis.end());
  CHECK(qsofa->coverage == Approx(1.0));
  // An input label: GRACE scores Killip class.
  CHECK(ids_of(index.search(query("killip", "", {}, 20), &error)).size() >= 2);
  // Coverage orders first: entries holding both words before those holding one.
  std::vector<SearchHit> two = index.search(query("pneumonia mortality", "", {}, 20), &error);
  REQUIRE(two.size() >= 2);
  for (size_t i = 1; i < two.size(); ++i) CHECK(two[i - 1].coverage >= two[i].coverage);
  // A word no entry holds weighs the most: nothing is a close match.
  std::vector<SearchHit> none = index.search(query("tinnitus severity", "", {}, 20), &error);
  REQUIRE(!none.empty());
  CHECK(none.front().coverage < 0.5);
  // Restricted to one column, and phrases matched as a whole.
  SearchQuery q = query("", "", {}, 50);
  q.phrases = {"atrial fibrillation"};
  q.column = "population";
  std::vector<std::string> af = ids_of(index.search(q, &error));
  CHECK(std::find(af.begin(), af.end(), "cha2ds2-vasc") != af.end());
  CHECK(std::find(af.begin(), af.end(), "curb-65") == af.end());
  q.column = "nonsense";
  CHECK(index.search(q, &error).empty());
  CHECK(error == "no text column 'nonsense' in the catalogue index");
}
