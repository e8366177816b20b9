#include <catch2/catch.hpp>

#include <unistd.h>

#include <filesystem>
#include <fstream>
#include <string>

#include "cli/catalog_session.h"
#include "run_binary.h"

// Where the binary finds the shipped catalogue, and how an organisation's
// registries are layered over it (--registry, READYBY_REGISTRIES). Runs copies
// of the binary from temporary folders; writes nothing elsewhere.

namespace {

namespace fs = std::filesystem;
using readyby::testing::Outcome;

const std::string kSource = READYBY_SOURCE_DIR;

struct TempTree {
  fs::path root = fs::temp_directory_path() / ("readyby-session-test-" + std::to_string(::getpid()));
  TempTree() {
    fs::remove_all(root);
    fs::create_directories(root / "cache");
  }
  ~TempTree() {
    std::error_code ec;
    fs::remove_all(root, ec);
  }
};

// Runs `binary ARGS` with a clean catalogue environment plus `env`.
Outcome run_with(const std::string& binary, const std::string& env, const std::string& args, const TempTree& t) {
  return readyby::testing::run_shell("env -u READYBY_REGISTRY -u READYBY_REGISTRIES READYBY_CACHE_DIR='" +
                                     (t.root / "cache").string() + "' " + env + " " + binary + " " + args + " 2>&1");
}

}  // namespace

TEST_CASE("an installed binary finds the catalogue in PREFIX/share/readyby/registries") {
  TempTree t;
  fs::path prefix = t.root / "prefix";
  fs::create_directories(prefix / "bin");
  fs::create_directories(prefix / "share" / "readyby");
  fs::copy_file(READYBY_BINARY, prefix / "bin" / "readyby");
  fs::copy(kSource + "/registries", prefix / "share" / "readyby" / "registries", fs::copy_options::recursive);
  std::string binary = (prefix / "bin" / "readyby").string();

  Outcome found = run_with(binary, "", "catalog validate", t);
  INFO(found.out);
  CHECK(found.status == 0);
  CHECK(found.out.find("catalogue is valid") != std::string::npos);
  CHECK(found.out.find("0 local models) in 1 registry") != std::string::npos);

  // Moved away: the error names both ways to point readyby at the catalogue.
  fs::rename(prefix / "share" / "readyby" / "registries", t.root / "moved");
  std::vector<std::string> candidates = readyby::shipped_registry_candidates();
  REQUIRE(!candidates.empty());
  std::error_code ec;
  if (!fs::is_directory(fs::path(candidates.back()) / "vocabulary", ec)) {   // nothing installed at the compiled-in folder
    Outcome missing = run_with(binary, "", "catalog search sepsis", t);
    CHECK(missing.status == 2);
    CHECK(missing.out.find("cannot find the shipped catalogue (looked in: " + (prefix / "share/readyby/registries").string()) !=
          std::string::npos);
    CHECK(missing.out.find("Set READYBY_REGISTRY to the catalogue folder") != std::string::npos);
    CHECK(missing.out.find("'cmake --install'") != std::string::npos);
  }
  // READYBY_REGISTRY names it wherever it is.
  Outcome by_env = run_with(binary, "READYBY_REGISTRY='" + (t.root / "moved").string() + "'", "catalog validate", t);
  CHECK(by_env.status == 0);
  Outcome wrong_env = run_with(binary, "READYBY_REGISTRY='" + t.root.string() + "'", "catalog validate", t);
  CHECK(wrong_env.status == 2);
  CHECK(wrong_env.out.find("READYBY_REGISTRY names '" + t.root.string() + "', which has no vocabulary/ folder") !=
        std::string::npos);
}

TEST_CASE("registries layer: the shipped catalogue, READYBY_REGISTRIES, then --registry in order") {
  TempTree t;
  const std::string demo = kSource + "/pipelines/registry";
  fs::create_directories(t.root / "empty");
  const std::string shipped = "READYBY_REGISTRY='" + kSource + "/registries'";

  Outcome alone = run_with(READYBY_BINARY, shipped, "catalog validate", t);
  CHECK(alone.out.find("0 local models) in 1 registry") != std::string::npos);
  Outcome by_option = run_with(READYBY_BINARY, shipped, "catalog validate --registry " + demo, t);
  CHECK(by_option.out.find("3 local models) in 2 registries") != std::string::npos);
  Outcome by_env = run_with(READYBY_BINARY, shipped + " READYBY_REGISTRIES='" + demo + "::'", "catalog validate", t);
  CHECK(by_env.out.find("3 local models) in 2 registries") != std::string::npos);
  Outcome both = run_with(READYBY_BINARY, shipped + " READYBY_REGISTRIES='" + demo + "'",
                          "catalog validate --registry " + (t.root / "empty").string(), t);
  CHECK(both.out.find("3 local models) in 3 registries") != std::string::npos);
  Outcome missing = run_with(READYBY_BINARY, shipped + " READYBY_REGISTRIES='" + (t.root / "nope").string() + "'",
                             "catalog validate", t);
  CHECK(missing.status == 2);
  CHECK(missing.out.find((t.root / "nope").string() + ": error: registry folder not found") != std::string::npos);

  setenv("READYBY_REGISTRY", (kSource + "/registries").c_str(), 1);
  setenv("READYBY_REGISTRIES", ("a::" + demo + ":").c_str(), 1);
  std::string problem;
  CHECK(readyby::registry_layers({"b"}, &problem) ==
        std::vector<std::string>{kSource + "/registries", "a", demo, "b"});
  CHECK(problem.empty());
  unsetenv("READYBY_REGISTRIES");
  unsetenv("READYBY_REGISTRY");
}

TEST_CASE("catalog search says when no entry is a close match") {
  TempTree t;
  const std::string shipped = "READYBY_REGISTRY='" + kSource + "/registries'";
  Outcome far = run_with(READYBY_BINARY, shipped, "catalog search tinnitus severity", t);
  CHECK(far.status == 0);
  CHECK(far.out.find("no entry is a close match: the best holds ") != std::string::npos);
  Outcome nothing = run_with(READYBY_BINARY, shipped, "catalog search tinnitus", t);
  CHECK(nothing.out.find("no entry is a close match: no entry contains these words") != std::string::npos);
  Outcome near = run_with(READYBY_BINARY, shipped, "catalog search sepsis", t);
  CHECK(near.out.find("close match") == std::string::npos);
  CHECK(near.out.find("qsofa") != std::string::npos);
  Outcome json = run_with(READYBY_BINARY, shipped, "catalog search tinnitus severity --format json", t);
  CHECK(json.out.find("\"close_match\": false") != std::string::npos);
  CHECK(json.out.find("\"relevance\": 0.") != std::string::npos);
}
