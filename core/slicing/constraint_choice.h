// Which relations the slice constraints use: a deterministic function of the
// query, so the coordinator and every worker derive the same choice from the
// query alone (docs/slicing.md, invariant 1).
//
// In the cross-product space every disjoint choice gives the same work per
// slice. Without cross products the slices' sizes depend on the choice: a
// constraint helps when each of its two sides forbids many connected sets.
// The choice samples the join graph's connected sets (all of them up to a
// few thousand), scores each candidate by the sets forbidden on its weaker
// side, and picks greedily; ties go to relations of equal colour under
// colour refinement (iterated degree signatures, a cheap stand-in for
// graph symmetry, under which the two sides are equal), then to the lowest
// ids. Pure function; thread-safe.
#ifndef SLICEPLAN_CORE_SLICING_CONSTRAINT_CHOICE_H_
#define SLICEPLAN_CORE_SLICING_CONSTRAINT_CHOICE_H_

#include <vector>

#include "core/model/query.h"
#include "core/slicing/slice_constraints.h"
#include "core/slicing/slice_spec.h"

namespace sliceplan {

// k disjoint constraints for `shape`. With cross products every choice is
// as good, and the lowest ids are taken at no cost; without, the scored
// choice above (a few milliseconds for 20 relations).
// REQUIRES: k <= MaxSliceBits(n, shape).
std::vector<ConstraintRelations> ChooseConstraintRelations(const Query& query, PlanShape shape,
                                                           int k, bool cross_products);

// The colour refinement used above, exposed for tests: relations with equal
// colour have equal iterated degree signatures. Colours are dense ranks.
std::vector<int> RefinedColours(const Query& query);

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_SLICING_CONSTRAINT_CHOICE_H_
