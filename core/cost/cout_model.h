// The `cout` cost formula (docs/cost-models.md):
//   C_out(leaf) = 0;  C_out(L join R) = card(L u R) + C_out(L) + C_out(R).
// One join's cost and a whole plan's, shared by the search policy
// (cout_policy.h), the tiers and plan costing so all round identically.
// Pure functions.
#ifndef SLICEPLAN_CORE_COST_COUT_MODEL_H_
#define SLICEPLAN_CORE_COST_COUT_MODEL_H_

#include "core/model/plan.h"
#include "core/model/value_range.h"

namespace sliceplan {

// One join's cout cost from its output cardinality and its inputs' costs.
// Saturates at kValueCeiling (value_range.h).
inline double CoutJoin(double card, double left_cost, double right_cost) {
  return Saturate(card + (left_cost + right_cost));
}

// Fills every node's cost with C_out from its cardinality; returns the
// root's.
double CostWithCout(Plan& plan);

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_COST_COUT_MODEL_H_
