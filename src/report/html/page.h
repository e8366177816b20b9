#pragma once
// The report page: one self-contained HTML document (inline CSS and SVG; no
// script, font, image or style sheet from anywhere else) built from
// PageFacts. Sections, in order: the header with a summary table of the
// models and the legend of marks; per model (each starting a printed page)
// its calendar with the patterns beside it, a timeline per pattern (or of its
// tightest run when nothing fails), and its lineage; the plan's findings; the
// landing history (when given); the intake screening (when given); the
// cautions. docs/report.md describes the page for its readers.

#include <string>

#include "report/html/page_facts.h"

namespace readyby::html {

/// The whole document.
std::string render_page(const PageFacts& facts);

/// The page's style sheet (palette, marks, layout, print and dark-mode rules).
std::string page_css();

}  // namespace readyby::html
