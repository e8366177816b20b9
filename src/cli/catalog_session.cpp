#include "cli/catalog_session.h"
#include "cli/options.h"

#include <unistd.h>

#include <cstdlib>
#include <filesystem>
#include <iostream>

#include "cli/commands.h"

namespace readyby {

namespace fs = std::filesystem;

std::string shipped_registry() {
  if (const char* env = std::getenv("READYBY_REGISTRY"); env && *env) return env;
  std::error_code ec;
  if (fs::is_directory("registries", ec)) return "registries";
  fs::path exe = fs::read_symlink("/proc/self/exe", ec);
  if (!ec) {
    fs::path beside = exe.parent_path().parent_path() / "registries";
    if (fs::is_directory(beside, ec)) return beside.string();
  }
  return "";
}

std::string take_registries(std::vector<std::string>* args, std::vector<std::string>* registries) {
  std::vector<std::string> rest;
  for (size_t i = 0; i < args->size(); ++i) {
    const std::string& a = (*args)[i];
    if (is_option(a, "--registry")) {
      std::optional<std::string> folder = option_value(*args, &i, "--registry");
      if (!folder || folder->empty()) return "--registry needs a folder";
      registries->push_back(*folder);
    } else {
      rest.push_back(a);
    }
  }
  *args = std::move(rest);
  return "";
}

int open_catalog(const std::vector<std::string>& extra, bool with_index, CatalogSession* session) {
  std::string shipped = shipped_registry();
  if (shipped.empty()) {
    std::cerr << "readyby: cannot find the catalogue: set READYBY_REGISTRY to the registries/ folder\n";
    return kExitBadInput;
  }
  std::vector<std::string> registries = {shipped};
  registries.insert(registries.end(), extra.begin(), extra.end());
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
