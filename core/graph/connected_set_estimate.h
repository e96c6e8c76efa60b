// How many connected relation sets a join graph has, when there may be too
// many to count: counted exactly up to a cap, estimated past it by random
// probes of the enumeration tree (docs/tiers.md, "Sizing a search without
// cross products").
//
// DPccp's EnumerateCsg (connected_sets.h) emits each connected set once, as
// a node of a tree: a start relation v is the root of its own subtree, and
// a node S with exclusion set X has one child S | N' for every non-empty
// subset N' of its neighbourhood N = Around(S) \ X. Knuth's estimator
// ("Estimating the efficiency of backtrack programs", Math. Comp. 29, 1975)
// walks one random root-to-leaf path, multiplying the branching factors
// d_1, d_2, ... on the way; 1 + d_1 + d_1 d_2 + ... is an unbiased estimate
// of the subtree's node count. Here the probes are stratified by start
// relation (each subtree estimated on its own, then summed), which removes
// the largest source of variance (subtree sizes differ by up to 2^n), and
// narrow neighbourhoods choose their child with a one-step look-ahead
// (importance sampling; the estimate stays unbiased).
// Deterministic for a given seed. Pure; thread-safe.
#ifndef SLICEPLAN_CORE_GRAPH_CONNECTED_SET_ESTIMATE_H_
#define SLICEPLAN_CORE_GRAPH_CONNECTED_SET_ESTIMATE_H_

#include <cstdint>

#include "core/model/query.h"

namespace sliceplan {

struct ConnectedSetCount {
  double sets = 0;     // connected sets, singletons included
  bool exact = false;  // counted (below the cap), not estimated
};

// Below `exact_cap` sets the count is exact; past it, the mean of
// `probes_per_relation` probes per start relation.
ConnectedSetCount EstimateConnectedSets(const Query& query, uint64_t exact_cap = 2'000'000,
                                        int probes_per_relation = 400, uint64_t seed = 1);

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_GRAPH_CONNECTED_SET_ESTIMATE_H_
