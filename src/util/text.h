#pragma once
// Small text helpers shared by the loaders.

#include <string>
#include <string_view>
#include <vector>

namespace readyby {

/// Levenshtein distance between `a` and `b` (insert, delete, substitute = 1).
size_t edit_distance(std::string_view a, std::string_view b);

/// Words longer than this get no suggestion.
inline constexpr size_t kMaxSuggestedLength = 128;

/// The candidate nearest to `word`, when it is close enough to be a plausible
/// typo (distance <= max(2, |word|/3)); empty otherwise, and empty for words
/// longer than kMaxSuggestedLength. Ties go to the first candidate in order.
/// Cost: O(|candidates| * |word| * bound) at most (a banded distance with a
/// cut-off; candidates whose length differs by more than the bound are skipped).
std::string nearest(std::string_view word, const std::vector<std::string>& candidates);

/// " (did you mean 'X'?)" for the nearest candidate, or "" when none is close.
std::string did_you_mean(std::string_view word, const std::vector<std::string>& candidates);

/// Byte offset of the first byte that is not part of valid UTF-8, or npos when
/// the whole text is valid UTF-8 (RFC 3629: no overlongs, no surrogates, <= U+10FFFF).
size_t invalid_utf8_offset(std::string_view text);

/// `s` safe to print on a terminal: control characters (bytes below 0x20
/// other than tab, and 0x7F) are written as "\xNN", so text from a file or a
/// log can never move the cursor, ring a bell or change colours.
std::string printable(std::string_view s);

/// The pieces of `s` between `separator`s, empty pieces included ("a,,b"
/// gives three; "" gives one empty piece). Views into `s`.
std::vector<std::string_view> split(std::string_view s, char separator);

/// JSON string literal for `s` (RFC 8259 escaping), quotes included.
std::string json_quote(std::string_view s);

/// JSON array of string literals: ["a", "b"].
std::string json_list(const std::vector<std::string>& items);

}  // namespace readyby
