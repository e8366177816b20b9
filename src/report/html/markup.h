#pragma once
// Small helpers for writing HTML and inline SVG by hand: escaping and compact
// numbers. Everything the page writes goes through esc(), so any id or text
// from a plan or catalogue file is safe inside elements and attributes, and
// every SVG stays well-formed XML.

#include <string>
#include <string_view>

namespace readyby::html {

/// `text` with & < > " ' replaced by character references; usable in element
/// content and in double- or single-quoted attribute values.
std::string esc(std::string_view text);

/// A coordinate or length with at most one decimal ("12", "12.5", "-3").
std::string num(double value);

/// A fragment identifier made from `text`: letters, digits, '-' and '_' kept,
/// everything else turned into '-' (ids of plans are [A-Za-z0-9_.-]+ already).
std::string anchor(std::string_view prefix, std::string_view text);

}  // namespace readyby::html
