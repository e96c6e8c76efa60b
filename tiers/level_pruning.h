// Pruning a node's physical sub-plans as the exact Pareto search prunes
// them (docs/cost-models.md, "cluster"): only within one completeness
// level, then thinned to a cap. Shared by PhysicalFrontier and the
// sub-plan cache (tiers/shared_subplans.h). `T` is anything with a
// `ClusterCosts costs` member, reached through `costs_of`.
#ifndef SLICEPLAN_TIERS_LEVEL_PRUNING_H_
#define SLICEPLAN_TIERS_LEVEL_PRUNING_H_

#include <algorithm>
#include <cmath>
#include <vector>

#include "core/cost/pareto.h"

namespace sliceplan {

inline bool SameCompletenessLevel(double a, double b) {
  return std::fabs(a - b) <= kCompletenessTolerance * std::max(a, b);
}

// Keeps, within each completeness level, the items no other item of the
// level alpha-covers (the first of equals), sorted by completeness down,
// then latency, then node-seconds.
template <typename T, typename CostsOf>
std::vector<T> PruneInLevels(std::vector<T> all, Objectives o, double alpha, CostsOf costs_of) {
  std::sort(all.begin(), all.end(), [&](const T& x, const T& y) {
    const ClusterCosts& a = costs_of(x);
    const ClusterCosts& b = costs_of(y);
    if (a.completeness != b.completeness) return a.completeness > b.completeness;
    if (a.latency_s != b.latency_s) return a.latency_s < b.latency_s;
    return a.node_seconds < b.node_seconds;
  });
  std::vector<T> kept;
  size_t level_start = 0;
  for (T& e : all) {
    const ClusterCosts& c = costs_of(e);
    if (kept.empty() ||
        !SameCompletenessLevel(costs_of(kept.back()).completeness, c.completeness)) {
      level_start = kept.size();
    }
    bool covered = false;
    for (size_t k = level_start; k < kept.size() && !covered; ++k) {
      covered = CoversInLevel(costs_of(kept[k]), c, o, alpha);
    }
    if (!covered) kept.push_back(std::move(e));
  }
  return kept;
}

// At most `cap` items, evenly spread over the sorted list (levels and
// latencies both keep their extremes); all of them when cap is 0.
template <typename T>
std::vector<T> ThinEvenly(std::vector<T> items, size_t cap) {
  if (cap == 0 || items.size() <= cap) return items;
  std::vector<T> out;
  out.reserve(cap);
  for (size_t k = 0; k < cap; ++k) {
    out.push_back(std::move(items[k * (items.size() - 1) / (cap - 1 == 0 ? 1 : cap - 1)]));
  }
  return out;
}

}  // namespace sliceplan

#endif  // SLICEPLAN_TIERS_LEVEL_PRUNING_H_
