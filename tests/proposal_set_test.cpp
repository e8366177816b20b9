#include <catch2/catch.hpp>

#include <unistd.h>

#include <filesystem>
#include <fstream>
#include <sstream>

#include "catalog/index.h"
#include "catalog/proposal_set.h"
#include "catalog_fixture.h"

using namespace readyby;
namespace fs = std::filesystem;

// The labelled proposal set (pipelines/proposal-set/) screened against the
// shipped catalogue: the figures docs/reuse.md and the README report.

namespace {

const std::string kSet = std::string(READYBY_SOURCE_DIR) + "/pipelines/proposal-set";

struct Cache {
  fs::path dir = fs::temp_directory_path() / ("readyby-proposal-set-test-" + std::to_string(::getpid()));
  Cache() {
    fs::remove_all(dir);
    fs::create_directories(dir);
  }
  ~Cache() {
    std::error_code ec;
    fs::remove_all(dir, ec);
  }
};

std::string list(const std::vector<std::string>& ids) {
  std::string out;
  for (const std::string& id : ids) out += (out.empty() ? "" : ", ") + id;
  return out;
}

}  // namespace

TEST_CASE("the labelled proposal set loads: at least 40 proposals, each with its source") {
  std::vector<LabelledProposal> set;
  Diagnostics diags;
  INFO(diags.render());
  REQUIRE(load_proposal_set(kSet, &set, &diags));
  CHECK(set.size() >= 40);
  size_t files = 0;
  for (const auto& f : fs::directory_iterator(kSet)) files += f.path().string().ends_with(".proposal.yaml") ? 1 : 0;
  CHECK(files == set.size());
  for (const LabelledProposal& p : set) {
    INFO(p.id);
    CHECK(!p.source.empty());
    CHECK((p.recommendation == "build") == p.expected.empty());
  }
}

TEST_CASE("the labelled proposal set: top-3 recall >= 95%, recommendation as expected >= 90%") {
  std::vector<LabelledProposal> set;
  Diagnostics diags;
  REQUIRE(load_proposal_set(kSet, &set, &diags));
  Cache cache;
  IndexOpen opened = CatalogIndex::open(testing::shipped().files, cache.dir.string(), &diags);
  INFO(diags.render() << opened.error);
  REQUIRE(opened.index);
  Vocabulary vocabulary;
  std::string error;
  REQUIRE(opened.index->vocabulary(&vocabulary, &error));
  ProposalSetFigures figures;
  REQUIRE(evaluate_proposal_set(kSet, set, *opened.index, vocabulary, &figures, &diags, &error));
  std::ostringstream misses;
  for (const ProposalScore& p : figures.proposals) {
    if (p.found < p.wanted || (p.recommendation_scored && !p.recommendation_ok)) {
      misses << p.id << ": expected " << list(p.expected_held) << "; top 3 " << list(p.top3) << "; recommendation "
             << p.recommendation << " (expected " << p.expected_recommendation << ")\n";
    }
  }
  INFO("misses:\n" << misses.str());
  INFO("recall " << figures.found << "/" << figures.wanted << ", recommendation " << figures.recommendations_ok << "/"
                 << figures.recommendations_scored);
  CHECK(figures.proposals.size() == set.size());
  CHECK(figures.wanted >= 60);
  CHECK(figures.recall() >= 0.95);
  CHECK(figures.recommendation_accuracy() >= 0.90);
}

TEST_CASE("a bad proposal-set file gets positioned errors") {
  Cache cache;
  std::ofstream(cache.dir / "expected.yaml")
      << "proposals:\n  - proposal: missing\n    expect: []\n    recommendation: build\n    source: x\n"
         "  - proposal: also\n    expect: [a]\n    recommendation: resuse\n";
  std::ofstream(cache.dir / "also.proposal.yaml") << "proposal: also\noutcome: x\n";
  std::vector<LabelledProposal> set;
  Diagnostics diags;
  CHECK_FALSE(load_proposal_set(cache.dir.string(), &set, &diags));
  std::vector<std::string> got;
  for (const Diagnostic& d : diags.sorted()) got.push_back(d.str());
  std::string path = (cache.dir / "expected.yaml").string();
  CHECK(got == std::vector<std::string>{
                   path + ":2:15: error: no file missing.proposal.yaml in " + cache.dir.string(),
                   path + ":6:5: error: missing required key 'source' in a labelled proposal",
                   path + ":8:21: error: 'recommendation' of a labelled proposal must be one of reuse, adapt, build, "
                          "found 'resuse' (did you mean 'reuse'?)"});
}
