// The engine's original join tree, rebuilt from a query with non-inner
// joins (docs/joins.md): each operator of `joins` is a node over its two
// inputs; the relations and operators of one input that no deeper operator
// holds form an inner block, joined left-deep in a connected order by the
// inner predicates among them. Both the cardinality rule of
// docs/cost-models.md ("Non-inner joins") and the conflict detector
// (core/graph/join_conflicts.h) read it. Immutable; thread-safe.
#ifndef SLICEPLAN_CORE_MODEL_JOIN_TREE_H_
#define SLICEPLAN_CORE_MODEL_JOIN_TREE_H_

#include <vector>

#include "core/model/query.h"

namespace sliceplan {

struct JoinTreeNode {
  JoinType type = JoinType::kInner;  // leaves: kInner
  int op = -1;                       // index in Query::joins(); -1 for inner and leaves
  int left = -1;                     // child node ids; -1 for a leaf
  int right = -1;
  RelSet set = 0;  // every relation below the node
  // The relations its predicate reads: the operator's, or for an inner
  // node the union of the inner predicates it completes (0: a cross
  // product).
  RelSet reads = 0;
  double selectivity = 1;  // the operator's (inner nodes: unused)
  bool leaf() const { return left < 0; }
};

class JoinTree {
 public:
  // REQUIRES: query.joins() passed ValidateJoinOps.
  explicit JoinTree(const Query& query);

  // Children before parents; the root is last.
  const std::vector<JoinTreeNode>& nodes() const { return nodes_; }
  const JoinTreeNode& root() const { return nodes_.back(); }

  // card(X) by the rule of docs/cost-models.md: the tree restricted to X
  // (an operator that loses a whole side gives way to the other),
  // estimated bottom-up with the inner, semi, anti, left and full
  // formulas. An operator whose predicate is not inside X is estimated
  // with selectivity 1. Saturated at every node. O(nodes); in the
  // product form below, O(relations + predicates + operators) without
  // recursion through the inner joins.
  double Estimate(RelSet x) const;
  // True when Estimate runs in the product form (no full join, nothing
  // near the ceiling; see below).
  bool product_form() const { return product_form_; }
  // The inner node that completes inner predicate j (Query::predicates()).
  int owner(size_t j) const { return owner_[j]; }

 private:
  int Build(const Query& query, RelSet x);
  // Node i's estimate restricted to x. REQUIRES: node i meets x.
  double EstimateBelow(int i, RelSet x) const;
  // Node i's join of inputs estimated l and r, restricted to x.
  double Join(int i, RelSet x, double l, double r) const;
  int Add(JoinTreeNode node);

  // The product form (docs/cost-models.md, "Non-inner joins"): every
  // operator but a full join is linear in its left input, so a subtree's
  // estimate is the product of its spine's relations and inner
  // predicates inside x, times one factor per operator on the spine
  // whose right input meets x. A spine (a region) is what a subtree
  // reaches without entering an operator's right input; each right input
  // starts a region of its own. Used when no full join is present and no
  // value can reach the ceiling (so no node saturates and the product
  // equals the recursion up to rounding).
  struct RegionOp {
    JoinType type = JoinType::kInner;
    RelSet left = 0;   // every relation of the left input
    RelSet right = 0;  // ... of the right input
    RelSet reads = 0;
    double selectivity = 1;
    double log_miss = 0;
    int right_region = -1;
    double right_whole = 0;   // the right input's estimate over all it holds
    double factor_whole = 0;  // the factor with the right input and reads inside x
  };
  struct Region {
    RelSet relations = 0;
    size_t predicates_begin = 0, predicates_end = 0;  // in region_predicates_
    size_t ops_begin = 0, ops_end = 0;                // in region_ops_
  };
  void BuildRegions();
  void FillRegion(int node, int region, std::vector<int>& right_roots);
  double EstimateRegion(int region, RelSet x) const;
  bool product_form_ = false;
  std::vector<Region> regions_;
  std::vector<Predicate> region_predicates_;
  std::vector<RegionOp> region_ops_;

  std::vector<JoinTreeNode> nodes_;
  std::vector<double> rows_;
  // per node, the inner predicates it completes
  std::vector<std::vector<Predicate>> completed_;
  std::vector<int> owner_;
  std::vector<double> log_miss_;  // per node: log1p(-selectivity)
  std::vector<double> whole_;     // per node: its estimate over all it holds
};

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_MODEL_JOIN_TREE_H_
