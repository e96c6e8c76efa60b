// Enumerating the connected relation sets of a join graph (predicates taken
// as cliques), without a memo: DPccp's EnumerateCsg (Moerkotte and Neumann,
// VLDB 2006), which emits each connected set exactly once. Used to size
// searches without cross products and to score slice constraints.
#ifndef SLICEPLAN_CORE_GRAPH_CONNECTED_SETS_H_
#define SLICEPLAN_CORE_GRAPH_CONNECTED_SETS_H_

#include <cstdint>
#include <vector>

#include "core/memo/direct_memo.h"
#include "core/model/query.h"

namespace sliceplan {

// Up to `cap` connected sets of the query's join graph, singletons
// included, in DPccp's order (sets holding high ids first).
std::vector<RelSet> ConnectedSets(const Query& query, uint64_t cap);

// The number of connected sets, counted up to `cap` (the count stops
// there), with no list kept: memory O(n) whatever the cap.
uint64_t CountConnectedSets(const Query& query, uint64_t cap);

// How many of the query's listed estimates (Query::listed) are of
// connected sets: the listed sets a connected-only search holds in its
// memo (with cross products every listed set is one). 0 when none are
// listed. O(listed x n).
uint64_t CountListedConnected(const Query& query);

// Adds every connected set to `memo`. REQUIRES: memo over query.size()
// relations.
void MarkConnectedSets(const Query& query, DirectMemo& memo);

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_GRAPH_CONNECTED_SETS_H_
