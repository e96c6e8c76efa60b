// Test helpers for plans of the cluster model built on wide trees
// (tiers/physical_frontier.h): the engine's Plan of a tree with its
// physical choices, for the independent reference to cost, and the
// approximation factor of a set against a reference set.
#ifndef SLICEPLAN_TESTS_SUPPORT_PHYSICAL_PLANS_H_
#define SLICEPLAN_TESTS_SUPPORT_PHYSICAL_PLANS_H_

#include <algorithm>
#include <limits>
#include <vector>

#include "core/cost/cluster_config.h"
#include "core/model/plan.h"
#include "tiers/physical_frontier.h"
#include "tiers/wide_plan.h"

namespace sliceplan::testing {

// The small cluster model the tiers' tests share: node counts {4, 16},
// sample rates {1, 0.1}, every objective, exact (alpha 1).
inline ClusterSearchConfig SmallClusterConfig() {
  ClusterSearchConfig c;
  c.params.node_counts = {4, 16};
  c.params.sample_rates = {1.0, 0.1};
  return c;
}

// REQUIRES: the tree has at most 64 relations.
inline Plan PlanWithChoices(const WidePlan& tree, const PhysicalPlan& choices) {
  return ToExactPlan(WithPhysicalChoices(tree, choices));
}

// The smallest alpha such that every plan of `reference` is alpha-covered
// by one of `got` (docs/cost-models.md: latency and node_seconds at most
// alpha times, completeness at least 1/alpha times), all three metrics.
inline double CoverFactor(const std::vector<ClusterCosts>& got,
                          const std::vector<ClusterCosts>& reference) {
  double worst = 1;
  for (const ClusterCosts& q : reference) {
    double best = std::numeric_limits<double>::infinity();
    for (const ClusterCosts& p : got) {
      best = std::min(best, std::max({p.latency_s / q.latency_s, p.node_seconds / q.node_seconds,
                                      q.completeness / p.completeness, 1.0}));
    }
    worst = std::max(worst, best);
  }
  return worst;
}

}  // namespace sliceplan::testing

#endif  // SLICEPLAN_TESTS_SUPPORT_PHYSICAL_PLANS_H_
