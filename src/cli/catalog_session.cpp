#include "cli/catalog_session.h"
#include "cli/options.h"

#include <unistd.h>

#include <cstdlib>
#include <filesystem>
#include <iostream>

#include "cli/commands.h"

namespace readyby {

namespace fs = std::filesystem;

std::vector<std::string> shipped_registry_candidates() {
  if (const char* env = std::getenv("READYBY_REGISTRY"); env && *env) return {env};
  std::vector<std::string> out;
  std::error_code ec;
  fs::path exe = fs::read_symlink("/proc/self/exe", ec);
  if (!ec) {
    fs::path prefix = exe.parent_path().parent_path();
    out.push_back((prefix / "share" / "readyby" / "registries").string());
    out.push_back((prefix / "registries").string());
  }
#ifdef READYBY_INSTALLED_REGISTRY
  out.push_back(READYBY_INSTALLED_REGISTRY);
#endif
  return out;
}

std::string shipped_registry(std::string* problem) {
  std::vector<std::string> candidates = shipped_registry_candidates();
  std::error_code ec;
  for (const std::string& dir : candidates) {
    if (fs::is_directory(fs::path(dir) / "vocabulary", ec)) return dir;
  }
  std::string looked;
  for (const std::string& dir : candidates) looked += (looked.empty() ? "" : ", ") + dir;
  bool from_env = std::getenv("READYBY_REGISTRY") && *std::getenv("READYBY_REGISTRY");
  *problem = std::string("cannot find the shipped catalogue") +
             (from_env ? ": READYBY_REGISTRY names '" + looked + "', which has no vocabulary/ folder"
                       : " (looked in: " + looked + ")") +
             ". Set READYBY_REGISTRY to the catalogue folder (the one holding vocabulary/ and scores/), or install "
             "readyby with 'cmake --install' so that the catalogue lies in PREFIX/share/readyby/registries";
  return "";
}

std::vector<std::string> registry_layers(const std::vector<std::string>& extra, std::string* problem) {
  std::string shipped = shipped_registry(problem);
  if (shipped.empty()) return {};
  std::vector<std::string> layers = {shipped};
  if (const char* env = std::getenv("READYBY_REGISTRIES"); env && *env) {
    std::string list = env;
    size_t start = 0;
    while (start <= list.size()) {
      size_t colon = list.find(':', start);
      if (colon == std::string::npos) colon = list.size();
      if (colon > start) layers.push_back(list.substr(start, colon - start));
      start = colon + 1;
    }
  }
  layers.insert(layers.end(), extra.begin(), extra.end());
  return layers;
}

int open_catalog(const std::vector<std::string>& extra, bool with_index, CatalogSession* session) {
  std::string problem;
  std::vector<std::string> registries = registry_layers(extra, &problem);
  if (registries.empty()) {
    std::cerr << "readyby: " << problem << "\n";
    return kExitBadInput;
  }
  Diagnostics diags;
  // With an index, only list the files: the index reads them when they changed.
  if (!read_registries(registries, &session->files, &diags, !with_index)) {
    std::cerr << diags.render();
    return kExitBadInput;
  }
  if (!with_index) {
    if (load_vocabulary(session->files.vocabulary, &session->vocabulary, &diags)) return kExitOk;
    std::cerr << diags.render();
    return kExitBadInput;
  }
  std::string why;
  std::string dir = index_dir(&why);
  if (dir.empty()) {
    std::cerr << "readyby: no usable folder for the catalogue index: " << why << "\n";
    return kExitBadInput;
  }
  IndexOpen opened = CatalogIndex::open(session->files, dir, &diags);
  if (!opened.index) {
    std::cerr << diags.render();
    if (!opened.error.empty()) std::cerr << "readyby: " << opened.error << "\n";
    if (!diags.empty()) std::cerr << "the catalogue has errors; run 'readyby catalog validate' after fixing them\n";
    return kExitBadInput;
  }
  session->index = std::move(opened.index);
  std::string error;
  if (!session->index->vocabulary(&session->vocabulary, &error)) {
    std::cerr << "readyby: cannot read the catalogue index: " << error << "\n";
    return kExitBadInput;
  }
  return kExitOk;
}

}  // namespace readyby
