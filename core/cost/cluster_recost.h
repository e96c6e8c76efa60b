// A cluster-model plan's metrics recomputed from its tree and physical
// choices (docs/cost-models.md): each leaf's sample rate, each join's
// strategy and node count. The coordinator checks a worker's answer with
// it (core/slice_check.h). Pure function; thread-safe.
#ifndef SLICEPLAN_CORE_COST_CLUSTER_RECOST_H_
#define SLICEPLAN_CORE_COST_CLUSTER_RECOST_H_

#include <vector>

#include "absl/status/statusor.h"
#include "core/cost/cluster_model.h"
#include "core/model/cardinality.h"
#include "core/model/plan.h"
#include "core/model/query.h"

namespace sliceplan {

// Every node's metrics, in the plan's order. INVALID_ARGUMENT naming the
// node whose sample rate or node count is not one `params` offers.
// REQUIRES: the plan is a tree over the query's relations, children first.
absl::StatusOr<std::vector<ClusterCosts>> RecostClusterPlan(const Query& query,
                                                            const Cardinality& card,
                                                            const ClusterParams& params,
                                                            const Plan& plan);

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_COST_CLUSTER_RECOST_H_
