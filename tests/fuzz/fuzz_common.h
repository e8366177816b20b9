#pragma once
// Shared helpers of the libFuzzer targets (tests/fuzz/*_fuzz.cpp, built with
// -DREADYBY_FUZZ=ON; scripts/fuzz.sh runs them).
//
// A target feeds one input to one loader and checks what the loader promises
// beyond "no crash": a failed load carries at least one error, a successful
// one none. A broken promise aborts, so libFuzzer keeps the input.

#include <cstdio>
#include <cstdlib>
#include <string>

#include "util/diagnostics.h"

namespace readyby::fuzz {

/// Aborts (a finding for libFuzzer) with `what` on stderr when `ok` is false.
inline void expect(bool ok, const char* what) {
  if (ok) return;
  std::fprintf(stderr, "fuzz invariant broken: %s\n", what);
  std::abort();
}

/// Every diagnostic has a path and a message, and rendering does not fail.
inline void check_diagnostics(const Diagnostics& diags) {
  for (const Diagnostic& d : diags.list()) {
    expect(!d.path.empty(), "a diagnostic without a path");
    expect(!d.message.empty(), "a diagnostic without a message");
    expect(d.pos.line >= 0 && d.pos.column >= 0, "a diagnostic with a negative position");
  }
  std::string rendered = diags.render();
  expect(diags.empty() == rendered.empty(), "rendered diagnostics disagree with the list");
}

/// The source folder (for the shipped vocabulary and the demo plan).
inline std::string source_dir() { return READYBY_SOURCE_DIR; }

}  // namespace readyby::fuzz
