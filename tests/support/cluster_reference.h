// An independent reference for the cluster model: every tree x every
// (strategy, node count) per join x every sample rate per leaf, costed
// with its own transcription of docs/cost-models.md. Meant for n <= 5.
#ifndef SLICEPLAN_TESTS_SUPPORT_CLUSTER_REFERENCE_H_
#define SLICEPLAN_TESTS_SUPPORT_CLUSTER_REFERENCE_H_

#include <vector>

#include "core/cost/cluster_model.h"
#include "core/model/plan.h"
#include "core/model/query.h"
#include "core/model/wide_query.h"

namespace sliceplan {
struct WidePlan;  // tiers/wide_plan.h: above the core suites' layer
}  // namespace sliceplan

namespace sliceplan::testing {

struct RefCosts {
  double latency = 0, node_seconds = 0, completeness = 1;
};

// Cost vectors of every physical plan over all relations; `left_deep`
// keeps the trees whose every join has a base relation as an input.
std::vector<RefCosts> RefAllClusterPlans(const Query& query, const ClusterParams& params,
                                         bool left_deep, bool connected_only = false);

// The exact frontier of `plans` (latency, node_seconds min; completeness
// max), one plan per distinct cost vector.
std::vector<RefCosts> RefFrontier(const std::vector<RefCosts>& plans);

// The same frontier from a DP that prunes sub-plans across completeness
// levels on all three metrics: the shortcut docs/cost-models.md warns against.
std::vector<RefCosts> RefFrontierPruningAcrossLevels(const Query& query,
                                                     const ClusterParams& params);

// An engine plan's costs recomputed from its tree and physical choices.
RefCosts RefCostsOf(const Query& query, const ClusterParams& params, const Plan& plan);

// The same for a plan of any size: each node's cardinality from its own
// relations (the product of their rows and of the selectivities of the
// predicates inside them, summed as logarithms), not from the engine's
// numbers.
RefCosts RefCostsOfWide(const WideQuery& query, const ClusterParams& params, const WidePlan& plan);

}  // namespace sliceplan::testing

#endif  // SLICEPLAN_TESTS_SUPPORT_CLUSTER_REFERENCE_H_
