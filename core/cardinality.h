// Cardinality of a relation set: card(X) = prod rows(i) for i in X, times
// the selectivity of every predicate whose relations all lie in X
// (docs/cost-models.md). Immutable after construction; thread-safe.
//
// Values saturate at kValueCeiling (value_range.h). When every partial
// product of the query's factors stays inside [1e-290, 1e300], the plain
// product is used (exact as before); otherwise card is computed through
// logarithms, so no intermediate overflows or underflows.
#ifndef SLICEPLAN_CORE_CARDINALITY_H_
#define SLICEPLAN_CORE_CARDINALITY_H_

#include <vector>

#include "core/query.h"

namespace sliceplan {

class Cardinality {
 public:
  explicit Cardinality(const Query& query);

  // card(X), saturated. Cost: O(|X| + predicates). REQUIRES: X within the
  // query.
  double Of(RelSet x) const { return wide_range_ ? OfByLogs(x) : OfByProduct(x); }
  // True when some predicate spans the join of L and R (not a cross product).
  bool Connects(RelSet left, RelSet right) const;
  double Rows(RelationId r) const { return rows_[r.value]; }
  // True when products of this query's factors could leave double's range.
  bool wide_range() const { return wide_range_; }

 private:
  double OfByProduct(RelSet x) const;
  double OfByLogs(RelSet x) const;

  std::vector<double> rows_;
  std::vector<double> log_rows_;
  std::vector<Predicate> predicates_;
  std::vector<double> log_selectivities_;
  bool wide_range_ = false;
};

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_CARDINALITY_H_
