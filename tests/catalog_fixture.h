#pragma once
// The shipped catalogue, loaded once for the catalogue tests, and the same
// catalogue with the fictional demo hospital's registry layered over it.

#include <string>

#include "catalog/catalog.h"

namespace readyby::testing {

inline std::string shipped_registry_dir() { return std::string(READYBY_SOURCE_DIR) + "/registries"; }
/// The fictional Larkspur Valley Medical Centre's own registry (in-house models).
inline std::string demo_registry_dir() { return std::string(READYBY_SOURCE_DIR) + "/pipelines/registry"; }

/// A set of registries' files and catalogue; `errors` holds the rendered
/// diagnostics (empty when everything validates).
struct Shipped {
  RegistryFiles files;
  Catalog catalog;
  std::string errors;
};

inline Shipped load_registries(const std::vector<std::string>& folders) {
  Shipped s;
  Diagnostics diags;
  read_registries(folders, &s.files, &diags);
  load_catalog(s.files, &s.catalog, &diags);
  s.errors = diags.render();
  return s;
}

/// The shipped catalogue alone: published scores only.
inline const Shipped& shipped() {
  static const Shipped kShipped = load_registries({shipped_registry_dir()});
  return kShipped;
}

/// The shipped catalogue with the demo hospital's registry layered over it.
inline const Shipped& with_demo_registry() {
  static const Shipped kDemo = load_registries({shipped_registry_dir(), demo_registry_dir()});
  return kDemo;
}

}  // namespace readyby::testing
