#include <catch2/catch.hpp>

#include <unistd.h>

#include <filesystem>

#include "catalog/index.h"
#include "catalog/retrieval.h"
#include "catalog/reuse.h"
#include "catalog_fixture.h"

using namespace readyby;
namespace fs = std::filesystem;

// Candidate retrieval from the index (catalog/retrieval.h) and the ranking
// it feeds, on the shipped catalogue.

namespace {

struct IndexedCatalogue {
  fs::path dir = fs::temp_directory_path() / ("readyby-retrieval-test-" + std::to_string(::getpid()));
  std::unique_ptr<CatalogIndex> index;
  Vocabulary vocabulary;
  IndexedCatalogue() {
    fs::remove_all(dir);
    fs::create_directories(dir);
    Diagnostics diags;
    IndexOpen opened = CatalogIndex::open(testing::shipped().files, dir.string(), &diags);
    INFO(diags.render() << opened.error);
    REQUIRE(opened.index);
    index = std::move(opened.index);
    std::string error;
    REQUIRE(index->vocabulary(&vocabulary, &error));
  }
  ~IndexedCatalogue() {
    index.reset();
    std::error_code ec;
    fs::remove_all(dir, ec);
  }
};

const IndexedCatalogue& catalogue() {
  static const IndexedCatalogue kCatalogue;
  return kCatalogue;
}

struct Screened {
  Retrieved retrieved;
  ReuseReport report;
};

// Retrieves and matches as `reuse` does. The report points into `out->retrieved`.
void screen(const std::string& text, Screened* out) {
  const IndexedCatalogue& c = catalogue();
  Diagnostics diags;
  std::optional<Proposal> p = load_proposal_text(text, "p.yaml", c.vocabulary, &diags);
  INFO(diags.render());
  REQUIRE(p);
  OutcomeResolver resolver(c.vocabulary);
  std::string error;
  out->retrieved = retrieve_candidates(*c.index, *p, resolver, c.vocabulary, &error);
  REQUIRE(error.empty());
  out->report = match_proposal(*p, resolver, c.vocabulary, out->retrieved.entries, out->retrieved.signals, c.index->size());
}

std::vector<std::string> top(const ReuseReport& r, size_t n) {
  std::vector<std::string> out;
  for (size_t i = 0; i < r.candidates.size() && i < n; ++i) out.push_back(r.candidates[i].entry->id);
  return out;
}

bool has(const std::vector<std::string>& ids, const std::string& id) {
  return std::find(ids.begin(), ids.end(), id) != ids.end();
}

}  // namespace

TEST_CASE("one-year stroke risk in clinic patients with atrial fibrillation lists CHA2DS2-VASc in the top 3") {
  // A regression: thromboembolism was not linked to stroke, and the condition played no part.
  Screened s;
  screen(R"(proposal: af-stroke
title: One-year stroke risk in atrial fibrillation (fictional example)
outcome: stroke within one year
horizon: P365D
settings: [specialty-clinic]
population: {age_min: 18, condition: atrial fibrillation}
time_point: outpatient-visit
)", &s);
  std::vector<std::string> best = top(s.report, 3);
  INFO(best.size());
  CHECK(has(best, "cha2ds2-vasc"));
  CHECK(has(best, "chads2"));
  CHECK(s.retrieved.signals.condition_hits.count("cha2ds2-vasc") == 1);
}

TEST_CASE("retrieval: outcome concepts, the condition and full text, each entry once") {
  Screened s;
  screen("proposal: s\noutcome: sepsis\nsettings: [emergency-department]\npopulation: {condition: suspected infection}\n", &s);
  const Retrieved& r = s.retrieved;
  for (size_t i = 1; i < r.entries.size(); ++i) CHECK(r.entries[i - 1].id < r.entries[i].id);
  auto retrieved = [&](const std::string& id) {
    return std::any_of(r.entries.begin(), r.entries.end(), [&](const Entry& e) { return e.id == id; });
  };
  CHECK(retrieved("sirs-criteria"));                       // outcome: sepsis
  CHECK(retrieved("qsofa"));                               // condition and text
  CHECK(r.signals.condition_hits.count("qsofa") == 1);     // "adults with suspected infection"
  CHECK(r.signals.text.count("qsofa") == 1);
  CHECK(r.entries.size() < testing::shipped().catalog.entries.size());
  // qSOFA is a candidate (it only relates: it predicts death, not sepsis).
  bool qsofa = std::any_of(s.report.candidates.begin(), s.report.candidates.end(),
                           [](const Candidate& c) { return c.entry->id == "qsofa"; });
  CHECK(qsofa);
}

TEST_CASE("retrieval by condition resolves it against the vocabulary") {
  // "AF" is a synonym of atrial fibrillation; entries say "non-valvular atrial fibrillation".
  Screened s;
  screen("proposal: b\noutcome: major bleeding\npopulation: {condition: AF on anticoagulation}\n", &s);
  for (const char* id : {"has-bled", "cha2ds2-vasc"}) {
    INFO(id);
    CHECK(s.retrieved.signals.condition_hits.count(id) == 1);
  }
  CHECK(has(top(s.report, 5), "has-bled"));
}
