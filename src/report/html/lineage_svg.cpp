#include "report/html/lineage_svg.h"

#include <graphviz/cgraph.h>
#include <graphviz/gvc.h>

#include <algorithm>
#include <climits>

#include "report/html/markup.h"
#include "report/html/palette.h"

namespace readyby::html {

namespace {

constexpr double kNodeH = 36, kMargin = 8;

// Graphviz reports errors through a callback; they are collected here while a
// layout runs (Graphviz is not thread-safe, so neither is this).
std::string* g_graphviz_errors = nullptr;
int collect_error(char* message) {
  if (g_graphviz_errors && message) *g_graphviz_errors += message;
  return 0;
}

char* c(const char* s) { return const_cast<char*>(s); }

std::string margin_words(const NodeMargin& m) {
  if (!m.margin_seconds) return "margin unbounded";
  return *m.margin_seconds >= 0 ? "margin " + human_duration(*m.margin_seconds)
                                : "over by " + human_duration(-*m.margin_seconds);
}

std::string binding_words(const Plan& plan, const NodeMargin& m) {
  if (!m.binding_at || m.binding_model < 0) return "";
  const Model& model = plan.models[static_cast<size_t>(m.binding_model)];
  return model.id + " " + format_local(model.zone->to_local(*m.binding_at));
}

double text_width(const std::string& s, double per_char) {
  size_t chars = 0;
  for (unsigned char ch : s) chars += (ch & 0xC0) != 0x80;
  return static_cast<double>(chars) * per_char;
}

// The outline of a node by kind, centred at (x, y).
std::string outline(NodeKind kind, bool model, double x, double y, double w, double h) {
  double l = x - w / 2, t = y - h / 2;
  auto rect = [&](double rx, double inset) {
    return "<rect class=\"lbox\" x=\"" + num(l + inset) + "\" y=\"" + num(t + inset) + "\" width=\"" +
           num(w - 2 * inset) + "\" height=\"" + num(h - 2 * inset) + "\" rx=\"" + num(rx) + "\"/>";
  };
  if (model) return rect(3, 0) + "<rect class=\"lbox-inner\" x=\"" + num(l + 3) + "\" y=\"" + num(t + 3) +
                    "\" width=\"" + num(w - 6) + "\" height=\"" + num(h - 6) + "\" rx=\"2\"/>";
  switch (kind) {
    case NodeKind::source: return rect(h / 2, 0);
    case NodeKind::job: return rect(2, 0);
    case NodeKind::feature: {
      double cut = 9;
      return "<path class=\"lbox\" d=\"M" + num(l) + " " + num(t) + "H" + num(l + w - cut) + "L" + num(l + w) + " " +
             num(t + cut) + "V" + num(t + h) + "H" + num(l) + "Z\"/>";
    }
  }
  return rect(0, 0);
}

bool at_risk_before(const ConeNode& a, const ConeNode& b) {
  auto rank = [](RunStatus s) { return s == RunStatus::fail ? 0 : s == RunStatus::degraded ? 1 : 2; };
  if (rank(a.status) != rank(b.status)) return rank(a.status) < rank(b.status);
  if (a.late_chains != b.late_chains) return a.late_chains > b.late_chains;
  int64_t ma = a.margin.margin_seconds.value_or(INT64_MAX), mb = b.margin.margin_seconds.value_or(INT64_MAX);
  if (ma != mb) return ma < mb;
  return a.node < b.node;
}

void write_node_table(std::string& out, const Plan& plan, const std::vector<ConeNode>& nodes, const char* summary,
                      bool open) {
  out += std::string("<details class=\"numbers\"") + (open ? " open" : "") + "><summary>" + summary +
         "</summary><table class=\"grid\"><thead><tr><th scope=\"col\">node</th><th scope=\"col\">kind</th>"
         "<th scope=\"col\">status</th><th scope=\"col\">late chains through it</th><th scope=\"col\">margin</th>"
         "<th scope=\"col\">binding run</th></tr></thead><tbody>";
  for (const ConeNode& n : nodes) {
    const Node& node = plan.nodes[static_cast<size_t>(n.node)];
    out += "<tr><td>" + esc(node.id) + "</td><td>" + to_string(node.kind) + "</td><td class=\"c-" +
           status_swatch(n.status) + "\">" + status_word(n.status) + "</td><td class=\"n\">" +
           std::to_string(n.late_chains) + "</td><td>" +
           (n.margin.margin_seconds ? esc(margin_words(n.margin)) : "—") + "</td><td>" +
           esc(binding_words(plan, n.margin)) + "</td></tr>";
  }
  out += "</tbody></table></details>";
}

}  // namespace

struct LineageDrawer::Context {
  GVC_t* gvc = nullptr;
};

LineageDrawer::LineageDrawer() : context_(std::make_unique<Context>()) {
  agseterr(AGERR);  // warnings are not errors; errors go to collect_error
  agseterrf(collect_error);
  context_->gvc = gvContext();
}

LineageDrawer::~LineageDrawer() {
  if (context_->gvc) gvFreeContext(context_->gvc);
}

ConeLayout LineageDrawer::layout(const Plan& plan, const ModelFacts& facts) const {
  ConeLayout result;
  const Model& model = plan.models[static_cast<size_t>(facts.model)];
  if (!context_->gvc) {
    result.error = "Graphviz could not start";
    return result;
  }
  std::string errors;
  g_graphviz_errors = &errors;
  Agraph_t* g = agopen(c("cone"), Agdirected, nullptr);
  agattr(g, AGRAPH, c("rankdir"), c("LR"));
  agattr(g, AGRAPH, c("nodesep"), c("0.18"));
  agattr(g, AGRAPH, c("ranksep"), c("0.35"));
  agattr(g, AGNODE, c("shape"), c("box"));
  agattr(g, AGNODE, c("fixedsize"), c("true"));
  agattr(g, AGNODE, c("label"), c(""));
  agattr(g, AGNODE, c("width"), c("1"));
  agattr(g, AGNODE, c("height"), c("0.5"));
  std::vector<Agnode_t*> gnodes;
  auto add = [&](const std::string& name, const std::string& label, const std::string& second) {
    Agnode_t* n = agnode(g, c(name.c_str()), 1);
    double w = std::max({text_width(label, 6.8) + 30, text_width(second, 5.9) + 30, 70.0});
    agsafeset(n, c("width"), c(std::to_string(w / 72).c_str()), c("1"));
    agsafeset(n, c("height"), c(std::to_string(kNodeH / 72).c_str()), c("0.5"));
    gnodes.push_back(n);
  };
  for (const ConeNode& n : facts.cone.nodes) {
    add(plan.nodes[static_cast<size_t>(n.node)].id, plan.nodes[static_cast<size_t>(n.node)].id, margin_words(n.margin));
  }
  add("model:" + model.id, model.id, "model");
  std::vector<Agedge_t*> gedges;
  for (const auto& [from, to] : facts.cone.edges) {
    gedges.push_back(agedge(g, gnodes[static_cast<size_t>(from)], gnodes[static_cast<size_t>(to)], nullptr, 1));
  }
  for (size_t i = 0; i < facts.cone.nodes.size(); ++i) {
    int node = facts.cone.nodes[i].node;
    if (std::find(model.features.begin(), model.features.end(), node) != model.features.end()) {
      gedges.push_back(agedge(g, gnodes[i], gnodes.back(), nullptr, 1));
    }
  }
  if (gvLayout(context_->gvc, g, "dot") != 0) {
    result.error = errors.empty() ? "Graphviz could not lay out the cone" : errors;
  } else {
    boxf bb = GD_bb(g);
    result.width = bb.UR.x - bb.LL.x + 2 * kMargin;
    result.height = bb.UR.y - bb.LL.y + 2 * kMargin;
    auto X = [&](double x) { return x - bb.LL.x + kMargin; };
    auto Y = [&](double y) { return bb.UR.y - y + kMargin; };
    for (Agnode_t* n : gnodes) {
      result.boxes.push_back({X(ND_coord(n).x), Y(ND_coord(n).y), ND_width(n) * 72, ND_height(n) * 72});
    }
    for (Agedge_t* e : gedges) {
      std::string d;
      const splines* spl = ED_spl(e);
      if (spl && spl->size > 0) {
        const bezier& bz = spl->list[0];
        for (int i = 0; i < bz.size; ++i) {
          d += (i == 0 ? "M" : (i % 3 == 1 ? "C" : " ")) + num(X(bz.list[i].x)) + " " + num(Y(bz.list[i].y));
        }
        if (bz.eflag) d += "L" + num(X(bz.ep.x)) + " " + num(Y(bz.ep.y));
      }
      result.edges.push_back(d);
    }
    gvFreeLayout(context_->gvc, g);
  }
  agclose(g);
  g_graphviz_errors = nullptr;
  return result;
}

void LineageDrawer::write(std::string& out, const PageFacts& page, const ModelFacts& facts) const {
  const Plan& plan = *page.plan;
  const Model& model = plan.models[static_cast<size_t>(facts.model)];
  const ConeFacts& cone = facts.cone;
  std::string id = anchor("lineage-", model.id), caption_id = id + "-cap";
  std::string counts = std::to_string(cone.nodes.size()) + " nodes (" + std::to_string(cone.sources) + " sources, " +
                       std::to_string(cone.jobs) + " jobs, " + std::to_string(cone.features) + " features): " +
                       std::to_string(cone.status_count[0]) + " ok, " + std::to_string(cone.status_count[1]) +
                       " on a degraded run's chain, " + std::to_string(cone.status_count[2]) +
                       " on a failing run's chain";
  out += "<figure class=\"lineage\" id=\"" + id + "\" data-model=\"" + esc(model.id) + "\" data-summarised=\"" +
         (cone.summarised ? "yes" : "no") + "\">";
  if (cone.summarised) {
    // A strip of the cone's nodes by status, proportional to their counts.
    double w = 700, x = 0;
    out += "<svg class=\"cone-strip\" viewBox=\"0 0 700 46\" width=\"700\" role=\"img\" aria-labelledby=\"" +
           caption_id + "\"><title>" + esc("Upstream cone of " + model.id + ": " + counts) + "</title>";
    const RunStatus order[] = {RunStatus::fail, RunStatus::degraded, RunStatus::ok};
    for (RunStatus s : order) {
      size_t n = cone.status_count[static_cast<int>(s)];
      if (!n) continue;
      double part = w * static_cast<double>(n) / static_cast<double>(cone.nodes.size());
      out += "<g class=\"strip-" + std::string(status_swatch(s)) + "\"><title>" + std::to_string(n) + " " +
             status_word(s) + "</title><rect x=\"" + num(x) + "\" y=\"4\" width=\"" + num(part) +
             "\" height=\"18\"/>";
      if (part > 70) {
        out += status_mark(s, x + 10, 36, 9) + "<text class=\"small\" x=\"" + num(x + 18) + "\" y=\"40\">" +
               std::to_string(n) + " " + status_word(s) + "</text>";
      }
      out += "</g>";
      x += part;
    }
    out += "</svg><figcaption id=\"" + caption_id + "\">The upstream cone of " + esc(model.id) + " has " +
           esc(counts) + ". It is larger than " + std::to_string(kMaxDrawnCone) +
           " nodes, so it is summarised: the table lists the " + std::to_string(kSummaryRows) +
           " nodes most at risk (on a failing run's chain first, then on a degraded one's, then on the most late "
           "chains, then the smallest margin).</figcaption>";
    std::vector<ConeNode> ranked = cone.nodes;
    size_t rows = std::min(kSummaryRows, ranked.size());
    std::partial_sort(ranked.begin(), ranked.begin() + static_cast<std::ptrdiff_t>(rows), ranked.end(), at_risk_before);
    ranked.resize(rows);
    write_node_table(out, plan, ranked, "Nodes most at risk", true);
    out += "</figure>";
    return;
  }
  ConeLayout l = layout(plan, facts);
  if (!l.error.empty()) {
    out += "<p class=\"note\">The lineage could not be laid out: " + esc(l.error) + "</p>";
  } else {
    out += "<svg class=\"lineage-svg\" viewBox=\"0 0 " + num(l.width) + " " + num(l.height) + "\" width=\"" +
           num(l.width) + "\" role=\"img\" aria-labelledby=\"" + caption_id + "\"><title>" +
           esc("Upstream lineage of " + model.id) + "</title>";
    for (const std::string& d : l.edges) {
      if (!d.empty()) out += "<path class=\"edge\" d=\"" + d + "\"/>";
    }
    for (size_t i = 0; i < l.boxes.size(); ++i) {
      const ConeLayout::Box& b = l.boxes[i];
      bool is_model = i == cone.nodes.size();
      if (is_model) {
        out += "<g class=\"lnode lmodel\" data-node=\"" + esc(model.id) + "\"><title>" + esc("model " + model.id) +
               "</title>" + outline(NodeKind::job, true, b.x, b.y, b.w, b.h) + "<text class=\"lid\" x=\"" +
               num(b.x - b.w / 2 + 10) + "\" y=\"" + num(b.y - 2) + "\">" + esc(model.id) +
               "</text><text class=\"small\" x=\"" + num(b.x - b.w / 2 + 10) + "\" y=\"" + num(b.y + 11) +
               "\">model</text></g>";
        continue;
      }
      const ConeNode& n = cone.nodes[i];
      const Node& node = plan.nodes[static_cast<size_t>(n.node)];
      std::string title = std::string(to_string(node.kind)) + " " + node.id + ": " + status_word(n.status) + "; " +
                          margin_words(n.margin);
      if (std::string binding = binding_words(plan, n.margin); !binding.empty()) title += " (binding run " + binding + ")";
      out += "<g class=\"lnode ln-" + std::string(status_swatch(n.status)) + "\" data-node=\"" + esc(node.id) +
             "\" data-status=\"" + status_word(n.status) + "\"><title>" + esc(title) + "</title>" +
             outline(node.kind, false, b.x, b.y, b.w, b.h) + status_mark(n.status, b.x - b.w / 2 + 12, b.y - 5, 8) +
             "<text class=\"lid\" x=\"" + num(b.x - b.w / 2 + 20) + "\" y=\"" + num(b.y - 1) + "\">" + esc(node.id) +
             "</text><text class=\"small\" x=\"" + num(b.x - b.w / 2 + 20) + "\" y=\"" + num(b.y + 12) + "\">" +
             esc(margin_words(n.margin)) + "</text></g>";
    }
    out += "</svg>";
  }
  out += "<figcaption id=\"" + caption_id + "\">Upstream lineage of " + esc(model.id) + ", " + esc(counts) +
         ". Capsules are sources, boxes jobs, cut-corner boxes features; each node shows the worst status of the runs "
         "whose late chain passes through it and how much later it could land before an ok run suffers (DESIGN §9 "
         "margin, whole minutes).</figcaption>";
  write_node_table(out, plan, cone.nodes, "The lineage as a table", false);
  out += "</figure>";
}

}  // namespace readyby::html
