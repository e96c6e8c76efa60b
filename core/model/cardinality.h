// Cardinality of a relation set: card(X) = prod rows(i) for i in X, times
// the selectivity of every predicate whose relations all lie in X
// (docs/cost-models.md). Immutable after construction; thread-safe.
//
// Values saturate at kValueCeiling (value_range.h). When every partial
// product of the query's factors stays inside [1e-290, 1e300], the plain
// product is used (exact as before); otherwise card is computed through
// logarithms, so no intermediate overflows or underflows.
//
// With the engine's own estimates (Query::listed()), a listed set's rows
// are its cardinality, and a set not listed follows the rule of
// docs/cost-models.md, "Engine estimates": a set of several connected
// components is the product of theirs; a connected one is built by
// peeling one relation v (the lowest whose removal leaves a listed set,
// else the highest), card(X) = card(X \ v) * card(v) * the selectivities v
// completes; so each listed subset's correction of the model is carried
// to the sets above it. O(|X| (|X| + predicates)) per unlisted set.
//
// With non-inner joins (Query::joins()), card(X) is the original tree
// restricted to X (JoinTree::Estimate, docs/cost-models.md); a listed set's
// rows replace it for that set alone.
#ifndef SLICEPLAN_CORE_MODEL_CARDINALITY_H_
#define SLICEPLAN_CORE_MODEL_CARDINALITY_H_

#include <bit>
#include <memory>
#include <vector>

#include "core/model/join_tree.h"
#include "core/model/query.h"

namespace sliceplan {

class Cardinality {
 public:
  explicit Cardinality(const Query& query);

  // card(X), saturated. Cost: O(|X| + predicates). REQUIRES: X within the
  // query.
  double Of(RelSet x) const { return listed_ ? OfListed(x) : Model(x); }
  // card(L u R) for disjoint L and R from their cardinalities: their
  // product times the selectivity of each binary predicate between them.
  // Cost O(|smaller side| + predicates between them), Of's value up to
  // rounding. Falls back to Of on a query with a predicate over three or
  // more relations or in the logarithmic range.
  double OfJoin(RelSet left, double left_card, RelSet right, double right_card) const {
    if (!pairwise_) return Of(left | right);
    double card = left_card * right_card;
    const bool left_smaller = Size(left) <= Size(right);
    RelSet side = left_smaller ? left : right;
    const RelSet other = left_smaller ? right : left;
    for (; side != 0; side &= side - 1) {
      const int u = std::countr_zero(side);
      for (RelSet across = partners_[u] & other; across != 0; across &= across - 1) {
        card *= pair_selectivity_[u * kMaxRelations + std::countr_zero(across)];
      }
    }
    return card;
  }
  // True when some predicate spans the join of L and R (not a cross product).
  bool Connects(RelSet left, RelSet right) const;
  double Rows(RelationId r) const { return rows_[r.value]; }
  int relations() const { return static_cast<int>(rows_.size()); }
  // True when products of this query's factors could leave double's range.
  bool wide_range() const { return wide_range_; }
  // The engine's listed estimates this cardinality honours, or null.
  const ListedRows* listed() const { return listed_.get(); }

 private:
  // The model's card(X), listed estimates aside.
  double Model(RelSet x) const {
    if (tree_) return tree_->Estimate(x);
    return wide_range_ ? OfByLogs(x) : OfByProduct(x);
  }
  double OfListed(RelSet x) const;
  // The connected component of `x` holding `seed` (predicates inside x).
  RelSet ComponentOf(RelSet x, RelSet seed) const;
  // log of the product of the selectivities of the predicates inside x
  // that name v.
  double LogSelectivityCompletedBy(RelSet v, RelSet x) const;

  double OfByProduct(RelSet x) const;
  double OfByLogs(RelSet x) const;

  std::vector<double> rows_;
  std::vector<double> log_rows_;
  std::vector<Predicate> predicates_;
  std::vector<double> log_selectivities_;
  bool wide_range_ = false;
  // OfJoin's tables: every predicate binary and the product in range.
  bool pairwise_ = false;
  std::vector<RelSet> partners_;              // relation -> binary-predicate partners
  std::vector<double> pair_selectivity_;      // [u * 64 + v]: their predicates' product
  std::shared_ptr<const ListedRows> listed_;  // null: the model alone
  std::shared_ptr<const JoinTree> tree_;      // null: inner joins only
};

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_MODEL_CARDINALITY_H_
