// Cardinality of a relation set: card(X) = prod rows(i) for i in X, times
// the selectivity of every predicate whose relations all lie in X
// (cost-models.md). Immutable after construction; thread-safe.
#ifndef SLICEPLAN_CORE_CARDINALITY_H_
#define SLICEPLAN_CORE_CARDINALITY_H_

#include <vector>

#include "core/query.h"

namespace sliceplan {

class Cardinality {
 public:
  explicit Cardinality(const Query& query);

  // card(X). Cost: O(|X| + predicates). REQUIRES: X within the query.
  double Of(RelSet x) const;
  // True when some predicate spans the join of L and R (not a cross product).
  bool Connects(RelSet left, RelSet right) const;
  double Rows(RelationId r) const { return rows_[r.value]; }

 private:
  std::vector<double> rows_;
  std::vector<Predicate> predicates_;
};

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_CARDINALITY_H_
