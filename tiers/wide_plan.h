// A join plan over a query of any size: a binary tree whose leaves name
// relation ids, with every node's cardinality and cost (C_out; for the
// cluster model, latency_s beside its physical choices and metrics). The
// exact engine's Plan (core/model/plan.h) converts to it; the heuristic
// tiers build it directly, and every answer leaves in this form. Plain
// value type.
#ifndef SLICEPLAN_TIERS_WIDE_PLAN_H_
#define SLICEPLAN_TIERS_WIDE_PLAN_H_

#include <cstdint>
#include <string>
#include <vector>

#include "absl/functional/function_ref.h"
#include "absl/status/status.h"
#include "core/model/plan.h"
#include "core/model/wide_query.h"

namespace sliceplan {

struct WideNode {
  int32_t relation = -1;  // leaves: the relation id; joins: -1
  int32_t left = -1;      // joins: child node indices
  int32_t right = -1;
  double cardinality = 0;
  double cost = 0;  // C_out of the subtree (cluster model: latency_s)
  // joins: the type (left, semi, anti: `left` is the preserved input)
  JoinType type = JoinType::kInner;
  // The cluster model's physical choices and the subtree's metrics (as
  // PlanNode holds them); untouched by the cout model.
  JoinStrategy strategy = JoinStrategy::kShuffle;  // joins
  int32_t nodes = 0;                               // joins: rented nodes
  double sample_rate = 1;                          // leaves
  ClusterCosts metrics;
  bool is_leaf() const { return left < 0; }
};

struct WidePlan {
  std::vector<WideNode> nodes;  // children before parents; the root is last
  const WideNode& root() const { return nodes.back(); }
  double cost() const { return nodes.empty() ? 0 : nodes.back().cost; }
};

// A leaf node and a join node, for builders.
int32_t AddLeaf(WidePlan& plan, int32_t relation);
int32_t AddJoin(WidePlan& plan, int32_t left, int32_t right);

// OK when the plan is a binary tree over every relation of a query of n
// relations, each exactly once, children before parents, root last (and,
// if left_deep, every right operand a leaf). INTERNAL naming the fault
// otherwise: a tier that returns such a plan has a bug.
absl::Status CheckWidePlan(const WidePlan& plan, int n, bool left_deep = false);

// Fills every node's cardinality and C_out (core/cost/cout_model.h's
// rounding); returns the root's cost. With the engine's listed estimates
// (WideQuery::listed) or non-inner joins the cardinalities are the exact engine's
// (core/model/cardinality.h), so every plan of every tier is costed on the
// same numbers. REQUIRES: CheckWidePlan is OK.
double CostWidePlan(WidePlan& plan, const WideQuery& query);

// Each node's relations as a mask, by node index. REQUIRES: CheckWidePlan
// is OK and the query has at most 64 relations.
std::vector<RelSet> WideNodeSets(const WidePlan& plan);

// True when some join of the plan is a cross product (no predicate spans
// its two inputs). REQUIRES: CheckWidePlan is OK.
bool HasCrossProduct(const WidePlan& plan, const WideQuery& query);

// "((shipments vessels) ports)", as TreeString (core/model/plan.h). Iterative:
// a 10,000-deep left-deep plan does not recurse.
std::string WideTreeString(const WidePlan& plan, const WideQuery& query);

// The parenthesised tree with the caller's text: `leaf` writes a leaf,
// `between` what stands between a join's two inputs (WideTreeString: " ",
// or " LEFT " for a left join). Iterative, as WideTreeString.
std::string WriteTree(const WidePlan& plan,
                      absl::FunctionRef<void(const WideNode&, std::string&)> leaf,
                      absl::FunctionRef<void(const WideNode&, std::string&)> between);

// The exact engine's plan in this form (leaf = the set's single member),
// cardinalities, costs and the cluster model's choices and metrics copied.
WidePlan FromExactPlan(const Plan& plan);

// The reverse: relation masks from the leaves, every figure copied.
// REQUIRES: CheckWidePlan is OK and the query has at most 64 relations.
Plan ToExactPlan(const WidePlan& plan);

}  // namespace sliceplan

#endif  // SLICEPLAN_TIERS_WIDE_PLAN_H_
