#include <catch2/catch.hpp>

#include <unistd.h>

#include <cstdlib>
#include <filesystem>

#include "catalog/index.h"
#include "catalog_fixture.h"

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
  CHECK(cache.files() == 1);  // no temporary file left behind

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
  CHECK(cache.files() == 1);

  // A catalogue with errors builds nothing and leaves the old index alone.
  RegistryFiles broken = s.files;
  broken.entries[0].file.text = "id: [\n";
  broken.entries[0].file.mtime_ns += 2000;
  Diagnostics broken_diags;
  IndexOpen fourth = CatalogIndex::open(broken, cache.dir.string(), &broken_diags);
  CHECK_FALSE(fourth.index);
  CHECK_FALSE(broken_diags.empty());
  CHECK(cache.files() == 1);
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

  std::vector<std::string> pneumonia = ids_of(index.search(query("pneumonia severity", "", {}, 5), &error));
  CHECK(error.empty());
  REQUIRE(pneumonia.size() == 5);
  std::vector<std::string> top3(pneumonia.begin(), pneumonia.begin() + 3);
  std::sort(top3.begin(), top3.end());
  CHECK(top3 == std::vector<std::string>{"crb-65", "curb-65", "psi-port"});

  // Stemming: "readmissions" finds the readmission indices.
  std::vector<std::string> readmit = ids_of(index.search(query("readmissions", "", {"readmission-30d"}, 20), &error));
  CHECK(std::find(readmit.begin(), readmit.end(), "lace-index") != readmit.end());
  for (const SearchHit& h : index.search(query("readmissions", "", {"readmission-30d"}, 20), &error)) {
    CHECK(h.outcome == "readmission-30d");
  }
  for (const SearchHit& h : index.search(query("mortality", "intensive-care", {}, 50), &error)) {
    INFO(h.id);
    CHECK(std::find(h.settings.begin(), h.settings.end(), "intensive-care") != h.settings.end());
  }
  CHECK(index.search(query("  ", "", {}, 5), &error).empty());
  CHECK(index.search(query("\"quoted\" AND (weird) NEAR", "", {}, 5), &error).size() <= 5);
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
