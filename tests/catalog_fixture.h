#pragma once
// The shipped catalogue, loaded once for the catalogue tests.

#include <string>

#include "catalog/catalog.h"

namespace readyby::testing {

inline std::string shipped_registry_dir() { return std::string(READYBY_SOURCE_DIR) + "/registries"; }

/// The shipped registry's files and catalogue; `errors` holds the rendered
/// diagnostics (empty when everything validates).
struct Shipped {
  RegistryFiles files;
  Catalog catalog;
  std::string errors;
};

inline const Shipped& shipped() {
  static const Shipped kShipped = [] {
    Shipped s;
    Diagnostics diags;
    read_registries({shipped_registry_dir()}, &s.files, &diags);
    load_catalog(s.files, &s.catalog, &diags);
    s.errors = diags.render();
    return s;
  }();
  return kShipped;
}

}  // namespace readyby::testing
