// A join plan as it leaves the search: a binary tree over base relations
// with the cardinality and cost of every node, in original relation ids.
// Plain value type.
#ifndef SLICEPLAN_CORE_MODEL_PLAN_H_
#define SLICEPLAN_CORE_MODEL_PLAN_H_

#include <span>
#include <string>
#include <vector>

#include "absl/functional/function_ref.h"
#include "core/model/cardinality.h"
#include "core/model/cluster_costs.h"
#include "core/model/query.h"

namespace sliceplan {

struct PlanNode {
  RelSet relations = 0;
  int left = -1;  // child node index; -1 for a leaf
  int right = -1;
  double cardinality = 0;
  double cost = 0;  // the cost model's primary metric of the subtree
  // The cluster model's physical choices and metrics (cost = latency_s).
  JoinStrategy strategy = JoinStrategy::kShuffle;  // joins
  int nodes = 0;                                   // joins: rented nodes
  double sample_rate = 1;                          // leaves
  ClusterCosts metrics;
  // The join's type; for left, semi and anti joins `left` is the
  // preserved or filtered input.
  JoinType type = JoinType::kInner;
  bool is_leaf() const { return left < 0; }
};

struct Plan {
  std::vector<PlanNode> nodes;  // children before parents; the root is last
  const PlanNode& root() const { return nodes.back(); }
};

// Builds the tree of `root`: left_of(S) is the left operand of composite set
// S (the right one is the rest). Fills cardinalities; costs stay 0.
// REQUIRES: left_of(S) is a non-empty proper subset of S for |S| >= 2.
Plan BuildPlan(RelSet root, absl::FunctionRef<RelSet(RelSet)> left_of, const Cardinality& card);

// Maps every node's set through `perm` (PermuteSet).
void RenumberPlan(Plan& plan, std::span<const RelationId> perm);

// "((shipments vessels) ports)": relation names, one space between
// siblings, as docs/interfaces.md fixes it; a non-inner join writes its
// keyword between them, "(vessels SEMI reefer_readings)".
std::string TreeString(const Plan& plan, const Query& query);

// True when the tree is left-deep: every right operand is a base relation.
bool IsLeftDeep(const Plan& plan);

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_MODEL_PLAN_H_
