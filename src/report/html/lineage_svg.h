#pragma once
// The lineage of a model's upstream cone, laid out by Graphviz's `dot`
// (cgraph + gvc used as a library: no program is run) from left to right,
// sources first, and drawn as our own SVG: a source is a capsule, a job a
// box, a feature a box with a cut corner, the model a double box. Each node
// carries the mark and frame colour of its status (page_facts.h) and its
// margin. A cone with more than kMaxDrawnCone nodes is summarised instead:
// a strip of its nodes by status and a table of the kSummaryRows nodes most
// at risk (failing, then degraded, then on the most late runs' chains).
//
// Node groups are `g.lnode` with `data-node` and `data-status`.

#include <memory>
#include <string>
#include <vector>

#include "report/html/page_facts.h"

namespace readyby::html {

/// Positions from Graphviz, in SVG units (y down, origin top left).
struct ConeLayout {
  struct Box {
    double x = 0, y = 0, w = 0, h = 0;  // centre and size
  };
  double width = 0, height = 0;
  std::vector<Box> boxes;          // one per cone node, then the model's box last
  std::vector<std::string> edges;  // SVG path data, one per cone edge, then feature -> model edges
  std::string error;               // non-empty when Graphviz failed (the cone is then tabled only)
};

/// Holds one Graphviz context for every cone of a page.
class LineageDrawer {
 public:
  LineageDrawer();
  ~LineageDrawer();
  LineageDrawer(const LineageDrawer&) = delete;
  LineageDrawer& operator=(const LineageDrawer&) = delete;

  /// Lays out the cone of `model` (not summarised) with `dot`.
  ConeLayout layout(const Plan& plan, const ModelFacts& model) const;

  /// Appends the lineage figure of `model` (drawn or summarised) and its table.
  void write(std::string& out, const PageFacts& page, const ModelFacts& model) const;

 private:
  struct Context;
  std::unique_ptr<Context> context_;
};

}  // namespace readyby::html
