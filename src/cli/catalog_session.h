#pragma once
// What the catalogue commands share: finding the shipped registry, reading
// the registries, loading the vocabulary and opening the index.

#include <memory>
#include <string>
#include <vector>

#include "catalog/catalog.h"
#include "catalog/index.h"
#include "catalog/vocabulary.h"

namespace readyby {

/// The shipped registry: $READYBY_REGISTRY, else `registries/` in the current
/// folder, else `registries/` beside the executable's folder (`<exe dir>/../registries`).
/// Empty when none exists.
std::string shipped_registry();

struct CatalogSession {
  RegistryFiles files;
  Vocabulary vocabulary;
  std::unique_ptr<CatalogIndex> index;   // set when asked for
};

/// Reads the shipped registry layered with `extra` registries, loads the
/// vocabulary and, when `with_index`, opens (rebuilding if needed) the index.
/// On failure prints the errors to stderr and returns kExitBadInput; else kExitOk.
int open_catalog(const std::vector<std::string>& extra, bool with_index, CatalogSession* session);

/// Takes every `--registry DIR` / `--registry=DIR` out of `args`. Returns an
/// error message, or "".
std::string take_registries(std::vector<std::string>* args, std::vector<std::string>* registries);

}  // namespace readyby
