// Closed forms for the size of one slice's search in the cross-product
// space (docs/slicing.md), used to refuse a search before allocating and to pick
// slice counts. n relations, k constraints, f = n - 2k (pairs) or n - 3k
// (triples) free relations. Pure functions.
#ifndef SLICEPLAN_CORE_SLICING_SEARCH_ESTIMATE_H_
#define SLICEPLAN_CORE_SLICING_SEARCH_ESTIMATE_H_

#include <cstdint>

#include "core/slicing/slice_spec.h"

namespace sliceplan {

// Admissible sets, the empty set included: 3^k 2^f or 7^k 2^f. Computed in
// double because it passes 2^64 long before the limits refuse it.
double DenseSlots(int n, PlanShape shape, int k);

// Splits one slice offers. Bushy, ordered, both sides non-empty:
//   3^f 21^k - 2 * 2^f 7^k + 1  (halve it for a symmetric cost model).
// Left-deep, (set, relation) pairs with a non-empty rest:
//   f 2^(f-1) 3^k + 2k 3^(k-1) 2^f - (f + k).
double DenseSplits(int n, PlanShape shape, int k, bool symmetric);

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_SLICING_SEARCH_ESTIMATE_H_
