#pragma once
// The one result type of the project's text parsers (durations, cron
// expressions, edits): a value, or a sentence saying what is wrong and where.
// Loaders of whole files report through util/diagnostics.h instead, which
// turns such an offset into PATH:LINE:COLUMN with the source line and a caret.

#include <cstddef>
#include <optional>
#include <string>

namespace readyby {

template <typename T>
struct Parsed {
  std::optional<T> value;  // set iff the text was valid
  std::string error;       // set iff value is empty: a sentence without position
  size_t offset = 0;       // 0-based offset in the text of what is wrong (0 when not known)
};

}  // namespace readyby
