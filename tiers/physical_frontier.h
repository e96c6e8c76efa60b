// The cluster model on one join tree of any size (docs/cost-models.md,
// "cluster"): the Pareto set of its physical choices, a sample rate per
// leaf and a strategy and node count per join. The anytime frontier search
// (issue of many objectives at every size) evaluates each tree it visits
// with it. Bottom-up over the tree: a node's entries are every combination
// of its children's entries with every (strategy, node count), pruned as
// the exact search prunes (only within one completeness level, alpha per
// level alpha^(1/n) so the error compounds to at most alpha), then thinned
// to at most `cap` entries per node when a cap is given (an approximation:
// the set is then no longer alpha-exact). Pure; thread-compatible.
#ifndef SLICEPLAN_TIERS_PHYSICAL_FRONTIER_H_
#define SLICEPLAN_TIERS_PHYSICAL_FRONTIER_H_

#include <cstdint>
#include <memory>
#include <vector>

#include "core/cost/cluster_config.h"
#include "core/model/wide_query.h"
#include "tiers/wide_plan.h"

namespace sliceplan {

// A tree with its physical choices and metrics.
struct PhysicalPlan {
  std::vector<JoinStrategy> strategy;  // by tree node (joins)
  std::vector<int> nodes;              // by tree node (joins): rented nodes
  std::vector<double> sample_rate;     // by tree node (leaves)
  std::vector<ClusterCosts> metrics;   // by tree node: the subtree's
  const ClusterCosts& costs() const { return metrics.back(); }
};

// A tree (costed: cout cardinalities) with one of its physical plans.
struct FrontierPlan {
  std::shared_ptr<const WidePlan> tree;
  PhysicalPlan physical;
};

struct PhysicalFrontierOptions {
  size_t cap = 0;  // most entries kept per node; 0: none (alpha-exact)
};

// The non-dominated physical plans of `tree` on the selected objectives,
// by increasing latency_s (FrontierIndices' order). REQUIRES: `tree` is a
// costed plan of `query` (CostWidePlan: its node cardinalities), and
// config's parameters passed ValidateClusterParams.
std::vector<PhysicalPlan> PhysicalFrontier(const WideQuery& query, const WidePlan& tree,
                                           const ClusterSearchConfig& config,
                                           const PhysicalFrontierOptions& options = {});

// The tree with its physical choices and metrics in its nodes, cost =
// latency_s as the exact Pareto search sets it: the answer's form at any
// size.
WidePlan WithPhysicalChoices(const WidePlan& tree, const PhysicalPlan& choices);

}  // namespace sliceplan

#endif  // SLICEPLAN_TIERS_PHYSICAL_FRONTIER_H_
