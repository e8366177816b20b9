#include "plan/plan.h"

namespace readyby {

const char* to_string(NodeKind kind) {
  switch (kind) {
    case NodeKind::source: return "source";
    case NodeKind::job: return "job";
    case NodeKind::feature: return "feature";
  }
  return "?";
}

int Plan::find_node(std::string_view node_id) const {
  for (size_t i = 0; i < nodes.size(); ++i) {
    if (nodes[i].id == node_id) return static_cast<int>(i);
  }
  return -1;
}

int Plan::find_model(std::string_view model_id) const {
  for (size_t i = 0; i < models.size(); ++i) {
    if (models[i].id == model_id) return static_cast<int>(i);
  }
  return -1;
}

const Calendar& Plan::calendar(int index) const {
  static const Calendar kNone;
  return index < 0 ? kNone : calendars[static_cast<size_t>(index)];
}

size_t Plan::count(NodeKind kind) const {
  size_t n = 0;
  for (const Node& node : nodes) n += node.kind == kind;
  return n;
}

}  // namespace readyby
