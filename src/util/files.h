#pragma once
// Reading the project's input files, and the identifier rule every file kind
// shares.

#include <cstdint>
#include <string>
#include <string_view>

namespace readyby {

/// One input file: its path (as shown in diagnostics) and its text.
struct SourceFile {
  std::string path;
  std::string text;
  int64_t size = -1;       // bytes, when listed with read_registries; -1 unknown
  int64_t mtime_ns = -1;   // last modification (ns since the epoch); -1 unknown
};

/// Reads a whole file; false when it cannot be read.
bool read_file(const std::string& path, std::string* out);

/// Whether `id` is a valid id of a plan, catalogue or proposal: [A-Za-z0-9_.-]+.
bool valid_id(std::string_view id);

}  // namespace readyby
