// The labelled proposal set as a benchmark: screens every proposal of
// pipelines/proposal-set/ against a catalogue exactly as `readyby reuse` does
// (retrieval from the index, then matching) and prints, per proposal, the
// expected scores the catalogue holds, the top three candidates and the
// recommendation, then the figures (src/catalog/proposal_set.h) and the time
// per proposal.
// Usage: proposal_set_bench REGISTRY SET_FOLDER [REGISTRY...]
//   e.g. build/proposal_set_bench registries pipelines/proposal-set
// The index is built in a temporary cache folder, removed afterwards.
#include <unistd.h>

#include <chrono>
#include <cstdio>
#include <filesystem>
#include <string>
#include <vector>

#include "catalog/index.h"
#include "catalog/proposal_set.h"

using namespace readyby;
namespace fs = std::filesystem;

namespace {

std::string join(const std::vector<std::string>& ids) {
  std::string out;
  for (const std::string& id : ids) out += (out.empty() ? "" : ", ") + id;
  return out.empty() ? "-" : out;
}

}  // namespace

int main(int argc, char** argv) {
  if (argc < 3) {
    std::fprintf(stderr, "usage: proposal_set_bench REGISTRY SET_FOLDER [REGISTRY...]\n");
    return 2;
  }
  std::vector<std::string> registries = {argv[1]};
  for (int i = 3; i < argc; ++i) registries.push_back(argv[i]);
  const std::string folder = argv[2];
  Diagnostics diags;
  RegistryFiles files;
  std::vector<LabelledProposal> set;
  if (!read_registries(registries, &files, &diags) || !load_proposal_set(folder, &set, &diags)) {
    std::fputs(diags.render().c_str(), stderr);
    return 2;
  }
  fs::path cache = fs::temp_directory_path() / ("readyby-proposal-set-bench-" + std::to_string(::getpid()));
  fs::create_directories(cache);
  IndexOpen opened = CatalogIndex::open(files, cache.string(), &diags);
  int status = 0;
  if (!opened.index) {
    std::fprintf(stderr, "%s%s\n", diags.render().c_str(), opened.error.c_str());
    status = 2;
  }
  Vocabulary vocabulary;
  std::string error;
  ProposalSetFigures figures;
  auto start = std::chrono::steady_clock::now();
  if (status == 0 && (!opened.index->vocabulary(&vocabulary, &error) ||
                      !evaluate_proposal_set(folder, set, *opened.index, vocabulary, &figures, &diags, &error))) {
    std::fprintf(stderr, "%s%s\n", diags.render().c_str(), error.c_str());
    status = 2;
  }
  double ms = std::chrono::duration<double, std::milli>(std::chrono::steady_clock::now() - start).count();
  if (status == 0) {
    std::printf("%-28s %-5s %-44s %-44s %s\n", "proposal", "top3", "expected (held by the catalogue)", "top three",
                "recommendation");
    for (const ProposalScore& p : figures.proposals) {
      std::string rec = p.recommendation + (p.recommendation_scored ? (p.recommendation_ok ? "" : " (expected " +
                                                                                                   p.expected_recommendation + ")")
                                                                    : " (not scored)");
      std::printf("%-28s %zu/%-3zu %-44s %-44s %s\n", p.id.c_str(), p.found, p.wanted, join(p.expected_held).c_str(),
                  join(p.top3).c_str(), rec.c_str());
    }
    std::printf("\n%zu proposals against %zu catalogue entries\n", figures.proposals.size(), opened.index->size());
    std::printf("top-3 recall of expected scores: %zu/%zu = %.1f%%\n", figures.found, figures.wanted,
                100 * figures.recall());
    std::printf("recommendation as expected: %zu/%zu = %.1f%%\n", figures.recommendations_ok,
                figures.recommendations_scored, 100 * figures.recommendation_accuracy());
    std::printf("screening time (retrieval + matching, index built): %.1f ms per proposal\n",
                ms / static_cast<double>(std::max<size_t>(1, figures.proposals.size())));
  }
  opened.index.reset();
  std::error_code ec;
  fs::remove_all(cache, ec);
  return status;
}
