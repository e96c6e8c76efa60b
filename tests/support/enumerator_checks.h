// Checks the enumerator suites share (gtest assertions): the connected
// bushy searches (push and pull) are held to the same counts and optima,
// and every bushy suite to the same cover rule over slices.
#ifndef SLICEPLAN_TESTS_SUPPORT_ENUMERATOR_CHECKS_H_
#define SLICEPLAN_TESTS_SUPPORT_ENUMERATOR_CHECKS_H_

#include <cstdint>
#include <vector>

#include "core/search/connected_strategy.h"
#include "tests/support/test_queries.h"

namespace sliceplan::testing {

// Bushy slices cover every tree; a tree whose constrained relations arrive
// together on the path lies in both slices of that constraint
// (docs/slicing.md), so over P slices a tree is counted 1 to P times:
// exactly `trees` unsliced, between `trees` and P x `trees` sliced.
void ExpectBushyCover(uint64_t counted, uint64_t trees, uint32_t p);

// `method`'s unsliced split count is the csg-cmp pair count on chains,
// cycles, stars and cliques of 3 to 12 relations (closed_forms.h).
void ExpectSplitsAreCsgCmpPairs(ConnectedMethod method);

// On each of `shapes` at 6, 9 and 12 relations, `method`'s best plan over
// P = 1, 2 and 4 slices is the subset DP's connected-only optimum, and the
// slices cover the trees without cross products (counted against the
// closed forms where there is one).
void ExpectSlicesHoldTheConnectedOptimum(ConnectedMethod method,
                                         const std::vector<GraphShape>& shapes);

}  // namespace sliceplan::testing

#endif  // SLICEPLAN_TESTS_SUPPORT_ENUMERATOR_CHECKS_H_
