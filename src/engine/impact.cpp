#include "engine/impact.h"

#include <algorithm>

#include "plan/lineage.h"

namespace readyby {

bool NodeImpact::single_point_of_failure() const {
  int models_failed = 0;
  for (const ModelImpact& m : models) models_failed += m.fail > 0 ? 1 : 0;
  return models_failed >= 2;
}

std::vector<NodeImpact> impact(const Plan& plan, const Evaluation& base) {
  // Runs per model that could change: ok, and degraded.
  struct Counts {
    int ok = 0, degraded = 0;
  };
  std::vector<Counts> counts(plan.models.size());
  for (const RunResult& r : base.runs) {
    Counts& c = counts[static_cast<size_t>(r.model)];
    if (r.status == RunStatus::ok) ++c.ok;
    else if (r.status == RunStatus::degraded) ++c.degraded;
  }
  // Models that list each feature, and whether it is optional there.
  std::vector<std::vector<int>> models_of(plan.nodes.size());
  for (size_t m = 0; m < plan.models.size(); ++m) {
    for (int f : plan.models[m].features) models_of[static_cast<size_t>(f)].push_back(static_cast<int>(m));
  }

  DownstreamCones cones(*base.lineage_);
  std::vector<NodeImpact> out;
  out.reserve(plan.nodes.size());
  std::vector<char> required(plan.models.size(), 0), optional(plan.models.size(), 0);
  std::vector<int> touched;
  for (size_t n = 0; n < plan.nodes.size(); ++n) {
    NodeImpact impact;
    impact.node = static_cast<int>(n);
    touched.clear();
    for (int k : cones.of({static_cast<int>(n)})) {
      for (int m : models_of[static_cast<size_t>(k)]) {
        (plan.nodes[static_cast<size_t>(k)].optional ? optional : required)[static_cast<size_t>(m)] = 1;
        touched.push_back(m);
      }
    }
    std::sort(touched.begin(), touched.end());
    touched.erase(std::unique(touched.begin(), touched.end()), touched.end());
    for (int m : touched) {
      const Counts& c = counts[static_cast<size_t>(m)];
      ModelImpact mi{m, 0, 0};
      if (required[static_cast<size_t>(m)]) mi.fail = c.ok + c.degraded;
      else mi.degrade = c.ok;
      required[static_cast<size_t>(m)] = optional[static_cast<size_t>(m)] = 0;
      if (mi.fail == 0 && mi.degrade == 0) continue;
      impact.failed_runs += mi.fail;
      impact.degraded_runs += mi.degrade;
      impact.models.push_back(mi);
    }
    out.push_back(std::move(impact));
  }
  std::stable_sort(out.begin(), out.end(), [](const NodeImpact& a, const NodeImpact& b) {
    if (a.failed_runs != b.failed_runs) return a.failed_runs > b.failed_runs;
    return a.degraded_runs > b.degraded_runs;
  });
  return out;
}

}  // namespace readyby
