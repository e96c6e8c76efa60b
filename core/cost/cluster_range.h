// The numeric-range rule (docs/numeric-range.md) for the cluster model's
// own parameters. Every plan has a join of two base relations (a tree of
// two or more leaves has a node whose children are both leaves), and a
// stage's time grows with every input it reads, so no plan's latency or
// node-seconds is below the cheapest such stage: both inputs the smallest
// relation at the lowest sample rate and the narrowest rows, no output, on
// the most nodes, by the cheapest strategy. When that bound reaches the
// ceiling, every plan does, whatever the search: the request is refused up
// front, naming the parameter that does it.
//
// Pure; thread-safe.
#ifndef SLICEPLAN_CORE_COST_CLUSTER_RANGE_H_
#define SLICEPLAN_CORE_COST_CLUSTER_RANGE_H_

#include <span>

#include "absl/status/status.h"
#include "core/cost/cluster_model.h"
#include "core/model/query.h"

namespace sliceplan {

// The cheapest stage any plan of `relations` must run, in seconds,
// saturated at kValueCeiling. REQUIRES: params validated, two or more
// relations.
double CheapestStageSeconds(std::span<const Relation> relations, const ClusterParams& params);

// OUT_OF_RANGE when CheapestStageSeconds reaches kValueCeiling, naming the
// parameter whose default would bring it back (both spellings: the RPC
// field and the CLI flag), or every non-default one when no single one
// does; OK otherwise (and for fewer than two relations).
absl::Status CheckClusterInRange(std::span<const Relation> relations, const ClusterParams& params);

// OUT_OF_RANGE for a search whose every plan reached the ceiling though
// the cheapest stage did not: names the parameters set slower than their
// defaults (a longer start-up, a lower throughput), or the row estimates
// (the largest relations) when none is.
absl::Status ClusterPlansSaturated(std::span<const Relation> relations,
                                   const ClusterParams& params);

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_COST_CLUSTER_RANGE_H_
