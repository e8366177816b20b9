#include "util/files.h"

#include <algorithm>
#include <filesystem>
#include <fstream>
#include <sstream>

namespace readyby {

bool read_file(const std::string& path, std::string* out) {
  // A folder opens as an ifstream on Linux and reads as empty: refuse it.
  std::error_code ec;
  if (std::filesystem::is_directory(path, ec)) return false;
  std::ifstream in(path, std::ios::binary);
  if (!in) return false;
  std::ostringstream ss;
  ss << in.rdbuf();
  if (in.bad()) return false;
  *out = ss.str();
  return true;
}

bool valid_id(std::string_view id) {
  if (id.empty()) return false;
  return std::all_of(id.begin(), id.end(), [](char c) {
    return (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || (c >= '0' && c <= '9') || c == '_' || c == '.' ||
           c == '-';
  });
}

}  // namespace readyby
