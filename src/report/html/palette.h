#pragma once
// The report page's visual language: a small named palette (one value for a
// light page, one for a dark one) and the shapes that carry each status, so
// that no status is told by colour alone. docs/report.md shows them.
//
// Shapes (drawn by status_mark):
//   ok        a disc
//   degraded  a wedge (a triangle pointing up)
//   fail      a block (a square) with a bar across it
//   late / never, for a feature or a chain step: a block; never adds a
//   hollow ring around it
//
// Every pair of colours in text_pairs() is a text colour on a background the
// page puts it on; each must reach the WCAG 2.1 contrast ratio of 4.5:1
// (success criterion 1.4.3), in both the light and the dark palette. The
// page's CSS is generated from this table, so the test of the table is a
// test of the page.

#include <string>
#include <string_view>
#include <vector>

#include "engine/check.h"

namespace readyby::html {

struct Swatch {
  const char* name;   // CSS custom property name without the leading "--"
  const char* light;  // "#rrggbb"
  const char* dark;   // "#rrggbb"
  const char* role;   // what it is for, in words (docs/report.md)
};

/// Every colour of the page.
const std::vector<Swatch>& palette();

/// The swatch named `name` (which must exist).
const Swatch& swatch(std::string_view name);

struct TextPair {
  const char* text;        // swatch name of the text colour
  const char* background;  // swatch name of the background
};

/// Every text-on-background combination the page uses.
const std::vector<TextPair>& text_pairs();

/// WCAG 2.1 relative luminance of "#rrggbb" (sRGB, 0 black .. 1 white).
double relative_luminance(std::string_view hex);
/// WCAG 2.1 contrast ratio (L1 + 0.05) / (L2 + 0.05), L1 the lighter; 1 .. 21.
double contrast_ratio(std::string_view a, std::string_view b);

/// The CSS custom properties of the palette: a `:root` block with the light
/// values and a `prefers-color-scheme: dark` block with the dark ones.
std::string palette_css();

/// The swatch name of a run status: "ok", "degraded", "fail".
const char* status_swatch(RunStatus s);
/// The word written beside a status mark.
const char* status_word(RunStatus s);

/// An SVG mark of `status` centred at (cx, cy) with size `size` (its width),
/// using the CSS classes of the page (st-ok, st-degraded, st-fail).
std::string status_mark(RunStatus status, double cx, double cy, double size);

/// The three marks as SVG <symbol>s (ids rb-ok, rb-degraded, rb-fail), for
/// the page's shared definitions.
std::string status_symbols();
/// A <use> of the symbol of `status`, centred at (cx, cy), `size` wide: the
/// compact form of status_mark for pictures with many marks.
std::string status_use(RunStatus status, double cx, double cy, double size);

}  // namespace readyby::html
