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
  // with selectivity 1. Saturated at every node. O(nodes).
  double Estimate(RelSet x) const;
  // The inner node that completes inner predicate j (Query::predicates()).
  int owner(size_t j) const { return owner_[j]; }

 private:
  int Build(const Query& query, RelSet x);
  // Node i's estimate restricted to x. REQUIRES: node i meets x.
  double EstimateBelow(int i, RelSet x) const;
  // Node i's join of inputs estimated l and r, restricted to x.
  double Join(int i, RelSet x, double l, double r) const;
  int Add(JoinTreeNode node);

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
