#pragma once
// What the catalogue commands share: finding the shipped catalogue, layering
// an organisation's registries over it, reading them, loading the vocabulary
// and opening the index.

#include <memory>
#include <string>
#include <vector>

#include "catalog/catalog.h"
#include "catalog/index.h"
#include "catalog/vocabulary.h"

namespace readyby {

/// The folders where the shipped catalogue is looked for, in order:
///   1. $READYBY_REGISTRY (when set, the only place looked at);
///   2. `<exe dir>/../share/readyby/registries` (an installed tree, wherever it was moved);
///   3. `<exe dir>/../registries` (a build folder inside the source tree, e.g. build/readyby);
///   4. the install folder compiled in (CMAKE_INSTALL_FULL_DATADIR/readyby/registries).
/// `<exe dir>` is the folder of the running executable, symbolic links resolved.
std::vector<std::string> shipped_registry_candidates();

/// The first candidate that holds a `vocabulary/` folder; empty when none
/// does (`problem` then says where it looked and how to fix it).
std::string shipped_registry(std::string* problem);

/// The registry layers of a command: the shipped catalogue, then the folders
/// of $READYBY_REGISTRIES (separated by ':', empty parts ignored), then
/// `extra` (the --registry options, in order). Empty, with `problem` set,
/// when the shipped catalogue is not found.
std::vector<std::string> registry_layers(const std::vector<std::string>& extra, std::string* problem);

struct CatalogSession {
  RegistryFiles files;
  Vocabulary vocabulary;
  std::unique_ptr<CatalogIndex> index;   // set when asked for
};

/// Reads the registry layers (registry_layers), loads the vocabulary and,
/// when `with_index`, opens (rebuilding if needed) the index. On failure
/// prints the errors to stderr and returns kExitBadInput; else kExitOk.
int open_catalog(const std::vector<std::string>& extra, bool with_index, CatalogSession* session);


}  // namespace readyby
