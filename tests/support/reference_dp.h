// A second independent oracle for sizes the explicit enumeration cannot
// reach: the textbook dynamic program over all subsets (every subset's
// best cout from every split of it, O(3^n) splits), written separately from
// core/ with its own cardinality table, no slicing and no memo layout.
// Meant for n <= 14.
#ifndef SLICEPLAN_TESTS_SUPPORT_REFERENCE_DP_H_
#define SLICEPLAN_TESTS_SUPPORT_REFERENCE_DP_H_

#include "core/model/query.h"

namespace sliceplan::testing {

// The least cout over all bushy trees (all left-deep orders), optionally
// without cross products; +inf when no tree qualifies. REQUIRES: n <= 20.
double DpBestBushy(const Query& query, bool cross_products);
double DpBestLeftDeep(const Query& query, bool cross_products);

}  // namespace sliceplan::testing

#endif  // SLICEPLAN_TESTS_SUPPORT_REFERENCE_DP_H_
