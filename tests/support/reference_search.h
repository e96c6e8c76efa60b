// An independent reference for the engine: explicit enumeration of every
// join order and every bushy tree, with its own cardinality and cout code
// (docs/cost-models.md), sharing nothing with core/ but the Query type. Meant for
// n <= 9: the number of trees is (2n-3)!! unordered.
#ifndef SLICEPLAN_TESTS_SUPPORT_REFERENCE_SEARCH_H_
#define SLICEPLAN_TESTS_SUPPORT_REFERENCE_SEARCH_H_

#include <functional>
#include <vector>

#include "core/model/plan.h"
#include "core/model/query.h"

namespace sliceplan::testing {

// card(X) = prod rows * prod selectivities of predicates inside X.
double RefCard(const Query& query, RelSet x);
// True when a predicate lies inside L u R and touches both sides.
bool RefJoinable(const Query& query, RelSet left, RelSet right);

// The least cout over all bushy trees (all left-deep orders), optionally
// without cross products; +inf when no tree qualifies.
double RefBestBushy(const Query& query, bool cross_products);
double RefBestLeftDeep(const Query& query, bool cross_products);

// Calls fn with the node sets (leaves and joins) of every unordered bushy
// tree over all relations, cross products allowed.
void ForEachBushyTree(const Query& query,
                      const std::function<void(const std::vector<RelSet>&)>& fn);

// cout of an engine plan, recomputed from its shape alone; and whether every
// join in it is backed by a predicate.
double RefCoutOf(const Query& query, const Plan& plan);
bool RefFreeOfCrossProducts(const Query& query, const Plan& plan);
// True when the plan joins every relation exactly once.
bool RefCoversQuery(const Query& query, const Plan& plan);

}  // namespace sliceplan::testing

#endif  // SLICEPLAN_TESTS_SUPPORT_REFERENCE_SEARCH_H_
